import type { DepositRule } from '@evalon/contracts';
import { DepositError, currencyExponent, formatMoney, toMinor } from '@evalon/deposits';

/**
 * Money on the catalogue screens: people type major units ("1250.00"), the API takes integer
 * minor units. Conversions go through `@evalon/deposits` (ISO 4217 exponents, exact decimal
 * strings), so no amount ever passes through floating-point arithmetic.
 */

/** Currencies offered first when listing a model; any ISO 4217 code already on a model is kept. */
export const commonCurrencies: readonly string[] = [
  'USD',
  'EUR',
  'GBP',
  'CHF',
  'CAD',
  'AUD',
  'JPY',
  'SEK',
  'NOK',
  'DKK',
];

/**
 * Integer minor units written as a plain decimal string in major units, the way a form shows
 * them (`123450, 'USD'` → `"1234.50"`; `5000, 'JPY'` → `"5000"`). String arithmetic only.
 */
export function toMajorText(amount: number, currency: string): string {
  const exponent = currencyExponent(currency);
  const digits = Math.abs(amount)
    .toString()
    .padStart(exponent + 1, '0');
  const whole = digits.slice(0, digits.length - exponent);
  const fraction = digits.slice(digits.length - exponent);
  return `${amount < 0 ? '-' : ''}${whole}${exponent > 0 ? `.${fraction}` : ''}`;
}

/**
 * Why a typed amount cannot be used, in plain words, or null when it converts exactly.
 * Commas typed as thousands separators are accepted (they are removed before converting).
 */
export function amountProblem(text: string, currency: string): string | null {
  const cleaned = normaliseAmount(text);
  if (cleaned === '') return null; // `required` speaks for empty.
  if (cleaned.startsWith('-')) return 'Enter an amount of zero or more.';
  try {
    toMinor(cleaned, currency);
    return null;
  } catch (error) {
    if (error instanceof DepositError && error.code === 'unknown_currency') {
      return 'Choose the currency first.';
    }
    if (/^\d+(\.\d+)?$/.test(cleaned)) {
      const exponent = safeExponent(currency);
      return exponent === 0
        ? `${currency} has no decimal places: enter a whole amount.`
        : `${currency} has ${exponent} decimal places at most.`;
    }
    return 'Enter an amount in numbers only, e.g. 1250.00.';
  }
}

/** The typed amount in minor units (`"1,250.50"` USD → 125050). Throws when it is not valid. */
export function amountToMinor(text: string, currency: string): number {
  return toMinor(normaliseAmount(text), currency);
}

/** Removes spaces and thousands commas that people often type. */
function normaliseAmount(text: string): string {
  return text.trim().replace(/[\s,]/g, '');
}

function safeExponent(currency: string): number | null {
  try {
    return currencyExponent(currency);
  } catch {
    return null;
  }
}

/** Whether `currency` is an ISO 4217 money currency that `@evalon/deposits` knows. */
export function isKnownCurrency(currency: string): boolean {
  return safeExponent(currency) !== null;
}

/**
 * A percentage typed with at most two decimals, as basis points (`"2.5"` → 250, `"100"` →
 * 10000), or null when the text is not such a number. Integer arithmetic on the digits.
 */
export function percentToBps(text: string): number | null {
  const match = /^(\d{1,3})(?:\.(\d{1,2}))?$/.exec(text.trim());
  if (!match) return null;
  const [, whole, fraction = ''] = match;
  return Number(whole) * 100 + Number(fraction.padEnd(2, '0'));
}

/** Basis points as the percentage a form shows (`250` → `"2.5"`, `200` → `"2"`). */
export function bpsToPercentText(bps: number): string {
  const whole = Math.trunc(bps / 100);
  const fraction = String(bps % 100)
    .padStart(2, '0')
    .replace(/0+$/, '');
  return fraction ? `${whole}.${fraction}` : String(whole);
}

/**
 * A deposit rule in a table cell: "10% of list value, $5,000.00–$15,000.00" (the bounds the
 * share is kept within).
 */
export function depositRuleShort(rule: DepositRule, locale?: string): string {
  const { percentBps, min, max, currency } = rule;
  if (max === 0) return 'No deposit';
  const bounds =
    min > 0
      ? `${formatMoney(min, currency, locale)}–${formatMoney(max, currency, locale)}`
      : `up to ${formatMoney(max, currency, locale)}`;
  return `${bpsToPercentText(percentBps)}% of list value, ${bounds}`;
}
