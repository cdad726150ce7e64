import { z } from 'zod';
import { isoDate } from './common';

/** Categories of equipment a lender lists. */
export const modelCategories = [
  'robotic_platform',
  'flexible_endoscope',
  'laser',
  'imaging',
  'fluid_management',
  'accessory',
] as const;
export const modelCategory = z.enum(modelCategories);
export type ModelCategory = z.infer<typeof modelCategory>;

/** Human labels for categories, shared by screens and e-mails. */
export const modelCategoryLabels: Record<ModelCategory, string> = {
  robotic_platform: 'Robotic platform',
  flexible_endoscope: 'Flexible endoscope',
  laser: 'Laser system',
  imaging: 'Imaging tower',
  fluid_management: 'Fluid management',
  accessory: 'Accessory',
};

const currency = z
  .string()
  .regex(/^[A-Z]{3}$/, 'Use a three-letter ISO 4217 currency code, e.g. USD.');
const minor = z.number().int('Amounts are whole minor units (e.g. cents).').nonnegative();

/** Money: integer minor units plus an ISO 4217 code. */
export const money = z.object({ amount: z.number().int(), currency });
export type Money = z.infer<typeof money>;

/** A model's deposit rule: basis points of list value, clamped to [min, max]. */
export const depositRule = z
  .object({
    percentBps: z.number().int().min(0).max(10_000),
    min: minor,
    max: minor,
    currency,
  })
  .refine((r) => r.max >= r.min, { message: 'The maximum must not be below the minimum.', path: ['max'] });
export type DepositRule = z.infer<typeof depositRule>;

export const packingItem = z.object({
  id: z.number().int().optional(),
  name: z.string().trim().min(1).max(160),
  gtin: z
    .string()
    .regex(/^\d{14}$/, 'A GTIN here has 14 digits (pad shorter GTINs with leading zeros).')
    .nullable(),
  quantity: z.number().int().min(1).max(999),
  /** Whether each piece carries its own serial number that must be scanned. */
  serialised: z.boolean().default(false),
});
export type PackingItem = z.infer<typeof packingItem>;

export const modelInput = z.object({
  name: z.string().trim().min(2, 'Give the model a name.').max(160),
  category: modelCategory,
  description: z.string().trim().max(4000).default(''),
  listValue: minor,
  currency,
  depositRule: depositRule,
  packingList: z.array(packingItem).max(200).default([]),
  compatibleModelIds: z.array(z.number().int().positive()).max(100).default([]),
});
export type ModelInput = z.infer<typeof modelInput>;

export const model = z.object({
  id: z.number().int(),
  lenderId: z.number().int(),
  lenderName: z.string(),
  name: z.string(),
  category: modelCategory,
  description: z.string(),
  listValue: z.number().int(),
  currency: z.string(),
  depositRule: depositRule,
  packingList: z.array(packingItem),
  compatibleModelIds: z.array(z.number().int()),
  photoIds: z.array(z.number().int()),
  unitCount: z.number().int(),
});
export type Model = z.infer<typeof model>;

export const modelQuery = z.object({
  category: modelCategory.optional(),
  q: z.string().trim().max(100).optional(),
  compatibleWith: z.coerce.number().int().positive().optional(),
});

export const unitStatuses = ['active', 'maintenance', 'retired'] as const;
export const unitStatus = z.enum(unitStatuses);

export const unitInput = z.object({
  modelId: z.number().int().positive(),
  serialNumber: z.string().trim().min(1, 'Enter the serial number.').max(60),
  udiDi: z
    .string()
    .regex(/^\d{14}$/, 'The UDI device identifier (GTIN) has 14 digits.')
    .nullable()
    .default(null),
  homeDepotId: z.number().int().positive(),
  status: unitStatus.default('active'),
});
export type UnitInput = z.infer<typeof unitInput>;

export const unit = z.object({
  id: z.number().int(),
  modelId: z.number().int(),
  modelName: z.string(),
  category: modelCategory,
  serialNumber: z.string(),
  udiDi: z.string().nullable(),
  homeDepotId: z.number().int(),
  homeDepotName: z.string(),
  status: unitStatus,
});
export type Unit = z.infer<typeof unit>;

export const holdKinds = ['loan', 'maintenance'] as const;
export const hold = z.object({
  id: z.number().int(),
  unitId: z.number().int(),
  kind: z.enum(holdKinds),
  start: isoDate,
  end: isoDate,
  loanId: z.number().int().nullable(),
  /** Shown to the lender only; hospitals see "Reserved". */
  reason: z.string().nullable(),
});
export type Hold = z.infer<typeof hold>;

export const maintenanceHoldInput = z
  .object({ start: isoDate, end: isoDate, reason: z.string().trim().min(2).max(300) })
  .refine((h) => h.end >= h.start, { message: 'The end is before the start.', path: ['end'] });

export const holdsQuery = z.object({ from: isoDate.optional(), to: isoDate.optional() });

/** A lender's shipping settings (defaults are assumptions; each lender edits its own). */
export const distanceBand = z.object({
  upToKm: z.number().positive().nullable(),
  businessDays: z.number().int().min(0).max(30),
});
export const shippingSettings = z.object({
  distanceBands: z.array(distanceBand).min(1),
  customsDays: z.number().int().min(0).max(30),
  leadDays: z.number().int().min(0).max(30),
  firstLoanLeadDays: z.number().int().min(0).max(30),
  decontaminationDays: z.number().int().min(0).max(30),
  turnaroundDays: z.number().int().min(0).max(30),
});
export type ShippingSettings = z.infer<typeof shippingSettings>;
