/**
 * The GS1 mod-10 check digit (GS1 General Specifications §7.9.1), the single home of this rule
 * in Evalon.
 */

/** Lengths of the GS1 keys {@link isValidGs1Key} accepts: GTIN-8, -12, -13, -14 and SSCC. */
export const GS1_KEY_LENGTHS: readonly number[] = [8, 12, 13, 14, 18];

/**
 * The GS1 check digit of a string of data digits (GS1 General Specifications §7.9.1): weights
 * 3, 1, 3, 1 ... from the rightmost data digit; check = (10 − sum mod 10) mod 10. Weighting from
 * the right is why a GTIN keeps its check digit when padded with leading zeros.
 * @param body The digits before the check digit (e.g. 13 digits of a GTIN-14, 17 of an SSCC).
 * @throws RangeError when `body` is empty or holds anything but the digits 0–9.
 */
export function gs1CheckDigit(body: string): number {
  if (!/^\d+$/.test(body)) throw new RangeError(`GS1 data must be digits, got "${body}"`);
  let sum = 0;
  for (let i = 0; i < body.length; i++) {
    const digit = body.charCodeAt(body.length - 1 - i) - 48;
    sum += digit * (i % 2 === 0 ? 3 : 1);
  }
  return (10 - (sum % 10)) % 10;
}

/**
 * Whether `digits` is a GTIN-8, GTIN-12, GTIN-13, GTIN-14 or SSCC-18 whose last digit is the
 * right GS1 check digit. Anything else (other lengths, non-digits, spaces) is `false`.
 */
export function isValidGs1Key(digits: string): boolean {
  if (typeof digits !== 'string' || !/^\d+$/.test(digits)) return false;
  if (!GS1_KEY_LENGTHS.includes(digits.length)) return false;
  return gs1CheckDigit(digits.slice(0, -1)) === digits.charCodeAt(digits.length - 1) - 48;
}
