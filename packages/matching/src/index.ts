/**
 * `@evalon/matching`: proctor eligibility and ranking for a visit request (docs/design/product.md,
 * computation 4). Pure: no I/O and no clock reads ("now" is a parameter).
 *
 * - Matching: {@link matchProctors} checks the hard constraints (licence for the campus
 *   jurisdiction on every footprint day, availability, no clash with accepted visits, travel
 *   radius, language, experience on the model) and ranks the eligible by a score in [0, 100]
 *   with a reason sentence for each part.
 * - Parts of it: {@link planTravel} (distance, travel days, footprint), {@link estimateFee},
 *   {@link jurisdictionCovers} and {@link credentialCoverage}, {@link matchingLanguage}.
 * - Availability (RFC 5545 recurrence rules expanded with rrule): {@link availabilityPreview},
 *   {@link availabilityDays}, {@link ruleOccurrences} and {@link validateAvailabilityRule}.
 *
 * Dates are `YYYY-MM-DD` calendar days: visit and footprint days in the campus zone,
 * availability days in the proctor's zone (compared as calendar days). Distances come from
 * `@evalon/scheduling`, money checks and formatting from `@evalon/deposits`.
 *
 * Cautions ({@link MATCHING_CAUTIONS}): the ranking helps schedule; it does not certify anyone.
 * @packageDocumentation
 */

/** Input and output shapes. */
export type {
  AcceptedVisit,
  AvailabilityException,
  Credential,
  CredentialKind,
  DateRange,
  HomeBase,
  Instant,
  IsoDate,
  LatLng,
  MatchingSettings,
  Money,
  Proctor,
  ProctorAvailability,
  ProctorMatch,
  ScoreParts,
  ScoreWeights,
  VisitRequest,
  VisitSite,
} from './types';

/** Matching and ranking. */
export { DEFAULT_MATCHING_SETTINGS, matchProctors, resolveMatchingSettings } from './match';

/** Travel days, footprint and fee estimate. */
export { type ProctorRates, type TravelPlan, estimateFee, planTravel } from './plan';

/** Credentials against the campus jurisdiction. */
export {
  type CampusJurisdiction,
  type CredentialCoverage,
  credentialCoverage,
  jurisdictionCovers,
  normaliseJurisdiction,
} from './jurisdiction';

/** BCP 47 language matching by primary subtag. */
export { matchingLanguage, primaryLanguage } from './language';

/** Availability from RFC 5545 recurrence rules. */
export {
  type AvailabilityFrequency,
  AvailabilityRuleError,
  type AvailabilityRuleInfo,
  type AvailabilityRuleValidation,
  type DayAvailability,
  type DayStatus,
  type Occurrence,
  availabilityDays,
  availabilityPreview,
  ruleOccurrences,
  validateAvailabilityRule,
} from './recurrence';

/**
 * Cautions to show beside a ranking (docs/design/product.md, "Cautions the product shows").
 */
export const MATCHING_CAUTIONS: readonly string[] = Object.freeze([
  'Evalon schedules and documents; it does not certify anyone. Credentialing and privileges are ' +
    'granted by the hospital under local rules; Evalon only records them.',
  'Licence cover follows common practice (per-state licensing in the United States and Canada); ' +
    'local regulations and licensed practice prevail.',
  'Fees are estimates until the proctor confirms; contracts prevail.',
]);
