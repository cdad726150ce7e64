import type { UnitStatus } from '@evalon/contracts';
import type { PillTone } from '../../shared/status-pill/status-pill';

/*
 * Catalogue rules from `@evalon/contracts`, restated as plain values for the browser, in the
 * same way as `core/contract-rules.ts`: the contracts are zod schemas and importing them at
 * runtime adds the whole schema library (about 450 kB minified) to every page that uses one of
 * them. `catalog-rules.spec.ts` checks each value here against the contract itself, so a change
 * there fails the client tests until it is copied.
 */

/*
 * Model categories and their words live in `shared/loan-rules.ts` (restated there from the
 * contract for the buyer's screens); the catalogue screens import them from there.
 */
export { modelCategories, modelCategoryLabels } from '@evalon/contracts/values';

/** Statuses of a unit, in the contract's order (contract: `unitStatuses`). */
export const unitStatuses: readonly UnitStatus[] = ['active', 'maintenance', 'retired'];

/** Our words for each unit status. */
export const unitStatusLabels: Readonly<Record<UnitStatus, string>> = {
  active: 'Available',
  maintenance: 'In maintenance',
  retired: 'Retired',
};

/** Icons beside each unit status. */
export const unitStatusIcons: Readonly<Record<UnitStatus, string>> = {
  active: 'check_circle',
  maintenance: 'build',
  retired: 'inventory',
};

/** Pill colour of each unit status. */
export const unitStatusTones: Readonly<Record<UnitStatus, PillTone>> = {
  active: 'secondary',
  maintenance: 'tertiary',
  retired: 'neutral',
};

/** Field limits of a model (contract: `modelInput`, `packingItem`, `depositRule`). */
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

/** Field limits of a unit (contract: `unitInput`). */
export const unitLimits = { serialMax: 60 } as const;

/** Field limits of a depot (contract: `depotInput`). */
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

/** A 24-hour wall-clock time `HH:mm` (contract: `wallTime`). */
export const wallTimePattern = /^([01]\d|2[0-3]):[0-5]\d$/;

/** An ISO 3166-1 alpha-2 code, upper case (contract: `depotInput.country`). */
export const countryPattern = /^[A-Z]{2}$/;

/** Limits of a lender's shipping settings (contract: `shippingSettings`, `distanceBand`). */
export const shippingLimits = {
  bandsMin: 1,
  bandsMax: 20,
  /** Every day count is at most this. */
  daysMax: 30,
  /** Lead days may not be 0: a unit cannot arrive on the day of the case. */
  leadDaysMin: 1,
} as const;

/** Length of a maintenance reason (contract: `maintenanceHoldInput.reason`). */
export const maintenanceReasonLimits = { min: 2, max: 300 } as const;

/** Photo types the server accepts (contract: `photo.contentType`). */
export const photoContentTypes: readonly string[] = ['image/jpeg', 'image/png', 'image/webp'];

/** Largest photo the server stores: 5 MB (server: `maxPhotoBytes`, 5 × 1024 × 1024 bytes). */
export const maxPhotoBytes = 5 * 1024 * 1024;

// ---------------------------------------------------------------------------------------------
// GS1 check digit
// ---------------------------------------------------------------------------------------------

/**
 * The GS1 check digit of a string of data digits (GS1 General Specifications §7.9.1): weights
 * 3, 1, 3, 1 ... from the rightmost data digit; check = (10 − sum mod 10) mod 10.
 *
 * Same rule as `gs1CheckDigit` of `@evalon/contracts`, kept here so the model form does not pull
 * the schema library into the browser; the spec compares the two.
 *
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

/** What is wrong with a typed GTIN-14, or null when it is a valid one. */
export type GtinProblem =
  { readonly kind: 'length' } | { readonly kind: 'check'; readonly expected: number };

/**
 * Checks a GTIN written as 14 digits (contract: `gtin14`): the length first, then the check
 * digit, returning the digit that was expected so the message can name it.
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
  if (gs1CheckDigit(digits.slice(0, -1)) !== Number(digits.slice(-1))) return digits;
  return digits.padStart(14, '0');
}
