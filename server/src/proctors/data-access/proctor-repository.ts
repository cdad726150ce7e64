import type { EntityManager } from 'typeorm';
import type { AvailabilitySettings, CredentialKind } from '@evalon/contracts';
import type { ProctorCredentialRow, ProctorProfileRow } from './entities';

const day = (column: string, alias: string) => `DATE_FORMAT(${column}, '%Y-%m-%d') AS ${alias}`;
const json = <T>(value: unknown): T => (typeof value === 'string' ? JSON.parse(value) : value) as T;

const profileColumns = `p.user_id AS userId, p.organisation_id AS organisationId,
  p.display_name AS displayName, p.home_latitude AS homeLatitude, p.home_longitude AS homeLongitude,
  p.home_time_zone AS homeTimeZone, p.home_country AS homeCountry,
  p.travel_radius_km AS travelRadiusKm, p.languages, p.day_rate AS dayRate,
  p.travel_day_rate AS travelDayRate, p.currency, p.specialties, p.bio, p.availability,
  p.last_offered_at AS lastOfferedAt, p.created_at AS createdAt, p.updated_at AS updatedAt`;

function toProfile(r: Record<string, unknown>): ProctorProfileRow {
  return {
    userId: Number(r.userId),
    organisationId: Number(r.organisationId),
    displayName: String(r.displayName),
    homeLatitude: Number(r.homeLatitude),
    homeLongitude: Number(r.homeLongitude),
    homeTimeZone: String(r.homeTimeZone),
    homeCountry: String(r.homeCountry),
    travelRadiusKm: Number(r.travelRadiusKm),
    languages: json<string[]>(r.languages),
    dayRate: Number(r.dayRate),
    travelDayRate: Number(r.travelDayRate),
    currency: String(r.currency),
    specialties: json<string[]>(r.specialties),
    bio: (r.bio as string | null) ?? null,
    availability: json<AvailabilitySettings>(r.availability),
    lastOfferedAt: (r.lastOfferedAt as Date | null) ?? null,
    createdAt: r.createdAt as Date,
    updatedAt: r.updatedAt as Date,
  };
}

/** One proctor's profile, or null; `lock` takes the row's write lock (the proctor lock). */
export async function findProfile(
  m: EntityManager,
  userId: number,
  lock = false,
): Promise<ProctorProfileRow | null> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT ${profileColumns} FROM proctor_profiles p WHERE p.user_id = ?${lock ? ' FOR UPDATE' : ''}`,
    [userId],
  );
  return rows[0] ? toProfile(rows[0]) : null;
}

/** Every profile (the candidate pool), or the given ones, by user id. */
export async function findProfiles(
  m: EntityManager,
  userIds?: readonly number[],
): Promise<ProctorProfileRow[]> {
  if (userIds && userIds.length === 0) return [];
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT ${profileColumns} FROM proctor_profiles p
       JOIN users u ON u.id = p.user_id AND u.active = 1
      ${userIds ? 'WHERE p.user_id IN (?)' : ''} ORDER BY p.user_id`,
    userIds ? [userIds] : [],
  );
  return rows.map(toProfile);
}

/** Fields of a profile the proctor edits. */
export type ProfileFields = Omit<
  ProctorProfileRow,
  'userId' | 'organisationId' | 'availability' | 'lastOfferedAt' | 'createdAt' | 'updatedAt'
>;

/** Creates or updates a profile (availability kept; empty for a new one). */
export async function upsertProfile(
  m: EntityManager,
  userId: number,
  organisationId: number,
  p: ProfileFields,
  now: Date,
): Promise<void> {
  const empty: AvailabilitySettings = { rules: [], exceptions: [], blackouts: [] };
  await m.query(
    `INSERT INTO proctor_profiles (user_id, organisation_id, display_name, home_latitude,
        home_longitude, home_time_zone, home_country, travel_radius_km, languages, day_rate,
        travel_day_rate, currency, specialties, bio, availability, created_at, updated_at)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)
     ON DUPLICATE KEY UPDATE display_name = VALUES(display_name),
        home_latitude = VALUES(home_latitude), home_longitude = VALUES(home_longitude),
        home_time_zone = VALUES(home_time_zone), home_country = VALUES(home_country),
        travel_radius_km = VALUES(travel_radius_km), languages = VALUES(languages),
        day_rate = VALUES(day_rate), travel_day_rate = VALUES(travel_day_rate),
        currency = VALUES(currency), specialties = VALUES(specialties), bio = VALUES(bio),
        updated_at = VALUES(updated_at)`,
    [
      userId,
      organisationId,
      p.displayName,
      p.homeLatitude,
      p.homeLongitude,
      p.homeTimeZone,
      p.homeCountry,
      p.travelRadiusKm,
      JSON.stringify(p.languages),
      p.dayRate,
      p.travelDayRate,
      p.currency,
      JSON.stringify(p.specialties),
      p.bio,
      JSON.stringify(empty),
      now,
      now,
    ],
  );
}

