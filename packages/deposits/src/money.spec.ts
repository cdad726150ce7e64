import fc from 'fast-check';

import { DepositError } from './errors';
import { assertInteger, currencyExponent, formatMoney, toMinor } from './money';
import { PROVIDER_MINIMUM_CHARGE, providerMinimumCharge } from './provider-minimums';

describe('currencyExponent (ISO 4217 through currency-codes)', () => {
  // Source: payment provider's public documentation, docs/references.md "Money and payments":
  // zero-decimal currencies include JPY, KRW, VND, CLP (ISO 4217 exponent 0).
  it.each(['JPY', 'KRW', 'VND', 'CLP'])('%s has exponent 0 (zero-decimal)', (code) => {
    expect(currencyExponent(code)).toBe(0);
  });

  // Source: ISO 4217 list one (USD, EUR, GBP: 2 decimals). Value from memory, matching the list
  // shipped inside currency-codes.
  it.each(['USD', 'EUR', 'GBP'])('%s has exponent 2', (code) => {
    expect(currencyExponent(code)).toBe(2);
  });

  // Source: ISO 4217 list one, Bahraini dinar has 3 decimals (from memory).
  it('BHD has exponent 3', () => {
    expect(currencyExponent('BHD')).toBe(3);
  });

  it('refuses codes that are not ISO 4217 currencies', () => {
    expect(() => currencyExponent('ABC')).toThrow(/not an ISO 4217 currency/);
    expect(() => currencyExponent('usd')).toThrow(DepositError);
  });

  // ISO 4217 lists gold (XAU) and "no currency" (XXX) with minor unit "N.A.".
  it('refuses ISO entries that are not money (minor unit N.A.)', () => {
    expect(() => currencyExponent('XAU')).toThrow(/no minor unit/);
    expect(() => currencyExponent('XXX')).toThrow(/no minor unit/);
  });
});

describe('toMinor', () => {
  // Source: payment provider's documentation (docs/references.md): 1000 = 10.00 USD; 10 = 10 JPY.
  it('reads 10.00 USD as 1000 minor units', () => {
    expect(toMinor('10.00', 'USD')).toBe(1000);
    expect(toMinor('10', 'USD')).toBe(1000);
  });

  it('reads 10 JPY as 10 minor units', () => {
    expect(toMinor('10', 'JPY')).toBe(10);
  });

  it('keeps every digit exact where floats would not (0.29 × 100 = 28.999... in binary)', () => {
    expect(0.29 * 100).not.toBe(29); // why the string input exists
    expect(toMinor('0.29', 'USD')).toBe(29);
    expect(toMinor('-3.5', 'EUR')).toBe(-350);
    expect(toMinor('1.005', 'BHD')).toBe(1005);
  });

  it('accepts surplus zero decimals but refuses surplus precision', () => {
    expect(toMinor('10.500', 'USD')).toBe(1050);
    expect(() => toMinor('10.505', 'USD')).toThrow(/more decimal places than USD allows \(2\)/);
    expect(() => toMinor('10.5', 'JPY')).toThrow(/more decimal places than JPY allows \(0\)/);
  });

  it('refuses grouping, exponents and empty text', () => {
    for (const bad of ['1,000.00', '1e3', '', '.5', '10.', 'ten']) {
      expect(() => toMinor(bad, 'USD')).toThrow(DepositError);
    }
  });

  it('refuses results beyond the safe integer range', () => {
    expect(() => toMinor('90071992547409.92', 'USD')).toThrow(/safe integer/);
    expect(toMinor('90071992547409.91', 'USD')).toBe(Number.MAX_SAFE_INTEGER);
  });

  it('round-trips any safe minor amount through its decimal text (property)', () => {
    fc.assert(
      fc.property(fc.maxSafeInteger(), fc.constantFrom('USD', 'JPY', 'BHD'), (minor, code) => {
        const exponent = currencyExponent(code);
        // Oracle: BigInt division, independent of toMinor's string splicing.
        const big = BigInt(minor);
        const scale = 10n ** BigInt(exponent);
        const abs = big < 0n ? -big : big;
        const text =
          (big < 0n ? '-' : '') +
          (abs / scale).toString() +
          (exponent > 0 ? '.' + (abs % scale).toString().padStart(exponent, '0') : '');
        expect(toMinor(text, code)).toBe(minor === 0 ? 0 : minor);
      }),
    );
  });
});

