import { randomBytes } from 'node:crypto';
import type { DataSource } from 'typeorm';
import type { OrganisationKind, Role } from '@evalon/contracts';
import { insertMembership, insertUser } from '../../src/identity/data-access/identity-repository';
import { hashPassword } from '../../src/identity/domain/passwords';
import {
  insertOrganisation,
  insertSite,
} from '../../src/organisations/data-access/organisation-repository';

/** A short suffix no other test row has, so tests can share a database. */
export function unique(): string {
  return `${Date.now().toString(36)}${randomBytes(3).toString('hex')}`;
}

/** The password every factory-made person gets unless told otherwise. */
export const testPassword = 'correct-horse-battery-staple';
let testPasswordHash: Promise<string> | undefined;

/** Makes an organisation; returns its id and name. */
export async function makeOrganisation(
  ds: DataSource,
  kind: OrganisationKind,
  country = 'US',
): Promise<{ id: number; name: string }> {
  const name = `Test ${kind} ${unique()}`;
  const id = await insertOrganisation(ds.manager, { name, kind, country }, new Date());
  return { id, name };
}

/** A person made by {@link makePerson}. */
export interface TestPerson {
  userId: number;
  membershipId: number;
  email: string;
  name: string;
  password: string;
}

/** Makes a person with one role in an organisation (with a password unless `pending`). */
export async function makePerson(
  ds: DataSource,
  organisationId: number,
  role: Role,
  options: { active?: boolean; pending?: boolean; password?: string; emailPrefix?: string } = {},
): Promise<TestPerson> {
  const password = options.password ?? testPassword;
  let passwordHash: string | null = null;
  if (!options.pending) {
    passwordHash =
      password === testPassword
        ? await (testPasswordHash ??= hashPassword(testPassword))
        : await hashPassword(password);
  }
  const email = `${options.emailPrefix ?? role}.${unique()}@test.example`;
  const name = `Person ${unique()}`;
  const now = new Date();
  const userId = await insertUser(
    ds.manager,
    { email, name, passwordHash, active: options.active ?? true, timeZone: null },
    now,
  );
  const membershipId = await insertMembership(ds.manager, { userId, organisationId, role }, now);
  return { userId, membershipId, email, name, password };
}

/** Makes a site for an organisation; returns its id. */
export async function makeSite(
  ds: DataSource,
  organisationId: number,
  kind: 'campus' | 'depot',
  timeZone = 'America/New_York',
): Promise<number> {
  return insertSite(
    ds.manager,
    {
      organisationId,
      kind,
      name: `Site ${unique()}`,
      addressLine: '1 Test Way',
      city: 'Testville',
      postalCode: null,
      region: null,
      country: 'US',
      latitude: 40.5,
      longitude: -74.25,
      timeZone,
      receivingHours: null,
      cutoffTime: kind === 'depot' ? '15:00' : null,
    },
    new Date(),
  );
}

/** A JSON column as read with a raw query (mysql2 may hand back text or an object). */
export function jsonColumn(value: unknown): unknown {
  return typeof value === 'string' ? JSON.parse(value) : value;
}
