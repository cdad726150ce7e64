import { z } from 'zod';
import {
  countryPattern,
  depotLimits,
  isValidGtin,
  maintenanceReasonLimits,
  modelCategories,
  modelLimits,
  modelSortFields,
  photoContentTypes,
  shippingLimits,
  unitLimits,
  unitSortFields,
  unitStatuses,
  wallTimePattern,
} from './values/catalog';
import { id, isoDate, listOf } from './common';
import { timeZone } from './identity';
import { pageOf, pageQuery } from './paging';

export * from './values/catalog';

export const modelCategory = z.enum(modelCategories);

// ---------------------------------------------------------------------------------------------
// GS1 identification keys
// ---------------------------------------------------------------------------------------------

/** A GTIN written as 14 digits with a valid check digit (shorter GTINs padded with zeros). */
export const gtin14 = z
  .string()
  .regex(/^\d{14}$/, 'A GTIN here has 14 digits (pad shorter GTINs with leading zeros).')
  .refine(isValidGtin, 'The last digit is not the GS1 check digit: check for a typing error.');

// ---------------------------------------------------------------------------------------------
// Money and deposits
// ---------------------------------------------------------------------------------------------

const currency = z
  .string()
  .regex(/^[A-Z]{3}$/, 'Use a three-letter ISO 4217 currency code, e.g. USD.');
const minor = z.number().int('Amounts are whole minor units (e.g. cents).').nonnegative();

/** Money: integer minor units plus an ISO 4217 code. */
export const money = z.object({ amount: z.number().int(), currency }).meta({ id: 'Money' });
export type Money = z.infer<typeof money>;

/** A model's deposit rule: basis points of list value, clamped to [min, max]. */
export const depositRule = z
  .object({
    percentBps: z.number().int().min(0).max(modelLimits.percentBpsMax),
    min: minor,
    max: minor,
    currency,
  })
  .refine((r) => r.max >= r.min, {
    message: 'The maximum must not be below the minimum.',
    path: ['max'],
  });
export type DepositRule = z.infer<typeof depositRule>;

// ---------------------------------------------------------------------------------------------
// Depots and shipping settings
// ---------------------------------------------------------------------------------------------

/** A wall-clock time `HH:mm`, 24-hour. */
export const wallTime = z.string().regex(wallTimePattern, 'Use a 24-hour time HH:mm, e.g. 15:00.');

/** `POST /api/lenders/:orgId/depots` and `PUT /api/lenders/:orgId/depots/:siteId`. */
export const depotInput = z
  .object({
    name: z
      .string()
      .trim()
      .min(depotLimits.nameMin, 'Give the depot a name.')
      .max(depotLimits.nameMax),
    addressLine: z
      .string()
      .trim()
      .min(depotLimits.addressMin, 'Enter the street address.')
      .max(depotLimits.addressMax),
    city: z.string().trim().min(1, 'Enter the city.').max(depotLimits.cityMax),
    postalCode: z.string().trim().max(depotLimits.postalCodeMax).nullable().default(null),
    region: z.string().trim().max(depotLimits.regionMax).nullable().default(null),
    /** ISO 3166-1 alpha-2; also picks the public-holiday calendar for shipping days. */
    country: z
      .string()
      .trim()
      .toUpperCase()
      .regex(countryPattern, 'Use a two-letter country code, e.g. US or DE.'),
    latitude: z.number().min(-90).max(90),
    longitude: z.number().min(-180).max(180),
    timeZone,
    receivingHours: z.string().trim().max(depotLimits.receivingHoursMax).nullable().default(null),
    /** Last hand-over to the carrier on a ship date, in the depot's time zone. */
    cutoffTime: wallTime,
  })
  .meta({ id: 'DepotInput' });
export type DepotInput = z.infer<typeof depotInput>;

/** A lender's depot with every field (the public `Site` omits postal code and region). */
export const depot = z
  .object({
    id: z.number().int(),
    organisationId: z.number().int(),
    kind: z.literal('depot'),
    name: z.string(),
    addressLine: z.string(),
    city: z.string(),
    postalCode: z.string().nullable(),
    region: z.string().nullable(),
    country: z.string(),
    latitude: z.number(),
    longitude: z.number(),
    timeZone: z.string(),
    receivingHours: z.string().nullable(),
    cutoffTime: z.string(),
  })
  .meta({ id: 'Depot' });
