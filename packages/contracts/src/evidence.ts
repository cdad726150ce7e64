import { z } from 'zod';
import { allProcedures, caseOutcomes, complicationGrades, findIdentifiers } from '@evalon/evidence';
import { id } from './common';

/**
 * Evaluation evidence: de-identified case records, clinician feedback and the buyer's decision.
 * Free text passes the de-identification guard of `@evalon/evidence` (HIPAA Safe Harbor,
 * 45 CFR 164.514(b)(2)): a note with identifier-like text is refused with one message per
 * finding, saying what was found and where.
 */

/** The caution every case form shows (product brief, "Cautions the product shows"). */
export const caseRecordCaution =
  'Case records are de-identified: do not enter patient names, record numbers, dates of birth ' +
  'or any calendar date; use the evaluation day number instead. Loaned devices are used only by ' +
  'trained clinicians, following the manufacturer’s instructions for use; local rules and ' +
  'licensed practice prevail.';

/** A free-text field that refuses identifier-like text. */
const deidentifiedText = (max: number) =>
  z
    .string()
    .trim()
    .max(max)
    .superRefine((text, ctx) => {
      for (const finding of findIdentifiers(text)) {
        ctx.addIssue({ code: 'custom', message: finding.message });
      }
    });

/** Minutes are stored to a tenth (the server rounds); a case lasts at most a day. */
const minutes = (label: string, max: number) =>
  z
    .number({ error: `Enter the ${label} in minutes.` })
    .min(0, `The ${label} cannot be negative.`)
    .max(max, `The ${label} is at most ${max} minutes.`);

/** One diameter of the target, in millimetres: above 0, at most 100. */
const diameter = z
  .number({ error: 'Enter the diameter in millimetres.' })
  // Stored to a tenth of a millimetre: anything below 0.1 would be stored as 0.
  .min(0.1, 'A diameter is more than 0 mm: at least 0.1 mm.')
  .max(100, 'A diameter is at most 100 mm.');

export const caseTarget = z.object({
  lengthMm: diameter,
  widthMm: diameter,
  heightMm: diameter,
});
export type CaseTarget = z.infer<typeof caseTarget>;

export const procedureFamily = z.enum(allProcedures as [string, ...string[]], {
  error: 'Choose a procedure from the list.',
});
export const complicationGrade = z.enum(complicationGrades);
export const caseOutcome = z.enum(caseOutcomes);

const caseFields = z.object({
  /** Case number within this loan's evaluation (1, 2, …); unique per loan. */
  caseNumber: z.number().int().min(1).max(999),
  /** Day of the evaluation (day 1 is the first day of use), never a calendar date. */
  evaluationDay: z.number().int().min(1, 'Evaluation days start at 1.').max(365),
  procedure: procedureFamily,
  /** Units of the loan used in the case. */
  unitIds: z.array(id).min(1, 'Choose at least one unit of the loan.').max(20),
  /** Who performed the case; defaults to the clinician recording it (a proctor must say). */
  clinicianId: id.optional(),
  setupMinutes: minutes('set-up time', 600),
  operativeMinutes: minutes('operative time', 1440).min(
    0.1,
    'The operative time is more than 0: at least 0.1 minutes.',
  ),
  energyMinutes: minutes('energy-on time', 1440).nullish(),
  target: caseTarget.nullish(),
  outcome: caseOutcome.nullish(),
  complicationGrade: complicationGrade.nullish(),
  /** The proctoring visit that supervised the case, if any (makes it a proctored case). */
  visitId: id.nullish(),
  /** Device issues seen in the case, if any. */
  deviceIssues: deidentifiedText(1000).nullish(),
  note: deidentifiedText(2000).nullish(),
});

/** Energy-on time is part of the operative time. */
function energyWithinOperative(
  c: { energyMinutes?: number | null; operativeMinutes?: number },
  ctx: z.RefinementCtx,
) {
  if (
    c.energyMinutes != null &&
    c.operativeMinutes != null &&
    c.energyMinutes > c.operativeMinutes
  ) {
    ctx.addIssue({
      code: 'custom',
      path: ['energyMinutes'],
      message: 'The energy-on time is part of the operative time and cannot be longer.',
    });
  }
}

