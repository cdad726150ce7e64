import type { DataSource } from 'typeorm';
import { toGtin14, type ModelCategory } from '@evalon/contracts';
import { addCalendarDays, isoWeekday } from '@evalon/scheduling';
import { insertModel } from '../../src/catalog/data-access/model-repository';
import { insertUnit } from '../../src/catalog/data-access/unit-repository';
import { insertSite } from '../../src/organisations/data-access/organisation-repository';
import { makeOrganisation, makePerson, unique, type TestPerson } from './factories';

/** Invented places (plausible coordinates in the named regions, not any real facility). */
export const places = {
  /** North-eastern US depot (New Jersey-like), New York zone. */
  eastDepot: {
    latitude: 40.5186,
    longitude: -74.3479,
    country: 'US',
    timeZone: 'America/New_York',
  },
  /** Western US depot (Nevada-like), Los Angeles zone. */
  westDepot: {
    latitude: 39.4977,
    longitude: -119.7668,
    country: 'US',
    timeZone: 'America/Los_Angeles',
  },
  /** German depot near Frankfurt. */
  germanDepot: { latitude: 50.0014, longitude: 8.5702, country: 'DE', timeZone: 'Europe/Berlin' },
  /** Boston-like campus. */
  bostonCampus: {
    latitude: 42.3371,
    longitude: -71.0712,
    country: 'US',
    timeZone: 'America/New_York',
  },
  /** Karlsruhe-like campus. */
  germanCampus: { latitude: 49.0123, longitude: 8.3334, country: 'DE', timeZone: 'Europe/Berlin' },
};
type Place = (typeof places)[keyof typeof places];

/** Makes a site of an organisation at a place. */
export async function makePlace(
  ds: DataSource,
  organisationId: number,
  kind: 'campus' | 'depot',
  place: Place,
  cutoffTime = '15:00',
): Promise<number> {
  return insertSite(
    ds.manager,
    {
      organisationId,
      kind,
      name: `${kind === 'depot' ? 'Depot' : 'Campus'} ${unique()}`,
      addressLine: '1 Test Way',
      city: 'Testville',
      postalCode: null,
      region: null,
      country: place.country,
      latitude: place.latitude,
      longitude: place.longitude,
      timeZone: place.timeZone,
      receivingHours: null,
      cutoffTime: kind === 'depot' ? cutoffTime : null,
    },
    new Date(),
  );
}

/** A lender with a fleet manager, a coordinator and one depot. */
export interface TestLender {
  id: number;
  name: string;
  fleet: TestPerson;
  coordinator: TestPerson;
  depotId: number;
}

/** Makes a lender with people and a depot (east US unless told otherwise). */
export async function makeLender(
  ds: DataSource,
  place: Place = places.eastDepot,
): Promise<TestLender> {
  const org = await makeOrganisation(ds, 'lender', place.country);
  const fleet = await makePerson(ds, org.id, 'fleet_manager');
  const coordinator = await makePerson(ds, org.id, 'coordinator');
  const depotId = await makePlace(ds, org.id, 'depot', place);
  return { ...org, fleet, coordinator, depotId };
}

/** A hospital with a buyer, a clinician and one campus. */
export interface TestHospital {
  id: number;
  name: string;
  buyer: TestPerson;
  clinician: TestPerson;
  campusId: number;
}

/** Makes a hospital with people and a campus (Boston-like unless told otherwise). */
export async function makeHospital(
  ds: DataSource,
  place: Place = places.bostonCampus,
): Promise<TestHospital> {
  const org = await makeOrganisation(ds, 'hospital', place.country);
  const buyer = await makePerson(ds, org.id, 'buyer');
  const clinician = await makePerson(ds, org.id, 'clinician');
  const campusId = await makePlace(ds, org.id, 'campus', place);
  return { ...org, buyer, clinician, campusId };
}

/** A valid GTIN-14 (GS1 check digit computed) with a random body. */
export function randomGtin(): string {
  const body = `0${String(Math.floor(Math.random() * 1e12)).padStart(12, '0')}`;
  return toGtin14(body);
}

/**
 * Makes a model straight in the table. Deposit rule: 10 % of the list value within
 * [1,000.00, 50,000.00] in the model's currency.
 */
export async function makeModel(
  ds: DataSource,
  lenderId: number,
  options: { category?: ModelCategory; listValue?: number; currency?: string; name?: string } = {},
): Promise<number> {
  const now = new Date();
  return insertModel(
    ds.manager,
    {
      lenderId,
      name: options.name ?? `Model ${unique()}`,
      category: options.category ?? 'laser',
      description: 'An invented test model.',
      listValue: options.listValue ?? 12_000_000,
      currency: options.currency ?? 'USD',
      depositPercentBps: 1_000,
      depositMin: 100_000,
      depositMax: 5_000_000,
    },
    now,
  );
}

/** Makes an active unit of a model at a depot. */
export async function makeUnit(
  ds: DataSource,
  modelId: number,
  depotId: number,
  status: 'active' | 'maintenance' | 'retired' = 'active',
): Promise<number> {
  return insertUnit(
    ds.manager,
    { modelId, serialNumber: `SN-${unique()}`, udiDi: null, homeDepotId: depotId, status },
    new Date(),
  );
}

/** Makes two models compatible (both directions, as the server stores them). */
export async function makeCompatible(ds: DataSource, a: number, b: number): Promise<void> {
  await ds.query(
    'INSERT INTO model_compatibility (model_id, compatible_model_id) VALUES (?, ?), (?, ?)',
    [a, b, b, a],
  );
}

/** Today's UTC date. */
export function todayUtc(): string {
  return new Date().toISOString().slice(0, 10);
}

/** The first Monday at least `days` calendar days from today (UTC). */
export function mondayAfter(days: number): string {
  let date = addCalendarDays(todayUtc(), days);
  while (isoWeekday(date) !== 1) date = addCalendarDays(date, 1);
  return date;
}

/** Counts rows in a table matching a WHERE clause. */
export async function countRows(
  ds: DataSource,
  table: string,
  where = '1 = 1',
  params: unknown[] = [],
): Promise<number> {
  const [row] = await ds.query(`SELECT COUNT(*) AS n FROM ${table} WHERE ${where}`, params);
  return Number(row.n);
}
