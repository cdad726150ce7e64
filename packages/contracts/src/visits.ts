import { z } from 'zod';
import { id, isoDate, listOf } from './common';

/** An ISO 3166-1 alpha-2 country (`US`) or ISO 3166-2 subdivision (`US-IL`, `DE-BY`). */
export const jurisdiction = z
  .string()
  .trim()
  .toUpperCase()
  .regex(/^[A-Z]{2}(-[A-Z0-9]{1,3})?$/, 'Use a country (US) or a subdivision (US-IL, DE-BY).');

/** A BCP 47 language tag, kept simple: language, optional script and region (`de`, `pt-BR`). */
export const languageTag = z
  .string()
  .trim()
  .regex(
    /^[a-zA-Z]{2,3}(-[A-Za-z]{4})?(-([A-Za-z]{2}|\d{3}))?$/,
    'Use a language tag such as en or de-DE.',
  );

const currency = z
  .string()
  .trim()
  .toUpperCase()
  .regex(/^[A-Z]{3}$/, 'Use an ISO 4217 code such as USD or EUR.');

/** Money as integer minor units plus an ISO 4217 code. */
export const moneyAmount = z
  .object({ amount: z.number().int().nonnegative(), currency })
  .meta({ id: 'MoneyAmount' });

/** Supervised cases on one model. */
export const modelExperience = z.object({
  modelId: id,
  modelName: z.string().optional(),
  /** Cases the proctor declared when joining. */
  declaredCases: z.number().int().min(0).max(100_000),
  /** Cases recorded on Evalon visits (read only). */
  recordedCases: z.number().int().min(0).optional(),
});

/** Availability: RFC 5545 recurrences (a DTSTART and an RRULE line each) in the proctor's zone. */
export const availabilitySettings = z
  .object({
    rules: z.array(z.string().trim().min(1).max(500)).max(20),
    exceptions: z
      .array(
        z.discriminatedUnion('kind', [
          /** A day taken out of the pattern. */
          z.object({ kind: z.literal('date'), date: isoDate }),
          /** A one-off extra day of availability (like an RFC 5545 RDATE). */
          z.object({ kind: z.literal('extra'), date: isoDate }),
          z.object({ kind: z.literal('rule'), rule: z.string().trim().min(1).max(500) }),
        ]),
      )
      .max(200),
    blackouts: z
      .array(
        z
          .object({ from: isoDate, to: isoDate })
          .refine((r) => r.to >= r.from, { message: 'The end is before the start.', path: ['to'] }),
      )
      .max(200),
  })
  .superRefine((a, ctx) => {
    // Contradictions a person should resolve rather than have one silently win.
    const seen = new Map<string, 'date' | 'extra'>();
    a.exceptions.forEach((e, i) => {
      if (e.kind === 'rule') return;
      const before = seen.get(e.date);
      if (before === e.kind) {
        ctx.addIssue({
          code: 'custom',
          path: ['exceptions', i, 'date'],
          message: `${e.date} is already in the list.`,
        });
      } else if (before) {
        ctx.addIssue({
          code: 'custom',
          path: ['exceptions', i, 'date'],
          message: `${e.date} is both taken out and added; keep one of the two.`,
        });
      }
      seen.set(e.date, e.kind);
      if (e.kind === 'extra') {
        const b = a.blackouts.findIndex((x) => x.from <= e.date && e.date <= x.to);
        if (b >= 0) {
          ctx.addIssue({
            code: 'custom',
            path: ['exceptions', i, 'date'],
            message: `${e.date} falls in blackout ${b + 1} (${a.blackouts[b]!.from} to ${a.blackouts[b]!.to}); remove one of them.`,
          });
        }
      }
    });
  })
  .meta({ id: 'AvailabilitySettings' });
export type AvailabilitySettings = z.infer<typeof availabilitySettings>;

