/**
 * Proctor matching (docs/design/product.md, computation 4): hard constraints, then a score for the eligible.
 */
import { formatMoney } from '@evalon/deposits';
import {
  type Instant,
  type IsoDate,
  assertIsoDate,
  assertTimeZone,
  calendarDaysBetween,
  intervalsOverlap,
  toInstant,
} from '@evalon/scheduling';

import { formatDay, formatWhole, joinPhrases, plural } from './format';
import { credentialCoverage, normaliseJurisdiction } from './jurisdiction';
import { matchingLanguage, primaryLanguage } from './language';
import { estimateFee, planTravel } from './plan';
import { AvailabilityRuleError, type DayStatus, availabilityDays } from './recurrence';
import type {
  CredentialKind,
  MatchingSettings,
  Money,
  Proctor,
  ProctorMatch,
  ScoreParts,
  ScoreWeights,
  VisitRequest,
} from './types';

/**
 * Default settings. All are assumptions of this product (docs/references.md: the 500 km travel
 * threshold and the 20 supervised cases are product assumptions, not trade rules), except the
 * per-state licensing countries, which are common practice.
 */
export const DEFAULT_MATCHING_SETTINGS: Readonly<MatchingSettings> = Object.freeze({
  minSupervisedCases: 20,
  travelDayThresholdKm: 500,
  subnationalLicensingCountries: Object.freeze(['US', 'CA']),
  weights: Object.freeze({ distance: 0.35, experience: 0.3, fee: 0.2, recency: 0.15 }),
  distanceHalfScoreKm: 500,
  experienceHalfScoreCases: 50,
  recencyFullScoreDays: 30,
});

/** Longest visit accepted, in days: a guard against a mistyped year, not a trade rule. */
const MAX_VISIT_DAYS = 366;
const MS_PER_DAY = 86_400_000;

const STATUS_TEXT: Record<Exclude<DayStatus, 'available'>, string> = {
  'not-in-pattern': 'not in the availability pattern',
  exception: 'exception',
  blackout: 'blackout',
};

const CREDENTIAL_TEXT: Record<Exclude<CredentialKind, 'licence'>, string> = {
  privileges: 'Privileges',
  certificate: 'Certificate',
};

function assertPositive(value: number, label: string): void {
  if (!Number.isFinite(value) || value <= 0) {
    throw new RangeError(`${label} must be a finite number > 0, got ${value}`);
  }
}

function assertNonNegative(value: number, label: string, whole = false): void {
  if (!Number.isFinite(value) || value < 0 || (whole && !Number.isInteger(value))) {
    throw new RangeError(
      `${label} must be a ${whole ? 'whole' : 'finite'} number ≥ 0, got ${value}`,
    );
  }
}

/**
 * Merges settings over {@link DEFAULT_MATCHING_SETTINGS} and checks them.
 * @throws RangeError naming the first bad setting.
 */
export function resolveMatchingSettings(
  settings: Partial<MatchingSettings> = {},
): MatchingSettings {
  const merged: MatchingSettings = {
    ...DEFAULT_MATCHING_SETTINGS,
    ...settings,
    weights: { ...DEFAULT_MATCHING_SETTINGS.weights, ...settings.weights },
  };
  assertNonNegative(merged.minSupervisedCases, 'minSupervisedCases', true);
  assertNonNegative(merged.travelDayThresholdKm, 'travelDayThresholdKm');
  assertPositive(merged.distanceHalfScoreKm, 'distanceHalfScoreKm');
  assertPositive(merged.experienceHalfScoreCases, 'experienceHalfScoreCases');
  assertPositive(merged.recencyFullScoreDays, 'recencyFullScoreDays');
  const weights = Object.entries(merged.weights) as [keyof ScoreWeights, number][];
  weights.forEach(([name, w]) => assertNonNegative(w, `weights.${name}`));
  if (weights.reduce((sum, [, w]) => sum + w, 0) <= 0) {
    throw new RangeError('At least one score weight must be above 0');
  }
  merged.subnationalLicensingCountries.forEach((c) => {
    if (normaliseJurisdiction(c).includes('-')) {
      throw new RangeError(`subnationalLicensingCountries holds a subdivision: ${c}`);
    }
  });
  return merged;
}

