import fc from 'fast-check';

import { depositForLoan, depositForModel, type DepositRule } from './deposit';
import { DepositError } from './errors';
import { toMinor } from './money';
import { providerMinimumCharge } from './provider-minimums';

const usd = (major: string) => toMinor(major, 'USD');

/** 10 %, between 500.00 and 20,000.00 USD: an invented rule for the worked examples. */
const tenPercent: DepositRule = {
  percentBps: 1000,
  min: usd('500.00'),
  max: usd('20000.00'),
  currency: 'USD',
};
const open = (percentBps: number, currency = 'USD'): DepositRule => ({
  percentBps,
  min: 0,
  max: Number.MAX_SAFE_INTEGER,
  currency,
});

describe('depositForModel', () => {
  // Worked by hand: 10 % of 85,000.00 = 8,500.00, inside the bounds.
  it('takes the percentage of the list value inside the bounds', () => {
    expect(depositForModel(usd('85000.00'), tenPercent)).toBe(usd('8500.00'));
  });

  // Worked by hand: 10 % of 1,200.00 = 120.00 → raised to min 500.00; of 450,000.00 = 45,000.00 →
  // cut to max 20,000.00.
  it('clamps to min and max', () => {
    expect(depositForModel(usd('1200.00'), tenPercent)).toBe(usd('500.00'));
    expect(depositForModel(usd('450000.00'), tenPercent)).toBe(usd('20000.00'));
  });

  // Worked by hand: 10 % of 5, 15, 25 minor units = 0.5, 1.5, 2.5 → half-up gives 1, 2, 3
  // (banker's rounding would give 0, 2, 2); 1.4 → 1, 0.4 → 0.
  it('rounds half-up to whole minor units', () => {
    expect([5, 15, 25, 14, 4].map((v) => depositForModel(v, open(1000)))).toEqual([1, 2, 3, 1, 0]);
    // 12.5 % (1250 bp) of 1 JPY = 0.125 → 0; of 4 JPY = 0.5 → 1.
    expect(depositForModel(1, open(1250, 'JPY'))).toBe(0);
    expect(depositForModel(4, open(1250, 'JPY'))).toBe(1);
  });

  it('stays exact where list value × basis points passes 2^53', () => {
    // 9,007,199,254,740,991 × 3333 / 10000 = 3,002,099,511,605,172.3... → 3,002,099,511,605,172.
    const exact = (BigInt(Number.MAX_SAFE_INTEGER) * 3333n * 2n + 10000n) / 20000n;
    expect(depositForModel(Number.MAX_SAFE_INTEGER, open(3333))).toBe(Number(exact));
  });

  it('refuses bad rules and list values with a clear message', () => {
    expect(() => depositForModel(100, { ...tenPercent, min: 10, max: 5 })).toThrow(
      /min \(10\) exceeds max \(5\)/,
    );
    expect(() => depositForModel(100, open(10001))).toThrow(/percentBps/);
    expect(() => depositForModel(100, open(12.5))).toThrow(/percentBps/);
    expect(() => depositForModel(100, { ...tenPercent, min: -1 })).toThrow(/min must be/);
    expect(() => depositForModel(-1, tenPercent)).toThrow(/must not be negative/);
    expect(() => depositForModel(10.5, tenPercent)).toThrow(/safe integer/);
    expect(() => depositForModel(100, open(100, 'QQQ'))).toThrow(/ISO 4217/);
  });

  const ruleArb = fc
    .record({
      percentBps: fc.integer({ min: 0, max: 10_000 }),
      a: fc.integer({ min: 0, max: 1e10 }),
      b: fc.integer({ min: 0, max: 1e10 }),
      currency: fc.constantFrom('USD', 'EUR', 'GBP', 'JPY', 'BHD', 'CHF'),
    })
    .map(({ percentBps, a, b, currency }): DepositRule => ({
      percentBps,
      min: Math.min(a, b),
      max: Math.max(a, b),
      currency,
    }));

  it('always returns an integer within [min, max] (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 1e13 }), ruleArb, (listValue, rule) => {
        const deposit = depositForModel(listValue, rule);
        expect(Number.isSafeInteger(deposit)).toBe(true);
        expect(deposit).toBeGreaterThanOrEqual(rule.min);
        expect(deposit).toBeLessThanOrEqual(rule.max);
      }),
    );
  });

  it('equals the clamped half-up share computed another way (property)', () => {
    fc.assert(
      fc.property(fc.maxSafeNat(), ruleArb, (listValue, rule) => {
        // Oracle: floor((2·v·bp + 10000) / 20000) is half-up rounding of v·bp/10000 for v ≥ 0.
        const share = Number(
          (2n * BigInt(listValue) * BigInt(rule.percentBps) + 10_000n) / 20_000n,
        );
        const expected = Math.min(Math.max(share, rule.min), rule.max);
        expect(depositForModel(listValue, rule)).toBe(expected);
      }),
    );
  });

  it('never decreases when the list value grows (property)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 1e12 }),
        fc.integer({ min: 0, max: 1e12 }),
        ruleArb,
        (x, y, rule) => {
          const [low, high] = x <= y ? [x, y] : [y, x];
          expect(depositForModel(low, rule)).toBeLessThanOrEqual(depositForModel(high, rule));
        },
      ),
    );
  });
});