/** `PUT /api/proctors/me`. */
export const proctorProfileInput = z
  .object({
    displayName: z.string().trim().min(2).max(120),
    homeLatitude: z.number().min(-90).max(90),
    homeLongitude: z.number().min(-180).max(180),
    homeTimeZone: z.string().refine((zone) => {
      try {
        new Intl.DateTimeFormat('en-US', { timeZone: zone });
        return true;
      } catch {
        return false;
      }
    }, 'Use an IANA time zone such as Europe/Berlin.'),
    homeCountry: z
      .string()
      .trim()
      .toUpperCase()
      .regex(/^[A-Z]{2}$/, 'Use an ISO 3166-1 country code.'),
    travelRadiusKm: z.number().int().min(1).max(20_000),
    languages: z.array(languageTag).min(1).max(10),
    dayRate: z.number().int().nonnegative(),
    travelDayRate: z.number().int().nonnegative(),
    currency,
    specialties: z.array(z.string().trim().min(2).max(80)).max(20),
    experience: z.array(modelExperience.pick({ modelId: true, declaredCases: true })).max(100),
    bio: z.string().trim().max(2000).nullable().optional(),
  })
  .meta({ id: 'ProctorProfileInput' });
export type ProctorProfileInput = z.infer<typeof proctorProfileInput>;

export const credentialKinds = ['licence', 'privileges', 'certificate'] as const;
export const credentialKind = z.enum(credentialKinds);
export type CredentialKind = z.infer<typeof credentialKind>;

export const credential = z
  .object({
    id: z.number().int(),
    kind: credentialKind,
    title: z.string(),
    jurisdiction: z.string(),
    validFrom: isoDate,
    validTo: isoDate,
    /** `valid`, `expiring` (within 60 days) or `expired`, as of today in the proctor's zone. */
    status: z.enum(['valid', 'expiring', 'expired', 'future']),
    fileName: z.string().nullable(),
    hasFile: z.boolean(),
  })
  .meta({ id: 'Credential' });
export type Credential = z.infer<typeof credential>;

/** Multipart fields of `POST /api/proctors/me/credentials` (the file goes in `file`). */
export const credentialInput = z
  .object({
    kind: credentialKind,
    title: z.string().trim().min(2).max(200),
    jurisdiction,
    validFrom: isoDate,
    validTo: isoDate,
  })
  .refine((c) => c.validTo >= c.validFrom, {
    message: 'The end is before the start.',
    path: ['validTo'],
  })
  .meta({ id: 'CredentialInput' });

export const proctorProfile = proctorProfileInput
  .omit({ experience: true })
  .extend({
    userId: z.number().int(),
    organisationId: z.number().int(),
    bio: z.string().nullable(),
    experience: z.array(modelExperience),
    credentials: z.array(credential),
    availability: availabilitySettings,
  })
  .meta({ id: 'ProctorProfile' });
export type ProctorProfile = z.infer<typeof proctorProfile>;
export const proctorProfileResponse = z.object({ profile: proctorProfile.nullable() });

/** `GET /api/proctors/me/availability/preview`: the next weeks, day by day. */
export const availabilityPreview = z
  .object({
    timeZone: z.string(),
    days: z.array(
      z.object({
        date: isoDate,
        available: z.boolean(),
        /** Why not: `blackout`, `exception`, `no_rule`, or `visit` (an accepted visit). */
        why: z.string().nullable(),
      }),
    ),
  })
  .meta({ id: 'AvailabilityPreview' });

export const visitStates = [
  'requested',
  'offered',
  'accepted',
  'completed',
  'signed_off',
  'cancelled',
  'unfilled',
] as const;
export const visitState = z.enum(visitStates);
export type VisitState = z.infer<typeof visitState>;
export const visitKinds = ['proctoring', 'in_service', 'demonstration'] as const;
export const offerStates = [
  'queued',
  'offered',
  'accepted',
  'declined',
  'expired',
  'withdrawn',
  'skipped',
] as const;

/** `GET /api/visits/candidates` query. */
export const candidatesQuery = z
  .object({
    siteId: id,
    modelId: id,
    from: isoDate,
    to: isoDate,
    language: languageTag.optional(),
  })
  .refine((q) => q.to >= q.from, { message: 'The end is before the start.', path: ['to'] });

export const candidate = z
  .object({
    proctorId: z.number().int(),
    name: z.string(),
    eligible: z.boolean(),
    score: z.number().nullable(),
    reasons: z.array(z.string()),
    exclusions: z.array(z.string()),
    distanceKm: z.number(),
    travelDays: z.number().int(),
    feeEstimate: moneyAmount,
  })
  .meta({ id: 'Candidate' });
