/*
 * Catalogue values without zod, for the browser and the schemas alike.
 */

/** Columns `GET /api/models` sorts by; `lender` is lender name, then model name. */
export const modelSortFields = [
  'lender',
  'name',
  'category',
  'listValue',
  'deposit',
  'units',
] as const;
/** A sortable column of the model list. */
export type ModelSortField = (typeof modelSortFields)[number];

/** Columns `GET /api/units` sorts by; `next` is the first day of the unit's next hold. */
export const unitSortFields = ['model', 'serial', 'depot', 'status', 'next'] as const;
/** A sortable column of the unit list. */
export type UnitSortField = (typeof unitSortFields)[number];

/** Categories of equipment a lender lists. */
export const modelCategories = [
  'robotic_platform',
  'flexible_endoscope',
  'laser',
  'imaging',
  'fluid_management',
  'accessory',
] as const;
/** One of `modelCategories`. */
export type ModelCategory = (typeof modelCategories)[number];

/** Human labels for categories, shared by screens and e-mails. */
export const modelCategoryLabels: Record<ModelCategory, string> = {
  robotic_platform: 'Robotic platform',
  flexible_endoscope: 'Flexible endoscope',
  laser: 'Laser system',
  imaging: 'Imaging tower',
  fluid_management: 'Fluid management',
  accessory: 'Accessory',
};

// ---------------------------------------------------------------------------------------------
// GS1 identification keys
// ---------------------------------------------------------------------------------------------

/**
 * The GS1 check digit of a string of data digits (GS1 General Specifications §7.9.1): weights
 * 3, 1, 3, 1 ... from the rightmost data digit; check = (10 − sum mod 10) mod 10.
 * @param data The digits before the check digit (e.g. 13 digits of a GTIN-14).
 * @throws RangeError when `data` is empty or holds anything but digits.
 */
export function gs1CheckDigit(data: string): number {
  if (!/^\d+$/.test(data)) throw new RangeError(`GS1 data must be digits, got "${data}"`);
  let sum = 0;
  for (let i = 0; i < data.length; i++) {
    const digit = data.charCodeAt(data.length - 1 - i) - 48;
    sum += digit * (i % 2 === 0 ? 3 : 1);
  }
  return (10 - (sum % 10)) % 10;
}

/** Whether `code` is a GTIN-8, -12, -13 or -14 whose last digit is the right GS1 check digit. */
export function isValidGtin(code: string): boolean {
  if (!/^(\d{8}|\d{12}|\d{13}|\d{14})$/.test(code)) return false;
  return gs1CheckDigit(code.slice(0, -1)) === Number(code.slice(-1));
}

/** Appends the GS1 check digit to 13 data digits, giving a GTIN-14. */
export function toGtin14(data13: string): string {
  if (!/^\d{13}$/.test(data13)) throw new RangeError('A GTIN-14 has 13 data digits.');
  return `${data13}${gs1CheckDigit(data13)}`;
}

/** What is wrong with a typed GTIN-14, or null when it is a valid one. */
export type GtinProblem =
  { readonly kind: 'length' } | { readonly kind: 'check'; readonly expected: number };

/**
 * Checks a GTIN written as 14 digits (the `gtin14` schema's rule): the length first, then the
 * check digit, returning the digit that was expected so a form's message can name it.
 */
export function gtin14Problem(code: string): GtinProblem | null {
  if (!/^\d{14}$/.test(code)) return { kind: 'length' };
  const expected = gs1CheckDigit(code.slice(0, -1));
  return expected === Number(code.slice(-1)) ? null : { kind: 'check', expected };
}

/**
 * A GTIN-8, -12 or -13 with a valid check digit, padded to 14 digits with leading zeros (GS1
 * General Specifications: padding keeps the check digit, because weights count from the right);
 * anything else comes back unchanged, for the validator to explain.
 */
export function padGtin(code: string): string {
  const digits = code.replace(/\s+/g, '');
  if (!/^(\d{8}|\d{12}|\d{13})$/.test(digits)) return digits;
  if (!isValidGtin(digits)) return digits;
  return digits.padStart(14, '0');
}

// ---------------------------------------------------------------------------------------------
// Units, field limits and patterns (the schemas in `../catalog.ts` are built from these)
// ---------------------------------------------------------------------------------------------

/** Statuses of a unit. */
export const unitStatuses = ['active', 'maintenance', 'retired'] as const;
/** One of `unitStatuses`. */
export type UnitStatusValue = (typeof unitStatuses)[number];

/** Our words for each unit status, shared by screens and e-mails. */
export const unitStatusLabels: Readonly<Record<UnitStatusValue, string>> = {
  active: 'Available',
  maintenance: 'In maintenance',
  retired: 'Retired',
};

/** Field limits of a model (`modelInput`, `packingItem`, `depositRule`). */
export const modelLimits = {
  nameMin: 2,
  nameMax: 160,
  descriptionMax: 4000,
  packingItemsMax: 200,
  packingNameMax: 160,
  quantityMin: 1,
  quantityMax: 999,
  compatibleMax: 100,
  /** Basis points: 10 000 bps = 100 % of list value. */
  percentBpsMax: 10_000,
} as const;

/** Field limits of a unit (`unitInput`). */
export const unitLimits = { serialMax: 60 } as const;

/** Field limits of a depot (`depotInput`). */
export const depotLimits = {
  nameMin: 2,
  nameMax: 200,
  addressMin: 3,
  addressMax: 300,
  cityMax: 120,
  postalCodeMax: 20,
  regionMax: 120,
  receivingHoursMax: 200,
} as const;

/** A 24-hour wall-clock time `HH:mm` (`wallTime`). */
export const wallTimePattern = /^([01]\d|2[0-3]):[0-5]\d$/;

/** An ISO 3166-1 alpha-2 code, upper case (`depotInput.country`). */
export const countryPattern = /^[A-Z]{2}$/;

/** Limits of a lender's shipping settings (`shippingSettings`, `distanceBand`). */
export const shippingLimits = {
  bandsMin: 1,
  bandsMax: 20,
  /** Every day count is at most this. */
  daysMax: 30,
  /** Lead days may not be 0: a unit cannot arrive on the day of the case. */
  leadDaysMin: 1,
} as const;

/** Length of a maintenance reason (`maintenanceHoldInput.reason`). */
export const maintenanceReasonLimits = { min: 2, max: 300 } as const;

/** Photo types the server accepts (`photo.contentType`). */
export const photoContentTypes = ['image/jpeg', 'image/png', 'image/webp'] as const;

/** Largest photo the server stores: 5 MB (5 × 1024 × 1024 bytes). */
export const maxPhotoBytes = 5 * 1024 * 1024;
