import type { Money } from '@evalon/deposits';
import type { Instant, IsoDate, LatLng } from '@evalon/scheduling';

export type { Instant, IsoDate, LatLng, Money };

/** A closed range of calendar days: both `from` and `to` are included. */
export interface DateRange {
  /** First day (`YYYY-MM-DD`). */
  from: IsoDate;
  /** Last day (`YYYY-MM-DD`), not before `from`. */
  to: IsoDate;
}

/** The hospital campus a visit is for. */
export interface VisitSite extends LatLng {
  /** IANA time zone of the campus (e.g. `America/Chicago`); visit days are days in this zone. */
  zone: string;
  /** ISO 3166-1 alpha-2 country code (e.g. `US`, `DE`). */
  country: string;
  /**
   * ISO 3166-2 subdivision (e.g. `US-IL`, `DE-BY`) when known. Needed wherever licences are
   * granted per state or province (see {@link MatchingSettings.subnationalLicensingCountries}).
   */
  subdivision?: string;
}

/** A hospital's request for a proctor to supervise its first cases on a model. */
export interface VisitRequest {
  /** The campus the proctor goes to. */
  site: VisitSite;
  /** The model the cases are on; proctors need experience on this model. */
  modelId: string;
  /** First and last visit (case) day, inclusive, as calendar days in the campus zone. */
  visit: DateRange;
  /** Number of cases planned; carried for the offer, not used by the ranking. */
  cases: number;
  /** BCP 47 language tag the campus asks for (e.g. `de`, `pt-BR`); any language when omitted. */
  language?: string;
}

/** Where a proctor travels from. */
export interface HomeBase extends LatLng {
  /** IANA time zone the proctor lives in; availability days are evaluated in this zone. */
  zone: string;
  /** ISO 3166-1 alpha-2 country code. */
  country: string;
}

/** Kind of credential: only `licence` is a hard constraint; the others are shown as reasons. */
export type CredentialKind = 'licence' | 'privileges' | 'certificate';

/** One credential a proctor has recorded. Evalon records credentials; it does not grant them. */
export interface Credential {
  /** What the credential is. */
  kind: CredentialKind;
  /** Where it applies: a country (`US`, `DE`) or an ISO 3166-2 subdivision (`US-IL`, `DE-BY`). */
  jurisdiction: string;
  /** First valid day (`YYYY-MM-DD`), inclusive. */
  validFrom: IsoDate;
  /** Last valid day (`YYYY-MM-DD`), inclusive. */
  validTo: IsoDate;
}

/** A day that a proctor's availability rules would offer but that is taken out again. */
export type AvailabilityException =
  | {
      /** A single day taken out (like an EXDATE, but for the whole day). */
      kind: 'date';
      /** The day, in the proctor's zone. */
      date: IsoDate;
    }
  | {
      /**
       * A one-off extra day of availability outside the pattern (like an RDATE, RFC 5545
       * §3.8.5.2). As in RFC 5545 §3.8.5.1, exception days and rules still take it out.
       */
      kind: 'extra';
      /** The day, in the proctor's zone. */
      date: IsoDate;
    }
  | {
      /** Every day on which this recurrence has an occurrence is taken out (like an EXRULE). */
      kind: 'rule';
      /** `DTSTART` and `RRULE` lines, as in {@link ProctorAvailability.rules}. */
      rule: string;
    };

/**
 * When a proctor can work. A day is available when one of the rules has an occurrence starting
 * on it (in the proctor's zone), no exception takes it out and no blackout covers it.
 */
export interface ProctorAvailability {
  /**
   * RFC 5545 recurrences, each a `DTSTART` line and an `RRULE` line, e.g.
   * `DTSTART;TZID=Europe/Berlin:20270104T080000\nRRULE:FREQ=WEEKLY;BYDAY=MO,TU,TH`. Check them
   * with {@link validateAvailabilityRule} when they are saved.
   */
  rules: string[];
  /** Days and recurrences taken out of the rules. */
  exceptions: AvailabilityException[];
  /**
   * Days the proctor can neither work nor travel (holidays, conferences), in the proctor's zone.
   * Unlike the weekly pattern they also block travel days.
   */
  blackouts: DateRange[];
}

