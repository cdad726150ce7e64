import fc from 'fast-check';

import { toMinor } from './money';
import { settle, settleHold, type Charge } from './settlement';

const usd = (major: string) => toMinor(major, 'USD');

describe('settle (charged now, refunded later)', () => {
  // Worked by hand: 1,000.00 paid, charges 300.00 + 200.00 → keep 500.00, refund 500.00.
  it('deducts charges within the deposit and refunds the rest', () => {
    const result = settle({
      paid: usd('1000.00'),
      charges: [
        { reason: 'missing trocar cap', amount: usd('300.00') },
        { reason: 'extra reprocessing cycle', amount: usd('200.00') },
      ],
    });
    expect(result).toMatchObject({ deducted: usd('500.00'), refund: usd('500.00'), uncovered: 0 });
  });

  // Worked by hand: 1,000.00 paid, charges 1,200.00 + 300.00 → keep 1,000.00, refund 0, and
  // 500.00 to invoice: the first charge is met fully, the second not at all.
  it('never deducts more than was paid and reports the rest as uncovered', () => {
    const result = settle({
      paid: usd('1000.00'),
      charges: [
        { reason: 'cracked housing', amount: usd('1200.00') },
        { reason: 'bent instrument tip', amount: usd('300.00') },
      ],
    });
    expect(result.deducted).toBe(usd('1000.00'));
    expect(result.refund).toBe(0);
    expect(result.uncovered).toBe(usd('500.00'));
    expect(result.allocations.map((a) => [a.deducted, a.uncovered])).toEqual([
      [usd('1000.00'), usd('200.00')],
      [0, usd('300.00')],
    ]);
  });

  it('refunds everything when nothing is charged', () => {
    expect(settle({ paid: 4200, charges: [] })).toEqual({
      deducted: 0,
      refund: 4200,
      uncovered: 0,
      allocations: [],
    });
  });

  it('refuses negative, fractional or unexplained charges', () => {
    expect(() => settle({ paid: 100, charges: [{ reason: 'credit', amount: -5 }] })).toThrow(
      /must not be negative/,
    );
    expect(() => settle({ paid: 100, charges: [{ reason: 'x', amount: 0.5 }] })).toThrow(
      /safe integer/,
    );
    expect(() => settle({ paid: 100, charges: [{ reason: ' ', amount: 5 }] })).toThrow(/reason/);
    expect(() => settle({ paid: -1, charges: [] })).toThrow(/must not be negative/);
  });
});

describe('settleHold (authorisation captured at settlement)', () => {
  // Worked by hand: 800.00 held, 150.00 charged → capture 150.00, release 650.00.
  it('captures the charges and releases the rest', () => {
    expect(
      settleHold({
        authorised: usd('800.00'),
        charges: [{ reason: 'seal kit', amount: usd('150.00') }],
      }),
    ).toMatchObject({
      capture: usd('150.00'),
      release: usd('650.00'),
      uncovered: 0,
      cancelAuthorisation: false,
    });
  });

  it('captures at most the authorised amount', () => {
    expect(
      settleHold({
        authorised: usd('800.00'),
        charges: [{ reason: 'lost unit', amount: usd('9000.00') }],
      }),
    ).toMatchObject({ capture: usd('800.00'), release: 0, uncovered: usd('8200.00') });
  });

  it('cancels instead of capturing when nothing is owed', () => {
    expect(settleHold({ authorised: usd('800.00'), charges: [] })).toMatchObject({
      capture: 0,
      release: usd('800.00'),
      cancelAuthorisation: true,
    });
  });
});

const chargesArb = fc.array(
  fc.record({
    reason: fc.constantFrom('scratch', 'missing part', 'late return', 'reprocessing'),
    amount: fc.integer({ min: 0, max: 1e12 }),
  }),
  { maxLength: 15 },
);
const total = (charges: Charge[]) => charges.reduce((s, c) => s + c.amount, 0);

describe('settlement properties', () => {
  it('settle: refund ≤ paid, deducted + refund = paid, deducted + uncovered = charges, integers', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 1e13 }), chargesArb, (paid, charges) => {
        const r = settle({ paid, charges });
        expect(r.refund).toBeLessThanOrEqual(paid);
        expect(r.deducted).toBeLessThanOrEqual(paid);
        expect(r.refund).toBeGreaterThanOrEqual(0);
        expect(r.deducted + r.refund).toBe(paid);
        expect(r.deducted + r.uncovered).toBe(total(charges));
        expect(r.deducted).toBe(Math.min(paid, total(charges)));
        for (const v of [r.deducted, r.refund, r.uncovered])
          expect(Number.isSafeInteger(v)).toBe(true);
        expect(r.allocations.reduce((s, a) => s + a.deducted, 0)).toBe(r.deducted);
        expect(r.allocations.reduce((s, a) => s + a.uncovered, 0)).toBe(r.uncovered);
      }),
    );
  });

  it('settleHold: capture ≤ authorised, capture + release = authorised, integers', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 1e13 }), chargesArb, (authorised, charges) => {
        const r = settleHold({ authorised, charges });
        expect(r.capture).toBeLessThanOrEqual(authorised);
        expect(r.capture + r.release).toBe(authorised);
        expect(r.capture + r.uncovered).toBe(total(charges));
        expect(r.cancelAuthorisation).toBe(r.capture === 0);
        for (const v of [r.capture, r.release, r.uncovered])
          expect(Number.isSafeInteger(v)).toBe(true);
      }),
    );
  });
});