export type Candidate = z.infer<typeof candidate>;
export const candidateList = listOf(candidate).meta({ id: 'CandidateList' });

/** `POST /api/visits`. */
export const createVisitRequest = z
  .object({
    siteId: id,
    modelId: id,
    loanId: id.optional(),
    kind: z.enum(visitKinds).default('proctoring'),
    from: isoDate,
    to: isoDate,
    cases: z.number().int().min(1).max(50),
    language: languageTag.optional(),
    note: z.string().trim().max(2000).optional(),
    /** Candidates in the order to offer; omitted: Evalon offers the eligible ones by rank. */
    proctorIds: z.array(id).min(1).max(20).optional(),
  })
  .refine((v) => v.to >= v.from, { message: 'The end is before the start.', path: ['to'] })
  .meta({ id: 'CreateVisitRequest' });
export type CreateVisitRequest = z.infer<typeof createVisitRequest>;

export const visitOffer = z.object({
  id: z.number().int(),
  proctorId: z.number().int(),
  proctorName: z.string(),
  position: z.number().int(),
  state: z.enum(offerStates),
  score: z.number().nullable(),
  offeredAt: z.string().nullable(),
  deadlineAt: z.string().nullable(),
  answeredAt: z.string().nullable(),
  reason: z.string().nullable(),
});
export type VisitOffer = z.infer<typeof visitOffer>;

export const visitEvent = z.object({
  id: z.number().int(),
  at: z.string(),
  kind: z.string(),
  fromState: z.string().nullable(),
  toState: z.string(),
  actorName: z.string().nullable(),
  proctorName: z.string().nullable(),
  reason: z.string().nullable(),
});

/** The competencies a case is rated on, 1–5 each (our own short list). */
export const competencies = [
  'setup',
  'docking',
  'instrument_handling',
  'troubleshooting',
  'team_communication',
] as const;
export const competencyLabels: Record<(typeof competencies)[number], string> = {
  setup: 'Platform set-up and positioning',
  docking: 'Docking and port placement',
  instrument_handling: 'Instrument handling',
  troubleshooting: 'Troubleshooting and recovery',
  team_communication: 'Team communication',
};
export const traineeRoles = ['observed', 'assisted', 'performed_supervised'] as const;

/**
 * Obvious patient identifiers in free text (HIPAA Safe Harbor, 45 CFR 164.514(b)(2), lists names,
 * record numbers and dates tied to a person among its 18 kinds). A screen, not a guarantee: it
 * catches a name after "patient"/"pt"/"Mr"/"Mrs", MRN-like numbers and dates of birth.
 * Returns the problems found, as sentences.
 */
export function findPatientIdentifiers(text: string): string[] {
  const found: string[] = [];
  // The title word in any case, followed by a capitalised word: "Patient Smith", "pt. Jones".
  const titled = [...text.matchAll(/\b(?:patient|pt|mr|mrs|ms|miss)\.?\s+(\p{L}+)/giu)];
  if (titled.some((m) => /^\p{Lu}\p{Ll}+$/u.test(m[1] ?? ''))) {
    found.push('Leave out patient names.');
  }
  if (/\b(mrn|medical record|record (no|number)|chart)\b/i.test(text) || /\b\d{6,}\b/.test(text)) {
    found.push('Leave out record numbers and other long numbers.');
  }
  if (
    /\b(dob|d\.o\.b|date of birth|born)\b/i.test(text) ||
    /\b\d{1,4}[/.-]\d{1,2}[/.-]\d{2,4}\b/.test(text)
  ) {
    found.push('Leave out dates of birth and other dates tied to the patient.');
  }
  return found;
}