/** Replaces the availability of a profile. */
export async function updateAvailability(
  m: EntityManager,
  userId: number,
  availability: AvailabilitySettings,
  now: Date,
): Promise<void> {
  await m.query('UPDATE proctor_profiles SET availability = ?, updated_at = ? WHERE user_id = ?', [
    JSON.stringify(availability),
    now,
    userId,
  ]);
}

/** Marks that the proctors were offered work now (the ranking spreads the work). */
export async function touchLastOffered(m: EntityManager, userId: number, now: Date): Promise<void> {
  await m.query('UPDATE proctor_profiles SET last_offered_at = ? WHERE user_id = ?', [now, userId]);
}

/** Sets the declared cases per model; models not listed are set to 0 declared. */
export async function replaceDeclaredExperience(
  m: EntityManager,
  userId: number,
  experience: readonly { modelId: number; declaredCases: number }[],
): Promise<void> {
  await m.query('UPDATE proctor_experience SET declared_cases = 0 WHERE proctor_user_id = ?', [
    userId,
  ]);
  for (const e of experience) {
    await m.query(
      `INSERT INTO proctor_experience (proctor_user_id, model_id, declared_cases, recorded_cases)
       VALUES (?, ?, ?, 0) ON DUPLICATE KEY UPDATE declared_cases = VALUES(declared_cases)`,
      [userId, e.modelId, e.declaredCases],
    );
  }
}

/** Adds cases recorded on a completed visit to the proctor's experience with the model. */
export async function addRecordedCases(
  m: EntityManager,
  userId: number,
  modelId: number,
  cases: number,
): Promise<void> {
  await m.query(
    `INSERT INTO proctor_experience (proctor_user_id, model_id, declared_cases, recorded_cases)
     VALUES (?, ?, 0, ?) ON DUPLICATE KEY UPDATE recorded_cases = recorded_cases + VALUES(recorded_cases)`,
    [userId, modelId, cases],
  );
}

/** Experience rows of some proctors with the model names. */
export async function findExperience(
  m: EntityManager,
  userIds: readonly number[],
): Promise<
  {
    proctorUserId: number;
    modelId: number;
    modelName: string;
    declared: number;
    recorded: number;
  }[]
> {
  if (userIds.length === 0) return [];
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT e.proctor_user_id AS p, e.model_id AS modelId, mo.name AS modelName,
            e.declared_cases AS declared, e.recorded_cases AS recorded
       FROM proctor_experience e JOIN models mo ON mo.id = e.model_id
      WHERE e.proctor_user_id IN (?) ORDER BY e.proctor_user_id, mo.name`,
    [userIds],
  );
  return rows.map((r) => ({
    proctorUserId: Number(r.p),
    modelId: Number(r.modelId),
    modelName: String(r.modelName),
    declared: Number(r.declared),
    recorded: Number(r.recorded),
  }));
}

const credentialColumns = `c.id, c.proctor_user_id AS proctorUserId, c.kind, c.title, c.jurisdiction,
  ${day('c.valid_from', 'validFrom')}, ${day('c.valid_to', 'validTo')}, c.storage_key AS storageKey,
  c.file_name AS fileName, c.size_bytes AS sizeBytes, c.sha256, c.expiry_warned_at AS expiryWarnedAt,
  c.created_at AS createdAt`;

function toCredential(r: Record<string, unknown>): ProctorCredentialRow {
  return {
    id: Number(r.id),
    proctorUserId: Number(r.proctorUserId),
    kind: r.kind as CredentialKind,
    title: String(r.title),
    jurisdiction: String(r.jurisdiction),
    validFrom: String(r.validFrom),
    validTo: String(r.validTo),
    storageKey: (r.storageKey as string | null) ?? null,
    fileName: (r.fileName as string | null) ?? null,
    sizeBytes: r.sizeBytes === null ? null : Number(r.sizeBytes),
    sha256: (r.sha256 as string | null) ?? null,
    expiryWarnedAt: (r.expiryWarnedAt as Date | null) ?? null,
    createdAt: r.createdAt as Date,
  };
}

/** Credentials of some proctors, by proctor then end date. */
export async function findCredentials(
  m: EntityManager,
  userIds: readonly number[],
): Promise<ProctorCredentialRow[]> {
  if (userIds.length === 0) return [];
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT ${credentialColumns} FROM proctor_credentials c
      WHERE c.proctor_user_id IN (?) ORDER BY c.proctor_user_id, c.valid_to, c.id`,
    [userIds],
  );
  return rows.map(toCredential);
}