function assertRequest(request: VisitRequest): { campus: string; country: string } {
  const { site, visit } = request;
  assertTimeZone(site.zone);
  const country = normaliseJurisdiction(site.country);
  if (country.includes('-'))
    throw new RangeError(`site.country must be a country: ${site.country}`);
  let campus = country;
  if (site.subdivision !== undefined) {
    campus = normaliseJurisdiction(site.subdivision);
    if (!campus.startsWith(`${country}-`)) {
      throw new RangeError(`site.subdivision ${site.subdivision} is not in ${site.country}`);
    }
  }
  if (typeof request.modelId !== 'string' || request.modelId === '') {
    throw new RangeError('modelId must be a non-empty string');
  }
  assertIsoDate(visit.from);
  assertIsoDate(visit.to);
  const days = calendarDaysBetween(visit.from, visit.to) + 1;
  if (days < 1 || days > MAX_VISIT_DAYS) {
    throw new RangeError(`The visit must last 1 to ${MAX_VISIT_DAYS} days, got ${days}`);
  }
  if (!Number.isInteger(request.cases) || request.cases < 1) {
    throw new RangeError(`cases must be a whole number ≥ 1, got ${request.cases}`);
  }
  if (request.language !== undefined) primaryLanguage(request.language);
  return { campus, country };
}

/** Everything known about one proctor before the scores, which need the whole field. */
interface Assessment {
  proctor: Proctor;
  base: Omit<ProctorMatch, 'score' | 'scoreParts' | 'reasons'>;
  /** Reasons in display order, with the fee reason as the second-to-last entry. */
  reasons: string[];
  cases: number;
  /** Days since the last offer (fractional), or `null` when never offered. */
  daysSinceOffer: number | null;
}

function money(value: Money): string {
  return formatMoney(value.amount, value.currency, 'en-US');
}

