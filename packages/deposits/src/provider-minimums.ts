import { currencyExponent } from './money';

/**
 * Smallest amount the payment provider will charge, per currency, in minor units.
 *
 * Source: the payment provider's public documentation ("minimum charge amount" table), as copied
 * into docs/references.md ("Money and payments"): USD 0.50, EUR 0.50, GBP 0.30,
 * JPY 50. This is a SECONDARY copy of the provider's table, not the table itself, and it holds only
 * the currencies we have checked; the provider may change its table, so re-check it before adding a
 * currency or relying on a value in production.
 */
export const PROVIDER_MINIMUM_CHARGE: Readonly<Record<string, number>> = Object.freeze({
  USD: 50,
  EUR: 50,
  GBP: 30,
  JPY: 50,
});

/**
 * The payment provider's minimum charge for a currency, in minor units.
 *
 * Unknown currencies: a valid ISO 4217 currency that is missing from our copy of the table
 * returns `null` ("not known here"), not 0 and not an error. Deposits in such a currency are then
 * not raised to any floor, and the payments component must let the provider's own validation
 * decide; the `null` travels in the deposit result so that the caller can see it. Codes that are
 * not ISO 4217 currencies at all still throw.
 *
 * @param currency ISO 4217 alphabetic code.
 * @returns Minimum in minor units, or `null` when our copy of the table does not list the currency.
 * @throws {DepositError} `unknown_currency` when the code is not an ISO 4217 currency.
 */
export function providerMinimumCharge(currency: string): number | null {
  currencyExponent(currency);
  return Object.prototype.hasOwnProperty.call(PROVIDER_MINIMUM_CHARGE, currency)
    ? PROVIDER_MINIMUM_CHARGE[currency]
    : null;
}
