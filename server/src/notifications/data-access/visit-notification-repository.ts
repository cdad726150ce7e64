import type { EntityManager } from 'typeorm';
import type { VisitSummary } from '@evalon/messages';

const day = (column: string, alias: string) => `DATE_FORMAT(${column}, '%Y-%m-%d') AS ${alias}`;

/** What the visit notifier reads about a visit. */
export interface VisitNotificationData {
  visit: VisitSummary;
  hospitalId: number;
  requestedByUserId: number;
  proctorUserId: number | null;
}

/** A person by user id, with the proctor's home zone when they have a profile. */
export interface Person {
  userId: number;
  email: string;
  name: string;
  timeZone: string | null;
}

/** Loads a visit's summary for its messages. */
export async function loadVisitNotification(
  m: EntityManager,
  visitId: number,
): Promise<VisitNotificationData | null> {
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT v.id, v.reference, v.hospital_id AS hospitalId, v.site_time_zone AS siteTimeZone,
            ${day('v.visit_from', 'visitFrom')}, ${day('v.visit_to', 'visitTo')}, v.cases, v.note,
            ${day('v.busy_from', 'busyFrom')}, ${day('v.busy_to', 'busyTo')},
            v.travel_days AS travelDays, v.fee_amount AS feeAmount, v.fee_currency AS feeCurrency,
            v.requested_by_user_id AS requestedBy, v.proctor_user_id AS proctorUserId,
            h.name AS hospitalName, s.name AS siteName, s.address_line AS addressLine,
            s.postal_code AS postalCode, s.city, s.country, mo.name AS modelName,
            pp.display_name AS proctorName
       FROM visits v JOIN organisations h ON h.id = v.hospital_id JOIN sites s ON s.id = v.site_id
       JOIN models mo ON mo.id = v.model_id LEFT JOIN proctor_profiles pp ON pp.user_id = v.proctor_user_id
      WHERE v.id = ?`,
    [visitId],
  );
  const r = rows[0];
  if (!r) return null;
  return {
    hospitalId: Number(r.hospitalId),
    requestedByUserId: Number(r.requestedBy),
    proctorUserId: r.proctorUserId === null ? null : Number(r.proctorUserId),
    visit: {
      id: Number(r.id),
      reference: String(r.reference),
      hospitalName: String(r.hospitalName),
      siteName: String(r.siteName),
      siteAddress: [r.addressLine, [r.postalCode, r.city].filter(Boolean).join(' '), r.country]
        .filter(Boolean)
        .join('\n'),
      siteTimeZone: String(r.siteTimeZone),
      modelName: String(r.modelName),
      from: String(r.visitFrom),
      to: String(r.visitTo),
      cases: Number(r.cases),
      proctorName: (r.proctorName as string | null) ?? null,
      busyFrom: (r.busyFrom as string | null) ?? null,
      busyTo: (r.busyTo as string | null) ?? null,
      travelDays: r.travelDays === null ? null : Number(r.travelDays),
      fee:
        r.feeAmount === null
          ? null
          : { amount: Number(r.feeAmount), currency: String(r.feeCurrency) },
      note: (r.note as string | null) ?? null,
    },
  };
}

/** Active people by id; a proctor's zone falls back to their profile's home zone. */
export async function findPeople(m: EntityManager, userIds: readonly number[]): Promise<Person[]> {
  if (userIds.length === 0) return [];
  const rows: Record<string, unknown>[] = await m.query(
    `SELECT u.id, u.email, COALESCE(pp.display_name, u.name) AS name,
            COALESCE(u.time_zone, pp.home_time_zone) AS timeZone
       FROM users u LEFT JOIN proctor_profiles pp ON pp.user_id = u.id
      WHERE u.id IN (?) AND u.active = 1 ORDER BY u.id`,
    [userIds],
  );
  return rows.map((r) => ({
    userId: Number(r.id),
    email: String(r.email),
    name: String(r.name),
    timeZone: (r.timeZone as string | null) ?? null,
  }));
}

/** The live or latest offer deadline of a proctor on a visit. */
export async function offerDeadline(
  m: EntityManager,
  visitId: number,
  proctorUserId: number,
): Promise<Date | null> {
  const rows: { d: Date | null }[] = await m.query(
    'SELECT deadline_at AS d FROM visit_offers WHERE visit_id = ? AND proctor_user_id = ?',
    [visitId, proctorUserId],
  );
  return rows[0]?.d ?? null;
}

/** A sign-off's case count (for the message). */
export async function signOffCount(
  m: EntityManager,
  visitId: number,
  traineeUserId: number,
): Promise<number> {
  const rows: { n: number }[] = await m.query(
    'SELECT proctored_cases AS n FROM visit_sign_offs WHERE visit_id = ? AND trainee_user_id = ?',
    [visitId, traineeUserId],
  );
  return Number(rows[0]?.n ?? 0);
}
