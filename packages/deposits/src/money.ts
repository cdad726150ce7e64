import { code as lookupCurrency } from 'currency-codes';

import { DepositError } from './errors';

/** An amount of money: integer minor units (e.g. cents) plus an ISO 4217 alphabetic code. */
export interface Money {
  /** Integer count of the currency's minor unit (1000 USD minor = 10.00 USD; 10 JPY = 10 JPY). */
  amount: number;
  /** ISO 4217 alphabetic code, upper case (e.g. `USD`, `JPY`). */
  currency: string;
}

/**
 * Throws unless `value` is a safe integer (and, when asked, not negative).
 *
 * Money is counted in integer minor units; a fraction or an integer past 2^53 − 1 would mean a
 * rounding error has already happened somewhere upstream, so it is refused rather than repaired.
 *
 * @param value The number to check.
 * @param label Name of the value, used in the error message.
 * @param options.nonNegative Whether negative values are refused too.
 * @throws {DepositError} `invalid_amount`.
 */
export function assertInteger(
  value: number,
  label = 'amount',
  options: { nonNegative?: boolean } = {},
): void {
  if (typeof value !== 'number' || !Number.isSafeInteger(value)) {
    throw new DepositError(
      'invalid_amount',
      `${label} must be a safe integer number of minor units, got ${String(value)}`,
    );
  }
  if (options.nonNegative && value < 0) {
    throw new DepositError('invalid_amount', `${label} must not be negative, got ${value}`);
  }
}

/**
 * ISO 4217 entries that are not money (precious metals, bond-market units, the testing code,
 * "no currency") carry entity names starting `ZZnn_` in ISO's list one, and their minor unit is
 * "N.A.". The `currency-codes` package reports "N.A." as 0 digits, which would silently treat
 * gold as a zero-decimal currency, so those entries are refused here. XDR, XSU and XUA are also
 * "N.A." in ISO but are not marked `ZZ`; they pass with 0 digits and are not expected as deposit
 * currencies (no card network settles in them).
 */
const NON_MONEY_ENTITY = /^zz\d{2}_/i;

/**
 * Number of decimal places of the currency's minor unit, as published in ISO 4217 (read through
 * the `currency-codes` package, not a table of our own): USD 2, JPY 0, BHD 3.
 *
 * @param currency ISO 4217 alphabetic code, upper case.
 * @returns The exponent (0–4 in the current list).
 * @throws {DepositError} `unknown_currency` when the code is not an ISO 4217 money currency.
 */
export function currencyExponent(currency: string): number {
  if (typeof currency !== 'string' || !/^[A-Z]{3}$/.test(currency)) {
    throw new DepositError(
      'unknown_currency',
      `Currency must be a three-letter upper-case ISO 4217 code, got ${JSON.stringify(currency)}`,
    );
  }
  const record = lookupCurrency(currency);
  if (!record) {
    throw new DepositError('unknown_currency', `${currency} is not an ISO 4217 currency code`);
  }
  if (record.countries.length > 0 && record.countries.every((c) => NON_MONEY_ENTITY.test(c))) {
    throw new DepositError(
      'unknown_currency',
      `${currency} (${record.currency}) has no minor unit in ISO 4217 and cannot hold a deposit`,
    );
  }
  return record.digits;
}

/**
 * Converts a decimal amount in major units, written as a string (`"10.00"`, `"-3.5"`, `"10"`),
 * to integer minor units, exactly: no floating-point arithmetic on the value.
 *
 * A string is required because a JavaScript number such as 0.1 + 0.2 has already lost the exact
 * decimal. Digits beyond the currency's exponent are accepted only when they are zeros
 * (`"10.500"` USD = 1050); anything else is refused instead of rounded, since silently rounding a
 * typed-in amount is a money bug.
 *
 * @param major Decimal string: optional `-`, digits, optional `.` and digits. No grouping.
 * @param currency ISO 4217 alphabetic code.
 * @returns Integer minor units.
 * @throws {DepositError} `invalid_amount` for malformed or over-precise input or results past
 *   2^53 − 1; `unknown_currency` for an unknown code.
 */
export function toMinor(major: string, currency: string): number {
  const exponent = currencyExponent(currency);
  const match = typeof major === 'string' ? /^(-?)(\d+)(?:\.(\d+))?$/.exec(major.trim()) : null;
  if (!match) {
    throw new DepositError(
      'invalid_amount',
      `Amount ${JSON.stringify(major)} is not a plain decimal number (e.g. "1250.00")`,
    );
  }
  const [, sign, whole, fraction = ''] = match;
  const extra = fraction.slice(exponent);
  if (/[^0]/.test(extra)) {
    throw new DepositError(
      'invalid_amount',
      `Amount ${major} has more decimal places than ${currency} allows (${exponent})`,
    );
  }
  const digits = whole + fraction.slice(0, exponent).padEnd(exponent, '0');
  const minor = Number(BigInt(sign + digits));
  assertInteger(minor, `Amount ${major} ${currency} in minor units`);
  // Normalise -0 so that "-0.00" compares equal to 0 everywhere.
  return minor === 0 ? 0 : minor;
}

/**
 * Formats integer minor units for people, with exactly the ISO 4217 number of decimals
 * (`formatMoney(1000, 'USD', 'en-US')` → `$10.00`; `formatMoney(10, 'JPY', 'ja-JP')` → `￥10`).
 *
 * The amount reaches `Intl.NumberFormat` as an exact decimal string, so large amounts are not
 * distorted by dividing a float.
 *
 * @param amount Integer minor units.
 * @param currency ISO 4217 alphabetic code.
 * @param locale BCP 47 locale; the runtime's default locale when omitted.
 * @returns The localised text.
 * @throws {DepositError} `invalid_amount` or `unknown_currency`.
 */
export function formatMoney(amount: number, currency: string, locale?: string): string {
  assertInteger(amount);
  const exponent = currencyExponent(currency);
  const digits = Math.abs(amount)
    .toString()
    .padStart(exponent + 1, '0');
  const whole = digits.slice(0, digits.length - exponent);
  const fraction = digits.slice(digits.length - exponent);
  const decimal = `${amount < 0 ? '-' : ''}${whole}${exponent > 0 ? `.${fraction}` : ''}`;
  return moneyFormat(locale, currency, exponent).format(decimal as Intl.StringNumericLiteral);
}

/**
 * Building an `Intl.NumberFormat` costs far more than formatting with one (measured: most of
 * the time of a 1,000-proctor ranking went there), so each locale/currency pair gets one.
 */
const moneyFormats = new Map<string, Intl.NumberFormat>();

function moneyFormat(locale: string | undefined, currency: string, exponent: number) {
  const key = `${locale ?? ''}|${currency}`;
  let format = moneyFormats.get(key);
  if (!format) {
    format = new Intl.NumberFormat(locale, {
      style: 'currency',
      currency,
      minimumFractionDigits: exponent,
      maximumFractionDigits: exponent,
    });
    moneyFormats.set(key, format);
  }
  return format;
}