/** `POST /api/loans/:id/cases`. */
export const caseInput = caseFields.superRefine(energyWithinOperative).meta({ id: 'CaseInput' });
export type CaseInput = z.infer<typeof caseInput>;

/** `PATCH /api/loans/:id/cases/:caseId`: any subset of the fields. */
export const casePatch = caseFields
  .partial()
  .superRefine(energyWithinOperative)
  .meta({ id: 'CasePatch' });
export type CasePatch = z.infer<typeof casePatch>;

export const caseParams = z.object({ id, caseId: id });

/** One case record as the API answers it, with the derived values. */
export const evaluationCase = z
  .object({
    id: z.number().int(),
    loanId: z.number().int(),
    caseNumber: z.number().int(),
    evaluationDay: z.number().int(),
    procedure: z.string(),
    unitIds: z.array(z.number().int()),
    clinicianId: z.number().int(),
    clinicianName: z.string(),
    setupMinutes: z.number(),
    operativeMinutes: z.number(),
    energyMinutes: z.number().nullable(),
    target: caseTarget.nullable(),
    outcome: caseOutcome.nullable(),
    complicationGrade: complicationGrade.nullable(),
    visitId: z.number().int().nullable(),
    /** Whether a proctor supervised the case (it is linked to a visit). */
    proctored: z.boolean(),
    deviceIssues: z.string().nullable(),
    note: z.string().nullable(),
    recordedByUserId: z.number().int(),
    recordedByName: z.string(),
    /** π/6 · L · W · H of the target, mm³; null without a target. */
    targetVolumeMm3: z.number().nullable(),
    /** Target volume ÷ energy-on minutes; null without both. */
    ablationRateMm3PerMin: z.number().nullable(),
    createdAt: z.string(),
    updatedAt: z.string(),
  })
  .meta({ id: 'EvaluationCase' });
export type EvaluationCase = z.infer<typeof evaluationCase>;

/** What the case form offers for one loan. */
export const caseFormOptions = z.object({
  procedures: z.array(z.string()),
  units: z.array(z.object({ unitId: z.number().int(), label: z.string() })),
  clinicians: z.array(z.object({ userId: z.number().int(), name: z.string() })),
  visits: z.array(z.object({ visitId: z.number().int(), label: z.string() })),
});
export type CaseFormOptions = z.infer<typeof caseFormOptions>;

export const caseList = z
  .object({
    items: z.array(evaluationCase),
    options: caseFormOptions,
    /** Whether the person may add and change cases on this loan. */
    canRecord: z.boolean(),
    caution: z.string(),
  })
  .meta({ id: 'CaseList' });
export type CaseList = z.infer<typeof caseList>;

export const caseResponse = z.object({ case: evaluationCase }).meta({ id: 'CaseResponse' });

const numericSummary = z.object({
  n: z.number().int(),
  median: z.number(),
  iqr: z.tuple([z.number(), z.number()]),
  mean: z.number(),
  sd: z.number().nullable(),
  min: z.number(),
  max: z.number(),
});
export type NumericSummaryDto = z.infer<typeof numericSummary>;

/** Likert items of the clinician survey (our wording). */
export const feedbackItems = [
  'setup',
  'handling',
  'visualisation',
  'ergonomics',
  'reliability',
  'would_use_again',
] as const;
export type FeedbackItem = (typeof feedbackItems)[number];
export const feedbackItemLabels: Record<FeedbackItem, string> = {
  setup: 'Setting the platform up was straightforward',
  handling: 'Handling during the case felt precise',
  visualisation: 'The view of the field was clear',
  ergonomics: 'Working with it was comfortable for me and the team',
  reliability: 'It worked without interruptions',
  would_use_again: 'I would use it again for these cases',
};
/** Short names of the survey items, for chart axes and tables. */
export const feedbackItemShortLabels: Record<FeedbackItem, string> = {
  setup: 'Set-up',
  handling: 'Handling',
  visualisation: 'View',
  ergonomics: 'Ergonomics',
  reliability: 'Reliability',
  would_use_again: 'Use again',
};
/** 1 = strongly disagree … 5 = strongly agree. */
export const likertLabels = [
  'Strongly disagree',
  'Disagree',
  'Neither agree nor disagree',
  'Agree',
  'Strongly agree',
] as const;

