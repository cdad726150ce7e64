import type { DataSource } from 'typeorm';
import { makeOrganisation, makePerson, type TestPerson } from './factories';

/** Where an invented proctor lives (plausible coordinates, no real address). */
export interface ProctorHome {
  latitude: number;
  longitude: number;
  timeZone: string;
  country: string;
}

export const homes = {
  /** About 65 km from the Boston-like campus (Providence-like). */
  nearBoston: {
    latitude: 41.824,
    longitude: -71.4128,
    timeZone: 'America/New_York',
    country: 'US',
  },
  /** About 1,370 km from the Boston-like campus (Chicago-like): travel days. */
  chicago: { latitude: 41.8781, longitude: -87.6298, timeZone: 'America/Chicago', country: 'US' },
  /** Munich-like. */
  munich: { latitude: 48.1351, longitude: 11.582, timeZone: 'Europe/Berlin', country: 'DE' },
};

/** Options of {@link makeProctor}; defaults make a proctor eligible for a Boston-area visit. */
export interface ProctorOptions {
  home?: ProctorHome;
  radiusKm?: number;
  languages?: string[];
  dayRate?: number;
  travelDayRate?: number;
  currency?: string;
  /** Supervised cases per model id. */
  experience?: Record<number, number>;
  /** Licences: jurisdiction with validity. */
  licences?: { jurisdiction: string; validFrom: string; validTo: string }[];
  /** Availability rules (default: every day). */
  rules?: string[];
  blackouts?: { from: string; to: string }[];
}

/** A proctor made by {@link makeProctor}. */
export interface TestProctor extends TestPerson {
  organisationId: number;
}

/** Makes a proctor practice, a proctor and their profile, experience, licences and availability. */
export async function makeProctor(
  ds: DataSource,
  options: ProctorOptions = {},
): Promise<TestProctor> {
  const org = await makeOrganisation(ds, 'proctor_practice', options.home?.country ?? 'US');
  const person = await makePerson(ds, org.id, 'proctor');
  const home = options.home ?? homes.nearBoston;
  const now = new Date();
  const zone = home.timeZone;
  await ds.query(
    `INSERT INTO proctor_profiles (user_id, organisation_id, display_name, home_latitude,
        home_longitude, home_time_zone, home_country, travel_radius_km, languages, day_rate,
        travel_day_rate, currency, specialties, bio, availability, created_at, updated_at)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, NULL, ?, ?, ?)`,
    [
      person.userId,
      org.id,
      person.name,
      home.latitude,
      home.longitude,
      zone,
      home.country,
      options.radiusKm ?? 3000,
      JSON.stringify(options.languages ?? ['en-US']),
      options.dayRate ?? 250_000,
      options.travelDayRate ?? 80_000,
      options.currency ?? 'USD',
      JSON.stringify(['Urology']),
      JSON.stringify({
        rules: options.rules ?? [`DTSTART;TZID=${zone}:20260105T080000\nRRULE:FREQ=DAILY`],
        exceptions: [],
        blackouts: options.blackouts ?? [],
      }),
      now,
      now,
    ],
  );
  for (const [modelId, cases] of Object.entries(options.experience ?? {})) {
    await ds.query(
      'INSERT INTO proctor_experience (proctor_user_id, model_id, declared_cases, recorded_cases) VALUES (?, ?, ?, 0)',
      [person.userId, Number(modelId), cases],
    );
  }
  for (const l of options.licences ?? [
    { jurisdiction: 'US-MA', validFrom: '2020-01-01', validTo: '2035-12-31' },
  ]) {
    await ds.query(
      `INSERT INTO proctor_credentials (proctor_user_id, kind, title, jurisdiction, valid_from,
          valid_to, created_at) VALUES (?, 'licence', 'Medical licence', ?, ?, ?, ?)`,
      [person.userId, l.jurisdiction, l.validFrom, l.validTo, now],
    );
  }
  return { ...person, organisationId: org.id };
}

/** Gives a site its ISO 3166-2 subdivision. */
export async function setSubdivision(ds: DataSource, siteId: number, code: string): Promise<void> {
  await ds.query('UPDATE sites SET subdivision = ? WHERE id = ?', [code, siteId]);
}

/** The smallest file that file-type recognises as a PDF (header + EOF marker). */
export function tinyPdf(): Buffer {
  return Buffer.from(
    '%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[]/Count 0>>endobj\ntrailer<</Root 1 0 R>>\n%%EOF\n',
  );
}