/** A visit the proctor has already accepted (including its travel days). */
export interface AcceptedVisit extends DateRange {
  /** The visit's id, when known, for the reason text and for tracing. */
  visitId?: string;
}

/** An expert clinician who can supervise first cases. */
export interface Proctor {
  /** Stable id; also the tie-break of the ranking. Must be unique in one call. */
  id: string;
  /** Display name. */
  name: string;
  /** Where the proctor travels from. */
  home: HomeBase;
  /** Farthest great-circle distance the proctor will travel, in km. */
  travelRadiusKm: number;
  /** BCP 47 tags of the languages the proctor works in (`de-DE` matches a request for `de`). */
  languages: string[];
  /** Fee per visit day. */
  dayRate: Money;
  /** Fee per travel day; same currency as {@link dayRate}. */
  travelDayRate: Money;
  /** Supervised cases per model id. A model that is missing counts as 0. */
  experience: Record<string, number>;
  /** Licences, privileges and certificates as recorded. */
  credentials: Credential[];
  /** Recurring availability, exceptions and blackouts. */
  availability: ProctorAvailability;
  /** Visits already accepted, as calendar days including travel days. */
  acceptedVisits: AcceptedVisit[];
  /** When the proctor was last offered a visit (ISO instant with offset), `null` if never. */
  lastOfferedAt: string | null;
}

/** Relative weights of the score parts; they need not add up to 1 (they are normalised). */
export interface ScoreWeights {
  /** Weight of nearness. */
  distance: number;
  /** Weight of supervised cases on the model. */
  experience: number;
  /** Weight of a low fee estimate. */
  fee: number;
  /** Weight of a long time since the last offer (spreads the work). */
  recency: number;
}

/**
 * Settings of the matching. The defaults are assumptions of this product, not trade rules:
 * every marketplace operator can change them.
 */
export interface MatchingSettings {
  /** Supervised cases on the model a proctor needs (product assumption, default 20). */
  minSupervisedCases: number;
  /**
   * Above this great-circle distance (km) a proctor travels the day before and the day after
   * the visit (product assumption, default 500).
   */
  travelDayThresholdKm: number;
  /**
   * Countries whose medical licences are granted per state or province, so that a country-level
   * licence does not cover a campus there (common practice: `US` state medical boards, `CA`
   * provincial colleges).
   */
  subnationalLicensingCountries: readonly string[];
  /** Weights of the score parts. */
  weights: ScoreWeights;
  /** Distance (km) at which the distance part is 0.5. */
  distanceHalfScoreKm: number;
  /** Supervised cases at which the experience part is 0.5. */
  experienceHalfScoreCases: number;
  /** Days since the last offer from which the recency part is 1. */
  recencyFullScoreDays: number;
}

/** The four parts of a score, each in [0, 1]. */
export interface ScoreParts {
  /** `H / (H + distanceKm)` with H = {@link MatchingSettings.distanceHalfScoreKm}. */
  distance: number;
  /** `cases / (cases + E)` with E = {@link MatchingSettings.experienceHalfScoreCases}. */
  experience: number;
  /** Cheapest eligible fee in the same currency ÷ this fee (1 for the cheapest). */
  fee: number;
  /** Days since the last offer ÷ {@link MatchingSettings.recencyFullScoreDays}, at most 1. */
  recency: number;
}

/** The outcome for one proctor. */
export interface ProctorMatch {
  /** The proctor's id. */
  proctorId: string;
  /** The proctor's display name. */
  name: string;
  /** Whether every hard constraint holds (then `exclusions` is empty). */
  eligible: boolean;
  /** Score in [0, 100] with one decimal; `null` when not eligible. */
  score: number | null;
  /** The parts the score was made of; `null` when not eligible. */
  scoreParts: ScoreParts | null;
  /** Sentences saying what speaks for the proctor. */
  reasons: string[];
  /** Sentences naming each hard constraint that fails. */
  exclusions: string[];
  /** Great-circle distance home → campus in km, one decimal (IUGG mean radius). */
  distanceKm: number;
  /** Travel days around the visit: 0 or 2 (one before, one after). */
  travelDays: number;
  /** Visit days plus travel days, as calendar days in the campus zone. */
  footprint: DateRange;
  /** Day rate × visit days + travel-day rate × travel days. */
  feeEstimate: Money;
}
