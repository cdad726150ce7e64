// Amounts in the smallest currency unit, as the payment provider's API counts them, and how
// the hosted page shows them. The exponent comes from ISO 4217 (npm `currency-codes`), so a
// zero-decimal currency such as JPY shows no decimals.
import currencyCodes from 'currency-codes';

/**
 * Minimum charge per currency, in minor units. Only the currencies listed in
 * docs/references.md (a secondary copy of the provider's table) are enforced;
 * other currencies have no minimum here.
 */
export const MINIMUM_CHARGE = Object.freeze({ usd: 50, eur: 50, gbp: 30, jpy: 50 });

/** The ISO 4217 exponent (digits after the decimal point) of a currency, or null if unknown. */
export function currencyExponent(currency) {
  const entry = currencyCodes.code(String(currency).toUpperCase());
  return entry ? entry.digits : null;
}

/** Whether the string is an ISO 4217 currency code (any case). */
export function isKnownCurrency(currency) {
  return (
    typeof currency === 'string' &&
    /^[a-zA-Z]{3}$/.test(currency) &&
    currencyExponent(currency) !== null
  );
}

/**
 * Formats an integer amount in minor units for people, e.g. (150000, 'usd') → "$1,500.00" and
 * (5000, 'jpy') → "¥5,000". The decimal string is built from the integer so large amounts do
 * not pick up floating-point error.
 */
export function formatAmount(amount, currency) {
  const digits = currencyExponent(currency) ?? 2;
  const negative = amount < 0;
  const raw = String(Math.abs(Math.trunc(amount))).padStart(digits + 1, '0');
  const decimal =
    digits === 0 ? raw : `${raw.slice(0, raw.length - digits)}.${raw.slice(raw.length - digits)}`;
  const formatter = new Intl.NumberFormat('en-US', {
    style: 'currency',
    currency: String(currency).toUpperCase(),
    minimumFractionDigits: digits,
    maximumFractionDigits: digits,
  });
  return formatter.format(`${negative ? '-' : ''}${decimal}`);
}