export type Depot = z.infer<typeof depot>;
export const depotList = listOf(depot).meta({ id: 'DepotList' });
export const depotResponse = z.object({ depot }).meta({ id: 'DepotResponse' });

export const lenderParams = z.object({ orgId: id });
export const depotParams = z.object({ orgId: id, siteId: id });

/**
 * One row of a lender's distance-band table: shipments up to `maxKm` km (inclusive) take `days`
 * transit business days; `maxKm: null` is the open last band. Same shape as
 * `DistanceBand` of `@evalon/scheduling`.
 */
export const distanceBand = z.object({
  maxKm: z.number().positive('A band ends after 0 km.').nullable(),
  days: z.number().int().min(0).max(shippingLimits.daysMax),
});
export type DistanceBandInput = z.infer<typeof distanceBand>;

/** A lender's shipping settings (defaults are assumptions; each lender edits its own). */
export const shippingSettings = z
  .object({
    distanceBands: z
      .array(distanceBand)
      .min(shippingLimits.bandsMin, 'Keep at least one distance band.')
      .max(shippingLimits.bandsMax),
    /** Customs days added to each leg that crosses a border. */
    customsDays: z.number().int().min(0).max(shippingLimits.daysMax),
    /** Hospital business days between delivery and the first case (delivery day counted). */
    leadDays: z
      .number()
      .int()
      .min(shippingLimits.leadDaysMin, 'A unit cannot arrive on the day of the case.')
      .max(shippingLimits.daysMax),
    /** Lead days for a hospital's first loan of a model. */
    firstLoanLeadDays: z
      .number()
      .int()
      .min(shippingLimits.leadDaysMin, 'A unit cannot arrive on the day of the case.')
      .max(shippingLimits.daysMax),
    /** Hospital business days after the last case before the return ships. */
    decontaminationDays: z.number().int().min(0).max(shippingLimits.daysMax),
    /** Depot business days after arrival for inspection and reprocessing. */
    turnaroundDays: z.number().int().min(0).max(shippingLimits.daysMax),
  })
  .superRefine((s, ctx) => {
    let previous = 0;
    s.distanceBands.forEach((band, i) => {
      const last = i === s.distanceBands.length - 1;
      if (band.maxKm === null && !last) {
        ctx.addIssue({
          code: 'custom',
          message: 'Only the last band may be open-ended.',
          path: ['distanceBands', i, 'maxKm'],
        });
      }
      if (band.maxKm === null) return;
      if (band.maxKm <= previous) {
        ctx.addIssue({
          code: 'custom',
          message: 'Each band must end further away than the one before.',
          path: ['distanceBands', i, 'maxKm'],
        });
      }
      previous = band.maxKm;
      if (last) {
        ctx.addIssue({
          code: 'custom',
          message: 'End the table with an open band (no upper distance) so every trip is covered.',
          path: ['distanceBands', i, 'maxKm'],
        });
      }
    });
  })
  .meta({ id: 'ShippingSettings' });
export type ShippingSettings = z.infer<typeof shippingSettings>;

/** `GET/PUT /api/lenders/:orgId/shipping-settings`. */
export const shippingSettingsResponse = z
  .object({
    lenderId: z.number().int(),
    settings: shippingSettings,
    /** Whether these are the product defaults (the lender has not saved its own yet). */
    isDefault: z.boolean(),
    updatedAt: z.string().nullable(),
  })
  .meta({ id: 'ShippingSettingsResponse' });
export type ShippingSettingsResponse = z.infer<typeof shippingSettingsResponse>;

// ---------------------------------------------------------------------------------------------
// Models
// ---------------------------------------------------------------------------------------------

export const packingItem = z.object({
  id: z.number().int().optional(),
  name: z.string().trim().min(1).max(modelLimits.packingNameMax),
  gtin: gtin14.nullable(),
  quantity: z.number().int().min(modelLimits.quantityMin).max(modelLimits.quantityMax),
  /** Whether each piece carries its own serial number that must be scanned. */
  serialised: z.boolean().default(false),
});
export type PackingItem = z.infer<typeof packingItem>;

