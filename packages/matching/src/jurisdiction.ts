/**
 * Which credentials cover a campus, and on which days.
 *
 * The rule (common practice, from memory; Evalon records credentials and does not judge them,
 * the hospital grants privileges under local rules):
 * - a credential for a subdivision (`US-IL`, `DE-BY`) covers only that subdivision;
 * - a credential for a country (`DE`) covers every campus in that country (`DE-BY` included),
 *   because e.g. the German Approbation is granted under federal law and valid nationwide;
 * - except in countries that license per state or province (United States: state medical
 *   boards; Canada: provincial colleges), where a country-level `US` entry covers no campus.
 */
import {
  type IsoDate,
  addCalendarDays,
  assertIsoDate,
  calendarDaysBetween,
} from '@evalon/scheduling';

import type { Credential, CredentialKind, DateRange, VisitSite } from './types';

const JURISDICTION = /^[A-Z]{2}(-[A-Z0-9]{1,3})?$/;

/**
 * Checks a jurisdiction code (ISO 3166-1 alpha-2 `DE` or ISO 3166-2 `DE-BY`, any case) and
 * returns it upper-cased.
 * @throws RangeError for anything else.
 */
export function normaliseJurisdiction(code: string): string {
  const upper = typeof code === 'string' ? code.trim().toUpperCase() : '';
  if (!JURISDICTION.test(upper)) {
    throw new RangeError(`Not an ISO 3166 country or subdivision code: ${JSON.stringify(code)}`);
  }
  return upper;
}

/** The parts of a campus that decide which credentials cover it. */
export type CampusJurisdiction = Pick<VisitSite, 'country' | 'subdivision'>;

/**
 * Whether a credential for `jurisdiction` covers a campus (see the module rule).
 * @param jurisdiction The credential's country or subdivision code.
 * @param campus The campus country and, where known, subdivision.
 * @param subnationalLicensingCountries Countries that license per state or province.
 */
export function jurisdictionCovers(
  jurisdiction: string,
  campus: CampusJurisdiction,
  subnationalLicensingCountries: readonly string[],
): boolean {
  const code = normaliseJurisdiction(jurisdiction);
  const country = normaliseJurisdiction(campus.country);
  const subdivision =
    campus.subdivision === undefined ? undefined : normaliseJurisdiction(campus.subdivision);
  if (code.includes('-')) return code === subdivision;
  return code === country && !subnationalLicensingCountries.includes(country);
}

/** The credentials of one kind that cover a campus and the footprint days they leave open. */
export interface CredentialCoverage {
  /** Credentials of the kind whose jurisdiction covers the campus (any validity). */
  matching: Credential[];
  /** Footprint days no matching credential is valid on, ascending. */
  uncoveredDays: IsoDate[];
  /**
   * Last day of unbroken cover from the footprint's last day onwards (chained renewals count);
   * `null` when the last day is not covered.
   */
  coveredUntil: IsoDate | null;
}

function validOn(credential: Credential, day: IsoDate): boolean {
  return credential.validFrom <= day && day <= credential.validTo;
}

/**
 * Checks one kind of credential against a campus for every day of a footprint.
 * @throws RangeError for malformed codes or dates.
 */
export function credentialCoverage(
  credentials: readonly Credential[],
  kind: CredentialKind,
  campus: CampusJurisdiction,
  footprint: DateRange,
  subnationalLicensingCountries: readonly string[],
): CredentialCoverage {
  for (const c of credentials) {
    assertIsoDate(c.validFrom);
    assertIsoDate(c.validTo);
    normaliseJurisdiction(c.jurisdiction);
  }
  const matching = credentials.filter(
    (c) =>
      c.kind === kind &&
      c.validFrom <= c.validTo &&
      jurisdictionCovers(c.jurisdiction, campus, subnationalLicensingCountries),
  );
  const uncoveredDays: IsoDate[] = [];
  const days = calendarDaysBetween(footprint.from, footprint.to);
  for (let i = 0; i <= days; i += 1) {
    const day = addCalendarDays(footprint.from, i);
    if (!matching.some((c) => validOn(c, day))) uncoveredDays.push(day);
  }
  let coveredUntil: IsoDate | null = null;
  let cursor: IsoDate = footprint.to;
  // Follow renewals: the next credential must be valid on the day after the previous one ends.
  for (;;) {
    const ends = matching.filter((c) => validOn(c, cursor)).map((c) => c.validTo);
    if (ends.length === 0) break;
    coveredUntil = ends.reduce((a, b) => (b > a ? b : a));
    cursor = addCalendarDays(coveredUntil, 1);
  }
  return { matching, uncoveredDays, coveredUntil };
}
