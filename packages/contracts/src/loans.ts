import { z } from 'zod';
import { isoDate } from './common';
import { money } from './catalog';

export const loanStates = [
  'requested',
  'approved',
  'confirmed',
  'shipped',
  'delivered',
  'returning',
  'returned',
  'closed',
  'declined',
  'cancelled',
  'expired',
] as const;
export const loanState = z.enum(loanStates);
export type LoanState = z.infer<typeof loanState>;

/** Plain-language labels for loan states (our own words). */
export const loanStateLabels: Record<LoanState, string> = {
  requested: 'Waiting for lender',
  approved: 'Approved — deposit due',
  confirmed: 'Confirmed',
  shipped: 'On its way',
  delivered: 'At the hospital',
  returning: 'On its way back',
  returned: 'Back at depot',
  closed: 'Closed',
  declined: 'Declined',
  cancelled: 'Cancelled',
  expired: 'Expired',
};

export const milestones = z.object({
  shipBy: isoDate,
  deliverBy: isoDate,
  useFrom: isoDate,
  useTo: isoDate,
  returnShipBy: isoDate,
  backAtDepot: isoDate,
  readyAgain: isoDate,
});
export type Milestones = z.infer<typeof milestones>;

export const availabilityQuery = z
  .object({
    modelId: z.coerce.number().int().positive().optional(),
    category: z.string().optional(),
    q: z.string().trim().max(100).optional(),
    compatibleWith: z.coerce.number().int().positive().optional(),
    siteId: z.coerce.number().int().positive(),
    useFrom: isoDate,
    useTo: isoDate,
  })
  .refine((q) => q.useTo >= q.useFrom, {
    message: 'The last case day is before the first.',
    path: ['useTo'],
  });
export type AvailabilityQuery = z.infer<typeof availabilityQuery>;

export const availabilityItem = z.object({
  unitId: z.number().int(),
  modelId: z.number().int(),
  modelName: z.string(),
  serialNumber: z.string(),
  depotId: z.number().int(),
  depotName: z.string(),
  feasible: z.boolean(),
  milestones: milestones,
  distanceKm: z.number(),
  transitDays: z.number().int(),
  deposit: money,
  /** When not feasible: the earliest first case day within the horizon, if any. */
  earliestUseFrom: isoDate.nullable().optional(),
  reason: z.string().nullable().optional(),
});
export type AvailabilityItem = z.infer<typeof availabilityItem>;

export const createLoanRequest = z
  .object({
    siteId: z.number().int().positive(),
    unitIds: z
      .array(z.number().int().positive())
      .min(1, 'Choose at least one unit.')
      .max(20, 'A loan can hold at most 20 units.'),
    useFrom: isoDate,
    useTo: isoDate,
    note: z.string().trim().max(2000).optional(),
  })
  .refine((r) => r.useTo >= r.useFrom, {
    message: 'The last case day is before the first.',
    path: ['useTo'],
  })
  .refine((r) => new Set(r.unitIds).size === r.unitIds.length, {
    message: 'A unit is listed twice.',
    path: ['unitIds'],
  });
export type CreateLoanRequest = z.infer<typeof createLoanRequest>;

export const reasonRequest = z.object({
  reason: z.string().trim().min(3, 'Say why in a few words.').max(1000),
});

export const loanEvent = z.object({
  id: z.number().int(),
  at: z.string(),
  actorName: z.string().nullable(),
  fromState: loanState.nullable(),
  toState: loanState,
  reason: z.string().nullable(),
});
export type LoanEvent = z.infer<typeof loanEvent>;

export const loanUnit = z.object({
  unitId: z.number().int(),
  modelId: z.number().int(),
  modelName: z.string(),
  serialNumber: z.string(),
  depotId: z.number().int(),
  depotName: z.string(),
  milestones: milestones,
});

export const loan = z.object({
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
});
export type Loan = z.infer<typeof loan>;