/** `POST /api/models` and `PUT /api/models/:id`. */
export const modelInput = z
  .object({
    /**
     * The lender that lists the model. May be left out when the person is fleet manager of
     * exactly one lender; ignored on update (a model never changes lender).
     */
    lenderId: z.number().int().positive().optional(),
    name: z
      .string()
      .trim()
      .min(modelLimits.nameMin, 'Give the model a name.')
      .max(modelLimits.nameMax),
    category: modelCategory,
    description: z.string().trim().max(modelLimits.descriptionMax).default(''),
    listValue: minor,
    currency,
    depositRule: depositRule,
    packingList: z.array(packingItem).max(modelLimits.packingItemsMax).default([]),
    /** Other models of the same lender this one is compatible with; kept symmetric by the server. */
    compatibleModelIds: z
      .array(z.number().int().positive())
      .max(modelLimits.compatibleMax)
      .default([]),
  })
  .refine((m) => m.depositRule.currency === m.currency, {
    message: 'The deposit rule must use the currency of the list value.',
    path: ['depositRule', 'currency'],
  })
  .refine((m) => new Set(m.compatibleModelIds).size === m.compatibleModelIds.length, {
    message: 'A model is listed twice.',
    path: ['compatibleModelIds'],
  })
  .meta({ id: 'ModelInput' });
export type ModelInput = z.infer<typeof modelInput>;

/** A photo of a model; `url` serves it to signed-in people. */
export const photo = z
  .object({
    id: z.number().int(),
    modelId: z.number().int(),
    contentType: z.enum(photoContentTypes),
    sizeBytes: z.number().int(),
    url: z.string(),
  })
  .meta({ id: 'Photo' });
export type Photo = z.infer<typeof photo>;
export const photoResponse = z.object({ photo }).meta({ id: 'PhotoResponse' });

/** A compatible model, named so a screen can list it without another request. */
export const modelRef = z.object({
  id: z.number().int(),
  name: z.string(),
  category: modelCategory,
});

export const model = z
  .object({
    id: z.number().int(),
    lenderId: z.number().int(),
    lenderName: z.string(),
    name: z.string(),
    category: modelCategory,
    description: z.string(),
    listValue: z.number().int(),
    currency: z.string(),
    depositRule: depositRule,
    /** The deposit one unit of this model needs (from the rule; an estimate until confirmed). */
    depositPerUnit: money,
    packingList: z.array(packingItem),
    compatibleModelIds: z.array(z.number().int()),
    compatibleModels: z.array(modelRef),
    photoIds: z.array(z.number().int()),
    photos: z.array(photo),
    /** Units that are not retired. */
    unitCount: z.number().int(),
    /** Units that can be lent now (status active). */
    activeUnitCount: z.number().int(),
    /** Whether the signed-in person may edit the model (fleet manager of its lender). */
    editable: z.boolean(),
  })
  .meta({ id: 'Model' });
export type Model = z.infer<typeof model>;
export const modelList = listOf(model).meta({ id: 'ModelList' });
/** Answer of `GET /api/models`: one page, and the units of every matching model. */
export const modelPage = pageOf(model)
  .extend({
    /** Units (not retired) of all matching models, across pages. */
    unitTotal: z.number().int().min(0),
  })
  .meta({ id: 'ModelPage' });
export type ModelPage = z.infer<typeof modelPage>;
export const modelResponse = z.object({ model }).meta({ id: 'ModelResponse' });

/** `GET /api/models` query: the paging contract (`q`: name or description) and filters. */
export const modelQuery = pageQuery(modelSortFields, 'lender,asc').extend({
  category: modelCategory.optional(),
  compatibleWith: z.coerce.number().int().positive().optional(),
  /** Only this lender's models. */
  lenderId: z.coerce.number().int().positive().optional(),
});
export type ModelQuery = z.infer<typeof modelQuery>;

export const modelParams = z.object({ id });
export const photoParams = z.object({ id });
export const modelPhotoParams = z.object({ id, photoId: id });

// ---------------------------------------------------------------------------------------------
// Units and holds
// ---------------------------------------------------------------------------------------------

export const unitStatus = z.enum(unitStatuses);
export type UnitStatus = z.infer<typeof unitStatus>;

