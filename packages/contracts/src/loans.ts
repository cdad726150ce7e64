import { z } from 'zod';
import {
  loanNoteMaxLength,
  loanSortFields,
  loanStates,
  maxUnitsPerLoan,
  reasonRule,
  unavailableReasons,
} from './values/loans';
import { id, isoDate, listOf } from './common';
import { modelCategory, money } from './catalog';
import { pageOf, pageQuery } from './paging';

export * from './values/loans';

export const loanState = z.enum(loanStates);

export const milestones = z
  .object({
    shipBy: isoDate,
    deliverBy: isoDate,
    useFrom: isoDate,
    useTo: isoDate,
    returnShipBy: isoDate,
    backAtDepot: isoDate,
    readyAgain: isoDate,
  })
  .meta({ id: 'Milestones' });
export type Milestones = z.infer<typeof milestones>;

/** A use window `useFrom..useTo` (hospital calendar), both days included. */
const useWindow = {
  useFrom: isoDate,
  useTo: isoDate,
};
const windowOrder = {
  check: (q: { useFrom: string; useTo: string }) => q.useTo >= q.useFrom,
  message: { message: 'The last case day is before the first.', path: ['useTo'] },
};

export const availabilityQuery = z
  .object({
    modelId: z.coerce.number().int().positive().optional(),
    category: modelCategory.optional(),
    q: z.string().trim().max(100).optional(),
    compatibleWith: z.coerce.number().int().positive().optional(),
    /** One of the caller's own campuses. */
    siteId: z.coerce.number().int().positive(),
    ...useWindow,
  })
  .refine(windowOrder.check, windowOrder.message);
export type AvailabilityQuery = z.infer<typeof availabilityQuery>;

export const unavailableReason = z.enum(unavailableReasons);

export const availabilityItem = z
  .object({
    unitId: z.number().int(),
    modelId: z.number().int(),
    modelName: z.string(),
    category: modelCategory,
    lenderId: z.number().int(),
    lenderName: z.string(),
    serialNumber: z.string(),
    depotId: z.number().int(),
    depotName: z.string(),
    depotTimeZone: z.string(),
    feasible: z.boolean(),
    /** Milestones of the requested window (shown even when it does not fit). */
    milestones: milestones,
    distanceKm: z.number(),
    /** Transit business days of each leg (distance band plus customs). */
    transitDays: z.number().int(),
    /** Lead days applied (longer for the hospital's first loan of the model). */
    leadDays: z.number().int(),
    /** Whether this would be the hospital's first loan of this model. */
    firstLoanOfModel: z.boolean(),
    /** Deposit for this unit from its model's rule (an estimate). */
    deposit: money,
    /** When not feasible: the earliest first case day within the horizon, if any. */
    earliestUseFrom: isoDate.nullable().optional(),
    /** Last case day of that earliest window (same length as asked). */
    earliestUseTo: isoDate.nullable().optional(),
    reasonCode: unavailableReason.nullable().optional(),
    reason: z.string().nullable().optional(),
  })
  .meta({ id: 'AvailabilityItem' });
export type AvailabilityItem = z.infer<typeof availabilityItem>;

/** `GET /api/availability`. */
export const availabilityResponse = z
  .object({
    items: z.array(availabilityItem),
    /** Days searched ahead for the earliest window. */
    horizonDays: z.number().int(),
    /** Whether more units matched than the answer holds (narrow the search). */
    truncated: z.boolean(),
    caution: z.string(),
  })
  .meta({ id: 'AvailabilityResponse' });
export type AvailabilityResponse = z.infer<typeof availabilityResponse>;

/** How an alternative relates to the unit it replaces. */
export const alternativeRelation = z.enum(['same_model', 'compatible_model']);

/** A unit that could stand in for another for the same window (always feasible). */
export const alternativeItem = availabilityItem
  .extend({
    /** The unit this one could replace. */
    forUnitId: z.number().int(),
    relation: alternativeRelation,
  })
  .meta({ id: 'AlternativeItem' });
export type AlternativeItem = z.infer<typeof alternativeItem>;

export const alternativesQuery = z
  .object({
    unitId: z.coerce.number().int().positive(),
    siteId: z.coerce.number().int().positive(),
    ...useWindow,
  })
  .refine(windowOrder.check, windowOrder.message);
export type AlternativesQuery = z.infer<typeof alternativesQuery>;
export const alternativesResponse = listOf(alternativeItem).meta({ id: 'AlternativeList' });

export const createLoanRequest = z
  .object({
    siteId: z.number().int().positive(),
    unitIds: z
      .array(z.number().int().positive())
      .min(1, 'Choose at least one unit.')
      .max(maxUnitsPerLoan, `A loan can hold at most ${maxUnitsPerLoan} units.`),
    ...useWindow,
    note: z.string().trim().max(loanNoteMaxLength).optional(),
  })
  .refine(windowOrder.check, windowOrder.message)
  .refine((r) => new Set(r.unitIds).size === r.unitIds.length, {
    message: 'A unit is listed twice.',
    path: ['unitIds'],
  })
  .meta({ id: 'CreateLoanRequest' });
