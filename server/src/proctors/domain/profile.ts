import { createHash } from 'node:crypto';
import path from 'node:path';
import type { EntityManager } from 'typeorm';
import type {
  AvailabilitySettings,
  Credential,
  ProctorProfile,
  ProctorProfileInput,
} from '@evalon/contracts';
import { addCalendarDays, toSiteDate } from '@evalon/scheduling';
import { validateAvailabilityRule } from '@evalon/matching';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { isPdf, newDocumentKey } from '../../payments';
import {
  findCredential,
  findCredentials,
  findExperience,
  findProfile,
  insertCredential,
  replaceDeclaredExperience,
  updateAvailability,
  upsertProfile,
} from '../data-access/proctor-repository';
import type { ProctorCredentialRow } from '../data-access/entities';
import type { ProctorDeps } from './deps';

/** Days before the end of a credential from which it shows as expiring (and is warned about). */
export const credentialWarningDays = 60;

/** The proctor practice the signed-in proctor works for; 403 for anyone else. */
export function proctorOrganisation(auth: AuthContext): number {
  const membership = auth.user.memberships.find((m) => m.role === 'proctor');
  if (!membership) throw AppError.forbidden('forbidden', 'Only proctors have a proctor profile.');
  return membership.organisationId;
}

/** A credential's standing on `today`. */
export function credentialStatus(
  c: Pick<ProctorCredentialRow, 'validFrom' | 'validTo'>,
  today: string,
): Credential['status'] {
  if (c.validTo < today) return 'expired';
  if (c.validFrom > today) return 'future';
  if (c.validTo <= addCalendarDays(today, credentialWarningDays)) return 'expiring';
  return 'valid';
}

function toCredential(c: ProctorCredentialRow, today: string): Credential {
  return {
    id: c.id,
    kind: c.kind,
    title: c.title,
    jurisdiction: c.jurisdiction,
    validFrom: c.validFrom,
    validTo: c.validTo,
    status: credentialStatus(c, today),
    fileName: c.fileName,
    hasFile: c.storageKey !== null,
  };
}

/** A proctor's whole profile as the API shows it, or null when they have none yet. */
export async function loadProfile(
  m: EntityManager,
  userId: number,
  now: Date,
): Promise<ProctorProfile | null> {
  const p = await findProfile(m, userId);
  if (!p) return null;
  const today = toSiteDate(now, p.homeTimeZone);
  const [experience, credentials] = await Promise.all([
    findExperience(m, [userId]),
    findCredentials(m, [userId]),
  ]);
  return {
    userId: p.userId,
    organisationId: p.organisationId,
    displayName: p.displayName,
    homeLatitude: p.homeLatitude,
    homeLongitude: p.homeLongitude,
    homeTimeZone: p.homeTimeZone,
    homeCountry: p.homeCountry,
    travelRadiusKm: p.travelRadiusKm,
    languages: p.languages,
    dayRate: p.dayRate,
    travelDayRate: p.travelDayRate,
    currency: p.currency,
    specialties: p.specialties,
    bio: p.bio,
    experience: experience.map((e) => ({
      modelId: e.modelId,
      modelName: e.modelName,
      declaredCases: e.declared,
      recordedCases: e.recorded,
    })),
    credentials: credentials.map((c) => toCredential(c, today)),
    availability: p.availability,
  };
}

/** The signed-in proctor's profile (null before they first save it). */
export async function getMyProfile(
  deps: ProctorDeps,
  auth: AuthContext,
): Promise<ProctorProfile | null> {
  proctorOrganisation(auth);
  return loadProfile(deps.dataSource.manager, auth.user.id, deps.now());
}

/**
 * Creates or replaces the signed-in proctor's profile and declared experience. Unknown model ids
 * answer 422 and nothing is written.
 */
export async function saveMyProfile(
  deps: ProctorDeps,
  auth: AuthContext,
  input: ProctorProfileInput,
): Promise<ProctorProfile> {
  const organisationId = proctorOrganisation(auth);
  const now = deps.now();
  await deps.dataSource.transaction(async (m) => {
    const modelIds = [...new Set(input.experience.map((e) => e.modelId))];
    if (modelIds.length) {
      const found: { id: number }[] = await m.query('SELECT id FROM models WHERE id IN (?)', [
        modelIds,
      ]);
      const known = new Set(found.map((r) => Number(r.id)));
      const index = input.experience.findIndex((e) => !known.has(e.modelId));
      if (index >= 0) {
        throw AppError.field(
          'unknown_model',
          `experience.${index}.modelId`,
          'There is no such model.',
        );
      }
    }
    await upsertProfile(
      m,
      auth.user.id,
      organisationId,
      {
        displayName: input.displayName,
        homeLatitude: input.homeLatitude,
        homeLongitude: input.homeLongitude,
        homeTimeZone: input.homeTimeZone,
        homeCountry: input.homeCountry,
        travelRadiusKm: input.travelRadiusKm,
        languages: input.languages,
        dayRate: input.dayRate,
        travelDayRate: input.travelDayRate,
        currency: input.currency,
        specialties: input.specialties,
        bio: input.bio ?? null,
      },
      now,
    );
    await replaceDeclaredExperience(m, auth.user.id, input.experience);
  });
  return (await loadProfile(deps.dataSource.manager, auth.user.id, now))!;
}