/** `POST /api/units`. */
export const unitInput = z
  .object({
    modelId: z.number().int().positive(),
    serialNumber: z.string().trim().min(1, 'Enter the serial number.').max(unitLimits.serialMax),
    /** UDI device identifier: the GTIN on the unit's label, 14 digits. */
    udiDi: z
      .string()
      .regex(/^\d{14}$/, 'The UDI device identifier (GTIN) has 14 digits.')
      .refine(isValidGtin, 'The last digit is not the GS1 check digit: check for a typing error.')
      .nullable()
      .default(null),
    homeDepotId: z.number().int().positive(),
    status: unitStatus.default('active'),
  })
  .meta({ id: 'UnitInput' });
export type UnitInput = z.infer<typeof unitInput>;

/** `PUT /api/units/:id`: everything but the model (a unit never changes model). */
export const unitUpdate = unitInput.omit({ modelId: true }).meta({ id: 'UnitUpdate' });
export type UnitUpdate = z.infer<typeof unitUpdate>;

export const unit = z
  .object({
    id: z.number().int(),
    modelId: z.number().int(),
    modelName: z.string(),
    category: modelCategory,
    lenderId: z.number().int(),
    serialNumber: z.string(),
    udiDi: z.string().nullable(),
    homeDepotId: z.number().int(),
    homeDepotName: z.string(),
    homeDepotTimeZone: z.string(),
    status: unitStatus,
  })
  .meta({ id: 'Unit' });
export type Unit = z.infer<typeof unit>;
export const unitList = listOf(unit).meta({ id: 'UnitList' });
/** Answer of `GET /api/units`: one page, and how many matching units are in each status. */
export const unitPage = pageOf(unit)
  .extend({
    statusCounts: z.array(z.object({ status: unitStatus, count: z.number().int().min(0) })),
  })
  .meta({ id: 'UnitPage' });
export type UnitPage = z.infer<typeof unitPage>;
export const unitResponse = z.object({ unit }).meta({ id: 'UnitResponse' });

/** `GET /api/units` query: the paging contract (`q`: serial, UDI-DI or model) and filters. */
export const unitQuery = pageQuery(unitSortFields, 'model,asc').extend({
  modelId: z.coerce.number().int().positive().optional(),
  lenderId: z.coerce.number().int().positive().optional(),
  /** Only units based at this depot. */
  depotId: z.coerce.number().int().positive().optional(),
  status: unitStatus.optional(),
});
export type UnitQuery = z.infer<typeof unitQuery>;
export const unitParams = z.object({ id });
export const unitHoldParams = z.object({ id, holdId: id });

export const holdKinds = ['loan', 'maintenance'] as const;
export const hold = z
  .object({
    id: z.number().int(),
    unitId: z.number().int(),
    kind: z.enum(holdKinds),
    /** First blocked day, in the unit's depot calendar. */
    start: isoDate,
    /** Last blocked day (inclusive), in the unit's depot calendar. */
    end: isoDate,
    /** The loan, when the viewer may see it (lender, or the loan's own hospital); else null. */
    loanId: z.number().int().nullable(),
    loanReference: z.string().nullable(),
    /** Hospital of the loan, shown to the lender only. */
    hospitalName: z.string().nullable(),
    /** Maintenance reason, shown to the lender only. */
    reason: z.string().nullable(),
    /** What a calendar shows: hospitals see "Reserved" for other hospitals' loans. */
    label: z.string(),
  })
  .meta({ id: 'Hold' });
export type Hold = z.infer<typeof hold>;
export const holdList = listOf(hold).meta({ id: 'HoldList' });
export const holdResponse = z.object({ hold }).meta({ id: 'HoldResponse' });

export const maintenanceHoldInput = z
  .object({
    start: isoDate,
    end: isoDate,
    reason: z.string().trim().min(maintenanceReasonLimits.min).max(maintenanceReasonLimits.max),
  })
  .refine((h) => h.end >= h.start, { message: 'The end is before the start.', path: ['end'] })
  .meta({ id: 'MaintenanceHoldInput' });
export type MaintenanceHoldInput = z.infer<typeof maintenanceHoldInput>;

export const holdsQuery = z
  .object({ from: isoDate.optional(), to: isoDate.optional() })
  .refine((q) => !q.from || !q.to || q.to >= q.from, {
    message: 'The end is before the start.',
    path: ['to'],
  });
export type HoldsQuery = z.infer<typeof holdsQuery>;