/** `POST /api/visits/:id/cases`. */
export const caseRecordInput = z
  .object({
    caseNumber: z.number().int().min(1).max(100),
    traineeUserId: id,
    traineeRole: z.enum(traineeRoles),
    ratings: z.object(
      Object.fromEntries(competencies.map((c) => [c, z.number().int().min(1).max(5)])) as Record<
        (typeof competencies)[number],
        z.ZodNumber
      >,
    ),
    notes: z
      .string()
      .trim()
      .max(2000)
      .optional()
      .superRefine((notes, ctx) => {
        for (const message of findPatientIdentifiers(notes ?? '')) {
          ctx.addIssue({ code: 'custom', message });
        }
      }),
  })
  .meta({ id: 'CaseRecordInput' });
export type CaseRecordInput = z.infer<typeof caseRecordInput>;

export const caseRecord = z.object({
  id: z.number().int(),
  caseNumber: z.number().int(),
  traineeUserId: z.number().int(),
  traineeName: z.string(),
  traineeRole: z.enum(traineeRoles),
  ratings: z.record(z.string(), z.number()),
  notes: z.string().nullable(),
  createdAt: z.string(),
});

export const signOffInput = z.object({ traineeUserId: id }).meta({ id: 'SignOffInput' });
export const signOff = z.object({
  id: z.number().int(),
  traineeUserId: z.number().int(),
  traineeName: z.string(),
  proctorName: z.string(),
  proctoredCases: z.number().int(),
  threshold: z.number().int(),
  statement: z.string(),
  signedAt: z.string(),
});

export const visit = z
  .object({
    id: z.number().int(),
    reference: z.string(),
    kind: z.enum(visitKinds),
    state: visitState,
    hospitalId: z.number().int(),
    hospitalName: z.string(),
    siteId: z.number().int(),
    siteName: z.string(),
    siteTimeZone: z.string(),
    jurisdiction: z.string(),
    modelId: z.number().int(),
    modelName: z.string(),
    loanId: z.number().int().nullable(),
    from: isoDate,
    to: isoDate,
    cases: z.number().int(),
    language: z.string().nullable(),
    note: z.string().nullable(),
    proctorId: z.number().int().nullable(),
    proctorName: z.string().nullable(),
    busyFrom: isoDate.nullable(),
    busyTo: isoDate.nullable(),
    travelDays: z.number().int().nullable(),
    feeEstimate: moneyAmount.nullable(),
    /** The offer waiting for an answer, if any. */
    currentOffer: visitOffer.nullable(),
    createdAt: z.string(),
  })
  .meta({ id: 'Visit' });
export type Visit = z.infer<typeof visit>;

export const visitDetail = visit
  .extend({
    offers: z.array(visitOffer),
    events: z.array(visitEvent),
    caseRecords: z.array(caseRecord),
    signOffs: z.array(signOff),
    /** Proctored cases needed before a sign-off (hospital setting, default 3). */
    signOffThreshold: z.number().int(),
    /** Clinicians of the hospital who can be trainees. */
    trainees: z.array(z.object({ userId: z.number().int(), name: z.string() })),
  })
  .meta({ id: 'VisitDetail' });
export type VisitDetail = z.infer<typeof visitDetail>;
export const visitResponse = z.object({ visit: visitDetail });
export const visitList = listOf(visit).meta({ id: 'VisitList' });
export const visitParams = z.object({ id });
export const visitQuery = z.object({
  state: visitState.optional(),
  /** `mine`: proctors see visits offered to or accepted by them (the default for proctors). */
  role: z.enum(['hospital', 'proctor']).optional(),
});
export const declineOfferRequest = z
  .object({ reason: z.string().trim().min(3, 'Say why in a few words.').max(1000) })
  .meta({ id: 'DeclineOfferRequest' });

/** Shortest reason a proctor gives when withdrawing from an accepted visit. */
export const withdrawReasonMinLength = 10;

/** `POST /api/visits/:id/withdraw`: the accepted proctor steps back before the first visit day. */
export const withdrawVisitRequest = z
  .object({
    reason: z
      .string()
      .trim()
      .min(
        withdrawReasonMinLength,
        `Tell the hospital why in at least ${withdrawReasonMinLength} characters.`,
      )
      .max(1000),
  })
  .meta({ id: 'WithdrawVisitRequest' });
export type WithdrawVisitRequest = z.infer<typeof withdrawVisitRequest>;