describe('formatMoney', () => {
  // Cross-check against ICU/CLDR (the runtime's Intl, a general-purpose reference library) with its
  // own default digits for the currency: our digits come from ISO 4217 via currency-codes instead.
  it('formats 1000 USD minor units as ICU formats 10 dollars', () => {
    const icu = new Intl.NumberFormat('en-US', { style: 'currency', currency: 'USD' }).format(10);
    expect(formatMoney(1000, 'USD', 'en-US')).toBe(icu);
    expect(formatMoney(1000, 'USD', 'en-US')).toContain('10.00');
  });

  it('formats 10 JPY minor units as ICU formats 10 yen (no decimals)', () => {
    const icu = new Intl.NumberFormat('ja-JP', { style: 'currency', currency: 'JPY' }).format(10);
    expect(formatMoney(10, 'JPY', 'ja-JP')).toBe(icu);
    expect(formatMoney(10, 'JPY', 'ja-JP')).not.toMatch(/[.,]/);
  });

  it('shows three decimals for BHD and keeps large amounts exact', () => {
    expect(formatMoney(1005, 'BHD', 'en-US')).toContain('1.005');
    expect(formatMoney(Number.MAX_SAFE_INTEGER, 'USD', 'en-US')).toContain('90,071,992,547,409.91');
    expect(formatMoney(-5, 'EUR', 'en-US')).toContain('0.05');
  });

  it('refuses fractional minor units', () => {
    expect(() => formatMoney(10.5, 'USD')).toThrow(/safe integer/);
  });
});

describe('assertInteger', () => {
  it('accepts safe integers and refuses the rest', () => {
    expect(() => assertInteger(0)).not.toThrow();
    expect(() => assertInteger(-7)).not.toThrow();
    expect(() => assertInteger(-7, 'x', { nonNegative: true })).toThrow(/must not be negative/);
    expect(() => assertInteger(1.5, 'fee')).toThrow(/fee must be a safe integer/);
    expect(() => assertInteger(Number.NaN)).toThrow(DepositError);
    expect(() => assertInteger(2 ** 53)).toThrow(DepositError);
  });
});

describe('providerMinimumCharge', () => {
  // Source: payment provider's minimum charge table, secondary copy in docs/references.md
  // ("Money and payments"): USD 0.50, EUR 0.50, GBP 0.30, JPY 50. The expected minor units are
  // derived from those major amounts through toMinor, not typed in.
  it.each([
    ['USD', '0.50'],
    ['EUR', '0.50'],
    ['GBP', '0.30'],
    ['JPY', '50'],
  ])('%s minimum is %s', (code, major) => {
    expect(providerMinimumCharge(code)).toBe(toMinor(major, code));
  });

  it('gives USD 50, EUR 50, GBP 30, JPY 50 minor units', () => {
    expect([50, 50, 30, 50]).toEqual(['USD', 'EUR', 'GBP', 'JPY'].map(providerMinimumCharge));
  });

  it('every table entry is a valid currency with a positive integer minimum', () => {
    for (const [code, min] of Object.entries(PROVIDER_MINIMUM_CHARGE)) {
      expect(() => currencyExponent(code)).not.toThrow();
      expect(Number.isSafeInteger(min) && min > 0).toBe(true);
    }
  });

  it('returns null for a real currency missing from our copy, and throws for a non-currency', () => {
    expect(providerMinimumCharge('CHF')).toBeNull();
    expect(() => providerMinimumCharge('ZZZ')).toThrow(/not an ISO 4217 currency/);
  });
});