export type CreateLoanRequest = z.infer<typeof createLoanRequest>;

/** One unit that blocks a loan request, and why. */
export const loanConflict = z.object({
  unitId: z.number().int(),
  reasonCode: unavailableReason,
  reason: z.string(),
  /** Earliest first case day at which this unit alone would fit, if any within the horizon. */
  earliestUseFrom: isoDate.nullable(),
});
export type LoanConflict = z.infer<typeof loanConflict>;

/** `details` of the 409 `unit_unavailable` answer to `POST /api/loans`. */
export const unitUnavailableDetails = z
  .object({
    conflicts: z.array(loanConflict),
    /** Feasible stand-ins for the blocked units (other units of the model, compatible models). */
    alternatives: z.array(alternativeItem),
  })
  .meta({ id: 'UnitUnavailableDetails' });
export type UnitUnavailableDetails = z.infer<typeof unitUnavailableDetails>;

export const reasonRequest = z
  .object({
    reason: z
      .string()
      .trim()
      .min(reasonRule.minLength, reasonRule.tooShort)
      .max(reasonRule.maxLength),
  })
  .meta({ id: 'ReasonRequest' });

export const loanEvent = z
  .object({
    id: z.number().int(),
    at: z.string(),
    actorName: z.string().nullable(),
    fromState: loanState.nullable(),
    toState: loanState,
    reason: z.string().nullable(),
  })
  .meta({ id: 'LoanEvent' });
export type LoanEvent = z.infer<typeof loanEvent>;

export const loanUnit = z.object({
  unitId: z.number().int(),
  modelId: z.number().int(),
  modelName: z.string(),
  serialNumber: z.string(),
  depotId: z.number().int(),
  depotName: z.string(),
  milestones: milestones,
  /** This unit's deposit (an estimate until the lender confirms). */
  deposit: money.optional(),
});

/** What the signed-in person may do with a loan now. */
export const loanActions = ['approve', 'decline', 'cancel'] as const;
export const loanAction = z.enum(loanActions);
export type LoanAction = z.infer<typeof loanAction>;

export const loan = z
  .object({
    id: z.number().int(),
    reference: z.string(),
    state: loanState,
    hospitalId: z.number().int(),
    hospitalName: z.string(),
    siteId: z.number().int(),
    siteName: z.string(),
    siteTimeZone: z.string(),
    lenderId: z.number().int(),
    lenderName: z.string(),
    useFrom: isoDate,
    useTo: isoDate,
    /** The loan's overall footprint across its units: earliest shipBy to latest readyAgain. */
    milestones: milestones,
    units: z.array(loanUnit),
    deposit: money,
    note: z.string().nullable(),
    requestedBy: z.string(),
    createdAt: z.string(),
    events: z.array(loanEvent).optional(),
    /** Actions the signed-in person may take now (absent in e-mail payloads). */
    allowedActions: z.array(loanAction).optional(),
  })
  .meta({ id: 'Loan' });
export type Loan = z.infer<typeof loan>;
export const loanList = listOf(loan).meta({ id: 'LoanList' });
export const loanResponse = z.object({ loan }).meta({ id: 'LoanResponse' });

/**
 * `GET /api/loans` query: the paging contract (`q`: reference, hospital, campus, model or serial
 * number contains it) and `state`, one state or several separated by commas.
 */
export const loanQuery = pageQuery(loanSortFields, 'requested,desc').extend({
  state: z
    .string()
    .refine(
      (s) => s.split(',').every((part) => (loanStates as readonly string[]).includes(part)),
      'Give loan states separated by commas.',
    )
    .optional(),
  /** Older name of `size` (one page of this many from the first), still accepted. */
  limit: z.coerce.number().int().min(1).max(500).optional(),
});
export type LoanQuery = z.infer<typeof loanQuery>;
/** Answer of `GET /api/loans`: one page, and how many loans match `q` in each state. */
export const loanPage = pageOf(loan)
  .extend({
    /** Loans matching `q` (not `state`) per state, for the state filter's counts. */
    stateCounts: z.array(z.object({ state: loanState, count: z.number().int().min(0) })),
  })
  .meta({ id: 'LoanPage' });
export type LoanPage = z.infer<typeof loanPage>;
export const loanParams = z.object({ id });

/** `GET /api/config/maps`: how the web app loads the maps script. */
export const mapsConfig = z
  .object({
    /** The browser key, or null when the offline stand-in is served. */
    apiKey: z.string().nullable(),
    /** Where the maps script loads from (our own `/maps/api/js` for the stand-in). */
    scriptUrl: z.string(),
    /** Whether the offline stand-in is served instead of the hosted maps. */
    offline: z.boolean(),
  })
  .meta({ id: 'MapsConfig' });
export type MapsConfig = z.infer<typeof mapsConfig>;