describe('depositForLoan', () => {
  const platform: DepositRule = { ...tenPercent };
  const scope: DepositRule = {
    percentBps: 500,
    min: usd('250.00'),
    max: usd('5000.00'),
    currency: 'USD',
  };

  // Worked by hand: 8,500.00 + 5 % of 60,000.00 = 3,000.00 → 11,500.00.
  it('sums the per-unit deposits', () => {
    const result = depositForLoan([
      { unitId: 'u-1', listValue: usd('85000.00'), rule: platform },
      { unitId: 'u-2', listValue: usd('60000.00'), rule: scope },
    ]);
    expect(result).toEqual({
      waived: false,
      currency: 'USD',
      units: [
        { unitId: 'u-1', amount: usd('8500.00') },
        { unitId: 'u-2', amount: usd('3000.00') },
      ],
      subtotal: usd('11500.00'),
      amount: usd('11500.00'),
      providerMinimum: providerMinimumCharge('USD'),
      raisedToProviderMinimum: false,
    });
  });

  it('refuses units in mixed currencies with a message naming them', () => {
    expect(() =>
      depositForLoan([
        { unitId: 'u-1', listValue: 100, rule: platform },
        { unitId: 'u-2', listValue: 100, rule: { ...scope, currency: 'EUR' } },
      ]),
    ).toThrow(/must share one deposit currency, got USD, EUR/);
  });

  it('refuses an empty loan', () => {
    expect(() => depositForLoan([])).toThrow(DepositError);
  });

  it('waives the deposit under an approved credit agreement with a purchase order', () => {
    const units = [{ unitId: 'u-1', listValue: usd('85000.00'), rule: platform }];
    expect(
      depositForLoan(units, { hasApprovedCreditAgreement: true, purchaseOrderNumber: ' PO-4471 ' }),
    ).toEqual({ waived: true, purchaseOrderNumber: 'PO-4471' });
    expect(() => depositForLoan(units, { hasApprovedCreditAgreement: true })).toThrow(
      expect.objectContaining({ code: 'purchase_order_required' }),
    );
    expect(() =>
      depositForLoan(units, { hasApprovedCreditAgreement: true, purchaseOrderNumber: '  ' }),
    ).toThrow(/purchase order number/);
    // A purchase order alone, without an approved agreement, does not waive anything.
    expect(depositForLoan(units, { purchaseOrderNumber: 'PO-4471' }).waived).toBe(false);
  });

  // Provider minimums: docs/references.md "Money and payments" (secondary copy of the provider's
  // table): USD 0.50, JPY 50.
  it('raises a deposit below the provider minimum to that minimum', () => {
    const tiny = depositForLoan([{ unitId: 'u-1', listValue: 1000, rule: open(100) }]);
    expect(tiny).toMatchObject({
      subtotal: 10,
      amount: usd('0.50'),
      raisedToProviderMinimum: true,
    });
    const yen = depositForLoan([{ unitId: 'u-1', listValue: 4000, rule: open(100, 'JPY') }]);
    expect(yen).toMatchObject({ subtotal: 40, amount: toMinor('50', 'JPY') });
  });

  it('leaves a zero deposit at zero and applies no floor where the minimum is unknown', () => {
    expect(depositForLoan([{ unitId: 'u-1', listValue: 1000, rule: open(0) }])).toMatchObject({
      subtotal: 0,
      amount: 0,
      raisedToProviderMinimum: false,
    });
    expect(
      depositForLoan([{ unitId: 'u-1', listValue: 1000, rule: open(100, 'CHF') }]),
    ).toMatchObject({ subtotal: 10, amount: 10, providerMinimum: null });
  });

  const unitsArb = fc.tuple(
    fc.constantFrom('USD', 'EUR', 'GBP', 'JPY', 'CHF'),
    fc.array(
      fc.record({
        listValue: fc.integer({ min: 0, max: 1e12 }),
        percentBps: fc.integer({ min: 0, max: 10_000 }),
        a: fc.integer({ min: 0, max: 1e9 }),
        b: fc.integer({ min: 0, max: 1e9 }),
      }),
      { minLength: 1, maxLength: 12 },
    ),
  );

  it('sums to the per-model deposits and only ever raises to the provider minimum (property)', () => {
    fc.assert(
      fc.property(unitsArb, ([currency, rows]) => {
        const units = rows.map((r, i) => ({
          unitId: `u-${i}`,
          listValue: r.listValue,
          rule: {
            percentBps: r.percentBps,
            min: Math.min(r.a, r.b),
            max: Math.max(r.a, r.b),
            currency,
          },
        }));
        const result = depositForLoan(units);
        if (result.waived) throw new Error('not waived without an agreement');
        const perModel = units.map((u) => depositForModel(u.listValue, u.rule));
        expect(result.units.map((u) => u.amount)).toEqual(perModel);
        expect(result.subtotal).toBe(perModel.reduce((s, v) => s + v, 0));
        expect(Number.isSafeInteger(result.amount)).toBe(true);
        const floor = providerMinimumCharge(currency);
        const expectedAmount =
          floor !== null && result.subtotal > 0
            ? Math.max(result.subtotal, floor)
            : result.subtotal;
        expect(result.amount).toBe(expectedAmount);
        expect(result.raisedToProviderMinimum).toBe(result.amount !== result.subtotal);
      }),
    );
  });
});
