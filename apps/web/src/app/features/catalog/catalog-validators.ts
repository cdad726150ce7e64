import { AbstractControl, ValidationErrors, ValidatorFn } from '@angular/forms';
import { gtin14Problem } from '@evalon/contracts/values';
import { amountProblem, percentToBps } from './money';

/**
 * Form validators of the catalogue screens. Each error carries the sentence to show, so the
 * templates print `getError(...)` instead of repeating the wording.
 */

/** At least `min` characters once surrounding spaces are removed (contracts trim strings). */
export function trimmedMinLength(min: number): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const value: unknown = control.value;
    if (typeof value !== 'string' || value === '') return null; // `required` speaks for empty.
    return value.trim().length >= min ? null : { trimmedMinLength: { min } };
  };
}

/**
 * An optional GTIN-14 with the GS1 check digit (GS1 General Specifications §7.9.1). The error
 * says what to fix: the length, or which last digit the other 13 digits call for.
 */
export const gtinValidator: ValidatorFn = (control: AbstractControl): ValidationErrors | null => {
  const value: unknown = control.value;
  if (typeof value !== 'string' || value.trim() === '') return null;
  const problem = gtin14Problem(value.trim());
  if (!problem) return null;
  if (problem.kind === 'length') {
    return {
      gtin: 'A GTIN here has 14 digits. Pad a shorter GTIN-8, -12 or -13 with leading zeros.',
    };
  }
  return {
    gtin: `The last digit is not the GS1 check digit (it should be ${problem.expected}). Check for a typing error.`,
  };
};

/**
 * An amount typed in major units of the currency `currency()` names; the error says why it
 * cannot be converted exactly to minor units.
 */
export function amountValidator(currency: () => string): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const value: unknown = control.value;
    if (typeof value !== 'string') return null;
    const problem = amountProblem(value, currency());
    return problem ? { amount: problem } : null;
  };
}

/** A percentage from 0 to 100 with at most two decimals (a deposit rule's basis points). */
export const percentValidator: ValidatorFn = (
  control: AbstractControl,
): ValidationErrors | null => {
  const value: unknown = control.value;
  if (typeof value !== 'string' || value.trim() === '') return null;
  const bps = percentToBps(value);
  if (bps === null)
    return { percent: 'Enter a percentage such as 2 or 12.5 (two decimals at most).' };
  if (bps > 10_000) return { percent: 'A deposit cannot be more than 100% of the list value.' };
  return null;
};

/** A whole number from `min` to `max`; the error says the range. */
export function wholeNumberBetween(min: number, max: number): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const value: unknown = control.value;
    if (value === null || value === '' || value === undefined) return null;
    const number = typeof value === 'number' ? value : Number(value);
    if (!Number.isInteger(number) || number < min || number > max) {
      return { range: `Enter a whole number from ${min} to ${max}.` };
    }
    return null;
  };
}