const likert = z
  .number({ error: 'Choose 1 to 5.' })
  .int('Choose 1 to 5.')
  .min(1, 'Choose 1 to 5.')
  .max(5, 'Choose 1 to 5.');

/** `POST /api/loans/:id/feedback`: one survey per clinician and loan (a new one replaces it). */
export const feedbackInput = z
  .object({
    ratings: z.object(
      Object.fromEntries(feedbackItems.map((i) => [i, likert])) as Record<
        FeedbackItem,
        typeof likert
      >,
    ),
    comment: deidentifiedText(2000).nullish(),
  })
  .meta({ id: 'FeedbackInput' });
export type FeedbackInput = z.infer<typeof feedbackInput>;

export const feedback = z
  .object({
    clinicianId: z.number().int(),
    clinicianName: z.string(),
    ratings: z.record(z.string(), z.number().int()),
    comment: z.string().nullable(),
    updatedAt: z.string(),
  })
  .meta({ id: 'Feedback' });
export type Feedback = z.infer<typeof feedback>;

/** The buyer's decision after the evaluation. */
export const decisions = ['buy', 'not_now', 'no'] as const;
export type Decision = (typeof decisions)[number];
export const decisionLabels: Record<Decision, string> = {
  buy: 'Buy',
  not_now: 'Not now',
  no: 'No',
};
export const decisionReasons = [
  'clinical_results',
  'workflow_fit',
  'clinician_preference',
  'reliability',
  'training_effort',
  'total_cost',
  'budget_timing',
  'case_volume',
  'other',
] as const;
export type DecisionReason = (typeof decisionReasons)[number];
export const decisionReasonLabels: Record<DecisionReason, string> = {
  clinical_results: 'Clinical results in the evaluation',
  workflow_fit: 'Fit with our workflow',
  clinician_preference: 'Clinicians’ preference',
  reliability: 'Reliability',
  training_effort: 'Training effort',
  total_cost: 'Total cost',
  budget_timing: 'Budget timing',
  case_volume: 'Expected case volume',
  other: 'Other',
};

/** `POST /api/loans/:id/decision`: the buyer records (or revises) the hospital's decision. */
export const decisionInput = z
  .object({
    decision: z.enum(decisions, { error: 'Choose buy, not now or no.' }),
    reasons: z
      .array(z.enum(decisionReasons))
      .min(1, 'Give at least one reason.')
      .max(decisionReasons.length)
      .refine((r) => new Set(r).size === r.length, 'Give each reason once.'),
    note: deidentifiedText(2000).nullish(),
  })
  .meta({ id: 'DecisionInput' });
export type DecisionInput = z.infer<typeof decisionInput>;

export const evaluationDecision = z
  .object({
    decision: z.enum(decisions),
    reasons: z.array(z.enum(decisionReasons)),
    note: z.string().nullable(),
    decidedByUserId: z.number().int(),
    decidedByName: z.string(),
    decidedAt: z.string(),
  })
  .meta({ id: 'EvaluationDecision' });
export type EvaluationDecision = z.infer<typeof evaluationDecision>;