/** One visit in a clinician's training record: their own cases on it and their sign-off. */
export const trainingVisit = z.object({
  visitId: z.number().int(),
  reference: z.string(),
  state: visitState,
  hospitalName: z.string(),
  siteName: z.string(),
  siteTimeZone: z.string(),
  modelId: z.number().int(),
  modelName: z.string(),
  from: isoDate,
  to: isoDate,
  proctorName: z.string().nullable(),
  /** The trainee's own cases on the visit (never other trainees'). */
  cases: z.array(
    z.object({
      caseNumber: z.number().int(),
      traineeRole: z.enum(traineeRoles),
      ratings: z.record(z.string(), z.number()),
      recordedAt: z.string(),
    }),
  ),
  signOff: z
    .object({
      id: z.number().int(),
      signedAt: z.string(),
      proctoredCases: z.number().int(),
      threshold: z.number().int(),
      /** Download link of the one-page record (PDF). */
      pdfUrl: z.string(),
    })
    .nullable(),
});
export type TrainingVisit = z.infer<typeof trainingVisit>;

/** Progress towards sign-off per hospital and model: cases performed under supervision. */
export const trainingProgress = z.object({
  hospitalId: z.number().int(),
  hospitalName: z.string(),
  modelId: z.number().int(),
  modelName: z.string(),
  supervisedCases: z.number().int(),
  /** The hospital's sign-off threshold (setting, default 3). */
  threshold: z.number().int(),
  signedOff: z.boolean(),
});
export type TrainingProgress = z.infer<typeof trainingProgress>;

/** `GET /api/visits/training-record`: the signed-in clinician's own record. */
export const trainingRecord = z
  .object({
    trainee: z.object({ userId: z.number().int(), name: z.string() }),
    progress: z.array(trainingProgress),
    visits: z.array(trainingVisit),
  })
  .meta({ id: 'TrainingRecord' });
export type TrainingRecord = z.infer<typeof trainingRecord>;

/** Range a lender may set for the minimum supervised cases on a model (product choice). */
export const minSupervisedCasesRange = { min: 0, max: 500 } as const;
/**
 * Range of a hospital's sign-off threshold: the 42 policies in the published survey asked for
 * 1 to 10 proctored cases (docs/references.md).
 */
export const signOffThresholdRange = { min: 1, max: 10 } as const;

const wholeIn = (range: { min: number; max: number }, what: string) =>
  z
    .number({ error: `Enter ${what} as a whole number.` })
    .int(`Enter ${what} as a whole number.`)
    .min(range.min, `Enter ${what} from ${range.min} to ${range.max}.`)
    .max(range.max, `Enter ${what} from ${range.min} to ${range.max}.`);

/** `GET /api/visits/settings/lenders/:lenderId`. */
export const lenderVisitSettings = z
  .object({
    lenderId: z.number().int(),
    /** The lender's default (20 unless changed), used by models without their own. */
    lenderDefault: z.number().int(),
    models: z.array(
      z.object({
        modelId: z.number().int(),
        name: z.string(),
        /** The model's own minimum, or null when the lender's default applies. */
        minSupervisedCases: z.number().int().nullable(),
        /** What matching uses. */
        effective: z.number().int(),
      }),
    ),
  })
  .meta({ id: 'LenderVisitSettings' });
export type LenderVisitSettings = z.infer<typeof lenderVisitSettings>;

/** `PUT /api/visits/settings/models/:modelId`: null returns the model to the lender's default. */
export const modelMinimumRequest = z
  .object({
    minSupervisedCases: wholeIn(minSupervisedCasesRange, 'the minimum supervised cases').nullable(),
  })
  .meta({ id: 'ModelMinimumRequest' });

/** `GET/PUT /api/visits/settings/hospitals/:hospitalId`. */
export const hospitalVisitSettings = z
  .object({
    hospitalId: z.number().int(),
    name: z.string(),
    signOffThreshold: z.number().int(),
  })
  .meta({ id: 'HospitalVisitSettings' });
export type HospitalVisitSettings = z.infer<typeof hospitalVisitSettings>;
export const signOffThresholdRequest = z
  .object({ signOffThreshold: wholeIn(signOffThresholdRange, 'the sign-off threshold') })
  .meta({ id: 'SignOffThresholdRequest' });