function assess(
  request: VisitRequest,
  proctor: Proctor,
  now: number,
  settings: MatchingSettings,
  jurisdiction: { campus: string; country: string },
): Assessment {
  const { site, visit } = request;
  assertTimeZone(proctor.home.zone);
  assertNonNegative(proctor.travelRadiusKm, `Proctor ${proctor.id}: travelRadiusKm`);
  const plan = planTravel(proctor.home, site, visit, settings.travelDayThresholdKm);
  const feeEstimate = estimateFee(proctor, plan.visitDays, plan.travelDays);
  const { footprint } = plan;
  const exclusions: string[] = [];
  const reasons: string[] = [];
  const dayLabel = (day: IsoDate): string =>
    formatDay(day) +
    (day < visit.from
      ? ' (travel day before the visit)'
      : day > visit.to
        ? ' (travel day after the visit)'
        : '');

  // Licence: valid in the campus jurisdiction on every footprint day, travel days included.
  const subnational = settings.subnationalLicensingCountries.map(normaliseJurisdiction);
  const { campus, country } = jurisdiction;
  const licence = credentialCoverage(proctor.credentials, 'licence', site, footprint, subnational);
  const perState = subnational.includes(country);
  if (perState && site.subdivision === undefined) {
    exclusions.push(
      `No licence can be checked: the campus has no state or province code, and ${country} ` +
        'licences are granted per state or province',
    );
  } else if (licence.matching.length === 0) {
    const countryLevel = proctor.credentials.some(
      (c) => c.kind === 'licence' && normaliseJurisdiction(c.jurisdiction) === country,
    );
    exclusions.push(
      `No licence for ${campus}` +
        (perState && countryLevel
          ? ` (a ${country} licence does not cover ${campus}: ${country} licences are granted per state)`
          : ''),
    );
  } else if (licence.uncoveredDays.length > 0) {
    exclusions.push(
      `Licence for ${campus} not valid on ${joinPhrases(licence.uncoveredDays.map(dayLabel))}`,
    );
  } else {
    const last = licence.matching.find(
      (c) => c.validFrom <= footprint.to && footprint.to <= c.validTo,
    );
    const code = normaliseJurisdiction(last?.jurisdiction ?? campus);
    reasons.push(
      `Licensed in ${code}${code === campus ? '' : ` (covers ${campus})`} until ` +
        formatDay(licence.coveredUntil as IsoDate),
    );
  }

  // Availability on every visit day (proctor's zone); blackouts also on travel days.
  try {
    const days = availabilityDays(proctor.availability, proctor.home.zone, visit);
    const missing = days.filter((d) => d.status !== 'available');
    if (missing.length > 0) {
      exclusions.push(
        `Not available on ${joinPhrases(
          missing.map(
            (d) =>
              `${formatDay(d.date)} (${STATUS_TEXT[d.status as Exclude<DayStatus, 'available'>]})`,
          ),
        )}`,
      );
    } else {
      reasons.push(
        plan.visitDays === 1
          ? 'Available on the visit day'
          : `Available on all ${plural(plan.visitDays, 'visit day')}`,
      );
    }
  } catch (error) {
    if (!(error instanceof AvailabilityRuleError)) throw error;
    exclusions.push(error.message);
  }
  const travelDays = [footprint.from, footprint.to].filter((d) => d < visit.from || d > visit.to);
  const blackedOut = travelDays.filter((day) =>
    proctor.availability.blackouts.some(
      (b) => assertIsoDate(b.from) <= day && day <= assertIsoDate(b.to),
    ),
  );
  if (blackedOut.length > 0)
    exclusions.push(`Blackout on ${joinPhrases(blackedOut.map(dayLabel))}`);

  // Accepted visits: no shared day with the footprint (a shared day cannot be in two places).
  for (const other of proctor.acceptedVisits) {
    if (
      intervalsOverlap(
        { start: footprint.from, end: footprint.to },
        { start: other.from, end: other.to },
      )
    ) {
      exclusions.push(
        `Already booked ${formatDay(other.from)} to ${formatDay(other.to)} for another visit` +
          (other.visitId ? ` (${other.visitId})` : ''),
      );
    }
  }

  // Distance within the proctor's travel radius.
  const km = `${formatWhole(plan.distanceKm)} km`;
  if (plan.distanceKm > proctor.travelRadiusKm) {
    exclusions.push(
      `${km} away, beyond the ${formatWhole(proctor.travelRadiusKm)} km travel radius`,
    );
  } else {
    reasons.push(
      plan.travelDays > 0 ? `${km}, travel day before and after` : `${km}, same-day travel`,
    );
  }

  // Language, when the campus asks for one.
  proctor.languages.forEach(primaryLanguage);
  if (request.language !== undefined) {
    if (matchingLanguage(proctor.languages, request.language) !== undefined) {
      reasons.push(`Speaks ${request.language}`);
    } else {
      exclusions.push(
        `Does not speak ${request.language}` +
          (proctor.languages.length > 0 ? ` (speaks ${proctor.languages.join(', ')})` : ''),
      );
    }
  }

  // Experience on the model. Object.hasOwn keeps ids such as "constructor" from the prototype.
  const cases = Object.hasOwn(proctor.experience, request.modelId)
    ? (proctor.experience[request.modelId] as number)
    : 0;
  assertNonNegative(cases, `Proctor ${proctor.id}: experience on ${request.modelId}`, true);
  const casesText = `${cases === 0 ? 'No supervised cases' : plural(cases, 'supervised case')} on this model`;
  if (cases < settings.minSupervisedCases) {
    exclusions.push(`${casesText}; ${settings.minSupervisedCases} required`);
  } else {
    reasons.push(casesText);
  }

  // Other credentials are shown, never required: the hospital grants privileges itself.
  for (const kind of ['privileges', 'certificate'] as const) {
    const cover = credentialCoverage(proctor.credentials, kind, site, footprint, subnational);
    if (cover.matching.length > 0 && cover.uncoveredDays.length === 0) {
      reasons.push(
        `${CREDENTIAL_TEXT[kind]} recorded for ${campus} until ${formatDay(cover.coveredUntil as IsoDate)}`,
      );
    }
  }

  reasons.push(
    `Estimated fee ${money(feeEstimate)}: ${plural(plan.visitDays, 'visit day')} × ${money(proctor.dayRate)}` +
      (plan.travelDays > 0
        ? ` + ${plural(plan.travelDays, 'travel day')} × ${money(proctor.travelDayRate)}`
        : ''),
  );

  let daysSinceOffer: number | null = null;
  if (proctor.lastOfferedAt === null) {
    reasons.push('Not offered a visit before');
  } else {
    // An offer "in the future" (clock skew between servers) counts as just now.
    daysSinceOffer = Math.max(0, (now - toInstant(proctor.lastOfferedAt).toMillis()) / MS_PER_DAY);
    const whole = Math.floor(daysSinceOffer);
    reasons.push(
      `Last offered a visit ${whole === 0 ? 'less than a day' : plural(whole, 'day')} ago`,
    );
  }

  return {
    proctor,
    reasons,
    cases,
    daysSinceOffer,
    base: {
      proctorId: proctor.id,
      name: proctor.name,
      eligible: exclusions.length === 0,
      exclusions,
      distanceKm: plan.distanceKm,
      travelDays: plan.travelDays,
      footprint,
      feeEstimate,
    },
  };
}

/**
 * The score parts of one eligible proctor, each in [0, 1]:
 * - distance `H / (H + km)`: 1 at the campus, 0.5 at H km (default 500);
 * - experience `n / (n + E)`: 0.5 at E supervised cases (default 50), approaching 1;
 * - fee: the cheapest eligible fee in the same currency ÷ this fee (1 for the cheapest; fees in
 *   other currencies are not converted, as a pure function has no exchange rates);
 * - recency: days since the last offer ÷ R (default 30), at most 1; 1 if never offered.
 */