/** One credential of one proctor. */
export async function findCredential(
  m: EntityManager,
  userId: number,
  credentialId: number,
): Promise<ProctorCredentialRow | null> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT ${credentialColumns} FROM proctor_credentials c WHERE c.id = ? AND c.proctor_user_id = ?`,
    [credentialId, userId],
  );
  return rows[0] ? toCredential(rows[0]) : null;
}

/** A new credential. */
export type NewCredential = Omit<ProctorCredentialRow, 'id' | 'expiryWarnedAt' | 'createdAt'>;

export async function insertCredential(
  m: EntityManager,
  c: NewCredential,
  now: Date,
): Promise<number> {
  const result: { insertId: number } = await m.query(
    `INSERT INTO proctor_credentials (proctor_user_id, kind, title, jurisdiction, valid_from,
        valid_to, storage_key, file_name, size_bytes, sha256, created_at)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    [
      c.proctorUserId,
      c.kind,
      c.title,
      c.jurisdiction,
      c.validFrom,
      c.validTo,
      c.storageKey,
      c.fileName,
      c.sizeBytes,
      c.sha256,
      now,
    ],
  );
  return Number(result.insertId);
}

/**
 * Credentials ending between `from` and `to` (inclusive) that have not been warned about, locked
 * with SKIP LOCKED so several job runners share the work.
 */
export async function claimExpiringCredentials(
  m: EntityManager,
  from: string,
  to: string,
  limit: number,
): Promise<ProctorCredentialRow[]> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT ${credentialColumns} FROM proctor_credentials c
      WHERE c.valid_to BETWEEN ? AND ? AND c.expiry_warned_at IS NULL
      ORDER BY c.id LIMIT ? FOR UPDATE SKIP LOCKED`,
    [from, to, limit],
  );
  return rows.map(toCredential);
}

export async function markCredentialWarned(
  m: EntityManager,
  credentialId: number,
  now: Date,
): Promise<void> {
  await m.query('UPDATE proctor_credentials SET expiry_warned_at = ? WHERE id = ?', [
    now,
    credentialId,
  ]);
}

/**
 * Accepted (and later) visits of some proctors as busy day ranges (visit plus travel days in the
 * campus calendar), for the overlap constraint.
 */
export async function findBusyRanges(
  m: EntityManager,
  userIds: readonly number[] | null,
  excludeVisitId?: number,
  within?: { from: string; to: string },
): Promise<{ proctorUserId: number; visitId: number; from: string; to: string }[]> {
  if (userIds && userIds.length === 0) return [];
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT v.proctor_user_id AS p, v.id, ${day('v.busy_from', 'f')}, ${day('v.busy_to', 't')}
       FROM visits v
      WHERE v.state IN ('accepted', 'completed', 'signed_off') AND v.busy_from IS NOT NULL
        ${userIds ? 'AND v.proctor_user_id IN (?)' : ''} ${excludeVisitId ? 'AND v.id <> ?' : ''}
        ${within ? 'AND v.busy_to >= ? AND v.busy_from <= ?' : ''}`,
    [
      ...(userIds ? [userIds] : []),
      ...(excludeVisitId ? [excludeVisitId] : []),
      ...(within ? [within.from, within.to] : []),
    ],
  );
  return rows.map((r) => ({
    proctorUserId: Number(r.p),
    visitId: Number(r.id),
    from: String(r.f),
    to: String(r.t),
  }));
}