/** `GET /api/loans/:id/metrics`. */
export const loanMetricsResponse = z
  .object({
    cases: z.number().int(),
    quantileMethod: z.string(),
    setupMinutes: numericSummary.nullable(),
    operativeMinutes: numericSummary.nullable(),
    perClinician: z.array(
      z.object({
        clinicianId: z.number().int(),
        clinicianName: z.string(),
        n: z.number().int(),
        setupMinutes: numericSummary,
        operativeMinutes: numericSummary,
        curve: z
          .object({
            a: z.number(),
            b: z.number(),
            learningRatePercent: z.number(),
            rSquared: z.number(),
            lastCase: z.number().int(),
            plateauMinutes: z.number(),
            plateauCase: z.number().int(),
            points: z.number().int(),
          })
          .nullable(),
        proctored: z.object({
          proctoredCases: z.number().int(),
          threshold: z.number().int(),
          reached: z.boolean(),
          remaining: z.number().int(),
        }),
      }),
    ),
    volumes: numericSummary.nullable(),
    ablationRates: numericSummary.nullable(),
    complications: z.array(z.object({ grade: complicationGrade, count: z.number().int() })),
    feedback: z.object({
      responses: z.number().int(),
      items: z.array(z.object({ item: z.enum(feedbackItems), summary: numericSummary.nullable() })),
    }),
    decision: evaluationDecision.nullable(),
  })
  .meta({ id: 'LoanMetrics' });
export type LoanMetricsResponse = z.infer<typeof loanMetricsResponse>;

/** The caution on the evaluation report, on screen and in the PDF (product brief, cautions). */
export const reportCaution =
  'This report summarises evaluation data recorded during a loan. It is not clinical evidence ' +
  'for individual patients and not a study result: the cases are few, unrandomised and ' +
  'de-identified. Purchasing and privileging remain the hospital’s decisions, made under its own ' +
  'rules; loaned devices are used only by trained clinicians following the manufacturer’s ' +
  'instructions for use, and local rules and licensed practice prevail.';

/** `PUT /api/loans/:id/evidence-sharing`: the hospital's consent to share the report. */
export const sharingInput = z
  .object({ sharedWithLender: z.boolean({ error: 'Say whether to share: true or false.' }) })
  .strict()
  .meta({ id: 'EvidenceSharingInput' });
export type SharingInput = z.infer<typeof sharingInput>;

/** Whether the hospital shares the loan's evaluation report with the lender. */
export const evidenceSharing = z
  .object({
    sharedWithLender: z.boolean(),
    changedByName: z.string().nullable(),
    changedAt: z.string().nullable(),
  })
  .meta({ id: 'EvidenceSharing' });
export type EvidenceSharing = z.infer<typeof evidenceSharing>;

/** A chart of the report: options for the chart library and the same numbers in words and rows. */
export const reportChart = z.object({
  key: z.string(),
  title: z.string(),
  option: z.record(z.string(), z.unknown()),
  summary: z.string(),
  table: z.object({
    columns: z.array(z.string()),
    rows: z.array(z.array(z.union([z.string(), z.number()]))),
  }),
});
export type ReportChart = z.infer<typeof reportChart>;

const moneyAmount = z.object({ amount: z.number().int(), currency: z.string().length(3) });

/** `GET /api/loans/:id/report`: what the report page and the PDF show. */
export const evaluationReport = z
  .object({
    loan: z.object({
      id: z.number().int(),
      reference: z.string(),
      state: z.string(),
      hospitalName: z.string(),
      lenderName: z.string(),
      units: z.array(z.object({ modelName: z.string(), serialNumber: z.string() })),
    }),
    /** Whether the reader is the lender, reading by the hospital's consent. */
    readAsLender: z.boolean(),
    /** Whether the reader may change the consent and record the decision (the buyer). */
    canDecide: z.boolean(),
    sharing: evidenceSharing,
    metrics: loanMetricsResponse,
    charts: z.array(reportChart),
    costs: z.object({
      deposit: moneyAmount,
      securedAs: z.enum(['hold', 'charge', 'waived']).nullable(),
      settled: z.boolean(),
      charges: z.array(z.object({ reason: z.string(), amount: z.number().int() })),
      kept: z.number().int(),
      returned: z.number().int(),
      uncovered: z.number().int(),
      proctorFees: z.array(
        z.object({ reference: z.string(), state: z.string(), fee: moneyAmount.nullable() }),
      ),
    }),
    caution: z.string(),
  })
  .meta({ id: 'EvaluationReport' });
export type EvaluationReport = z.infer<typeof evaluationReport>;