function scoreParts(
  a: Assessment,
  cheapest: ReadonlyMap<string, number>,
  settings: MatchingSettings,
): ScoreParts {
  const fee = a.base.feeEstimate;
  const min = cheapest.get(fee.currency) ?? fee.amount;
  return {
    distance: settings.distanceHalfScoreKm / (settings.distanceHalfScoreKm + a.base.distanceKm),
    experience: a.cases / (a.cases + settings.experienceHalfScoreCases),
    fee: fee.amount === 0 ? 1 : min / fee.amount,
    recency:
      a.daysSinceOffer === null ? 1 : Math.min(1, a.daysSinceOffer / settings.recencyFullScoreDays),
  };
}

/**
 * Score = 100 × Σ wₖ·partₖ ÷ Σ wₖ over distance, experience, fee and recency, rounded to one
 * decimal (default weights 0.35, 0.30, 0.20, 0.15). In [0, 100] because every part is.
 */
function weightedScore(parts: ScoreParts, weights: ScoreWeights): number {
  const keys = ['distance', 'experience', 'fee', 'recency'] as const;
  const total = keys.reduce((sum, k) => sum + weights[k], 0);
  const value = keys.reduce((sum, k) => sum + weights[k] * parts[k], 0) / total;
  return Math.round(value * 1000) / 10;
}

function byId(a: ProctorMatch, b: ProctorMatch): number {
  return a.proctorId < b.proctorId ? -1 : a.proctorId > b.proctorId ? 1 : 0;
}

/**
 * Matches proctors to a visit request.
 *
 * Hard constraints, each failing one adding a sentence to `exclusions`:
 * 1. a licence covering the campus jurisdiction valid on every footprint day (travel days too);
 * 2. available on every visit day (rules minus exceptions minus blackouts, in the proctor's
 *    zone) and no blackout on a travel day;
 * 3. no accepted visit sharing a day with the footprint;
 * 4. distance within the proctor's travel radius;
 * 5. speaks the requested language (same primary subtag), when one is requested;
 * 6. at least `minSupervisedCases` supervised cases on the model.
 *
 * The eligible are scored (see {@link ProctorMatch.scoreParts}) and come first by score,
 * highest first; ties and the ineligible (fewest exclusions first) are ordered by id, so the
 * result does not depend on the order of `proctors`.
 *
 * Evalon records credentials; it does not certify anyone. The hospital grants privileges under
 * local rules, and fees are estimates until the proctor confirms.
 *
 * @param request The visit request.
 * @param proctors Candidates; ids must be unique.
 * @param now The current instant (for the time since each proctor's last offer).
 * @param settings Overrides of {@link DEFAULT_MATCHING_SETTINGS}.
 * @throws RangeError (or DepositError for money) on malformed input; an unreadable availability
 *   rule only excludes its proctor.
 */
export function matchProctors(
  request: VisitRequest,
  proctors: readonly Proctor[],
  now: Instant,
  settings: Partial<MatchingSettings> = {},
): ProctorMatch[] {
  const resolved = resolveMatchingSettings(settings);
  const jurisdiction = assertRequest(request);
  const nowMs = toInstant(now).toMillis();
  const seen = new Set<string>();
  for (const p of proctors) {
    if (typeof p.id !== 'string' || p.id === '') throw new RangeError('A proctor has no id');
    if (seen.has(p.id)) throw new RangeError(`Proctor id ${p.id} appears twice`);
    seen.add(p.id);
  }
  const assessments = proctors.map((p) => assess(request, p, nowMs, resolved, jurisdiction));
  const cheapest = new Map<string, number>();
  for (const a of assessments) {
    if (!a.base.eligible) continue;
    const { amount, currency } = a.base.feeEstimate;
    cheapest.set(currency, Math.min(amount, cheapest.get(currency) ?? amount));
  }
  const matches = assessments.map((a): ProctorMatch => {
    if (!a.base.eligible) return { ...a.base, score: null, scoreParts: null, reasons: a.reasons };
    const parts = scoreParts(a, cheapest, resolved);
    return {
      ...a.base,
      score: weightedScore(parts, resolved.weights),
      scoreParts: parts,
      reasons: a.reasons,
    };
  });
  return matches.sort((a, b) => {
    if (a.eligible !== b.eligible) return a.eligible ? -1 : 1;
    if (a.eligible) return (b.score as number) - (a.score as number) || byId(a, b);
    return a.exclusions.length - b.exclusions.length || byId(a, b);
  });
}