/**
 * Checks availability rules with the matching package's reader (the same one the matching
 * uses) in the proctor's zone: 422 naming the rule (`rules.2`) and what is wrong.
 */
export function checkAvailability(availability: AvailabilitySettings, zone: string): void {
  const fieldErrors: Record<string, string[]> = {};
  availability.rules.forEach((rule, i) => {
    const checked = validateAvailabilityRule(rule, zone);
    if (!checked.valid) fieldErrors[`rules.${i}`] = [checked.error];
  });
  availability.exceptions.forEach((e, i) => {
    if (e.kind !== 'rule') return;
    const checked = validateAvailabilityRule(e.rule, zone);
    if (!checked.valid) fieldErrors[`exceptions.${i}.rule`] = [checked.error];
  });
  if (Object.keys(fieldErrors).length) {
    throw new AppError(422, 'invalid_availability', 'Some availability rules cannot be read.', {
      fieldErrors,
      formErrors: [],
    });
  }
}

/** Replaces the signed-in proctor's availability (404 before the profile exists). */
export async function saveMyAvailability(
  deps: ProctorDeps,
  auth: AuthContext,
  availability: AvailabilitySettings,
): Promise<ProctorProfile> {
  proctorOrganisation(auth);
  const now = deps.now();
  await deps.dataSource.transaction(async (m) => {
    const profile = await findProfile(m, auth.user.id, true);
    if (!profile) {
      throw AppError.notFound('profile_not_found', 'Save your proctor profile first.');
    }
    checkAvailability(availability, profile.homeTimeZone);
    await updateAvailability(m, auth.user.id, availability, now);
  });
  return (await loadProfile(deps.dataSource.manager, auth.user.id, now))!;
}

/** The fields of a new credential (already validated). */
export interface CredentialFields {
  kind: Credential['kind'];
  title: string;
  jurisdiction: string;
  validFrom: string;
  validTo: string;
}

/** A file name safe to offer back: no path, no control or odd characters, at most 200. */
function cleanFileName(name: string | undefined): string {
  const base = path.basename(String(name ?? '').replace(/\\/g, '/'));
  const cleaned = [...base]
    .filter((c) => c.charCodeAt(0) >= 0x20 && c.charCodeAt(0) !== 0x7f && !'"<>|*?:'.includes(c))
    .join('')
    .trim()
    .slice(0, 200);
  return cleaned && cleaned !== '.' && cleaned !== '..' ? cleaned : 'credential.pdf';
}

/**
 * Records a credential with its PDF: the bytes must be a PDF (sniffed), stored under a random
 * key outside the web root; 415 otherwise, nothing written. Evalon records the credential, it
 * does not verify or grant it.
 */
export async function addMyCredential(
  deps: ProctorDeps,
  auth: AuthContext,
  fields: CredentialFields,
  file: { buffer: Buffer; originalname?: string },
): Promise<Credential> {
  proctorOrganisation(auth);
  if (!(await isPdf(file.buffer))) {
    throw new AppError(415, 'unsupported_document_type', 'Attach the credential as a PDF.');
  }
  const now = deps.now();
  const key = newDocumentKey();
  let stored = false;
  try {
    const id = await deps.dataSource.transaction(async (m) => {
      const profile = await findProfile(m, auth.user.id, true);
      if (!profile)
        throw AppError.notFound('profile_not_found', 'Save your proctor profile first.');
      await deps.credentialStore.put(key, file.buffer, 'application/pdf');
      stored = true;
      return insertCredential(
        m,
        {
          proctorUserId: auth.user.id,
          ...fields,
          storageKey: key,
          fileName: cleanFileName(file.originalname),
          sizeBytes: file.buffer.length,
          sha256: createHash('sha256').update(file.buffer).digest('hex'),
        },
        now,
      );
    });
    const row = (await findCredential(deps.dataSource.manager, auth.user.id, id))!;
    const profile = (await findProfile(deps.dataSource.manager, auth.user.id))!;
    return toCredential(row, toSiteDate(now, profile.homeTimeZone));
  } catch (error) {
    // The row did not commit: the file must not stay behind.
    if (stored) await deps.credentialStore.remove(key).catch(() => undefined);
    throw error;
  }
}

/** The PDF of one of the signed-in proctor's credentials (404 for anyone else's). */
export async function readMyCredentialFile(
  deps: ProctorDeps,
  auth: AuthContext,
  credentialId: number,
): Promise<{ fileName: string; data: Buffer }> {
  const row = await findCredential(deps.dataSource.manager, auth.user.id, credentialId);
  const data = row?.storageKey ? await deps.credentialStore.get(row.storageKey) : null;
  if (!row || !data) throw AppError.notFound('credential_not_found', 'There is no such file.');
  return { fileName: row.fileName ?? 'credential.pdf', data };
}
