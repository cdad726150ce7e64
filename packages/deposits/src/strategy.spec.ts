import fc from 'fast-check';

import { CARD_AUTHORISATION_WINDOW_MS, chooseStrategy } from './strategy';

const DAY = 24 * 60 * 60 * 1000;
const now = new Date('2027-03-01T12:00:00Z');
const after = (ms: number) => new Date(now.getTime() + ms);

describe('CARD_AUTHORISATION_WINDOW_MS', () => {
  // Source: payment provider's documentation, docs/references.md "Money and payments": online card
  // authorisations stay valid 7 days.
  it('is 7 days', () => {
    expect(CARD_AUTHORISATION_WINDOW_MS / DAY).toBe(7);
  });
});

describe('chooseStrategy', () => {
  // Source: 7-day authorisation window (docs/references.md "Money and payments").
  it('holds the card for a 6-day footprint starting now', () => {
    expect(chooseStrategy({ footprintStart: now, footprintEnd: after(6 * DAY), now })).toBe(
      'authorise_hold',
    );
  });

  it('charges now for an 8-day footprint', () => {
    expect(chooseStrategy({ footprintStart: now, footprintEnd: after(8 * DAY), now })).toBe(
      'charge_now_refund_later',
    );
  });

  // Our decision (documented on chooseStrategy): at exactly 7 days the hold is expiring, so charge.
  it('charges now at exactly 7 days, and holds one millisecond earlier', () => {
    expect(chooseStrategy({ footprintStart: now, footprintEnd: after(7 * DAY), now })).toBe(
      'charge_now_refund_later',
    );
    expect(chooseStrategy({ footprintStart: now, footprintEnd: after(7 * DAY - 1), now })).toBe(
      'authorise_hold',
    );
  });

  it('counts from now, not from the footprint start', () => {
    // A 5-day footprint that starts in 3 days ends 8 days from now: the hold would lapse.
    expect(
      chooseStrategy({ footprintStart: after(3 * DAY), footprintEnd: after(8 * DAY), now }),
    ).toBe('charge_now_refund_later');
  });

  // Source: docs/references.md: merchant-initiated on one network, 4 days 18 h.
  it('takes a shorter window when given one', () => {
    const windowMs = 4 * DAY + 18 * 60 * 60 * 1000;
    const input = { footprintStart: now, footprintEnd: after(5 * DAY), now };
    expect(chooseStrategy(input)).toBe('authorise_hold');
    expect(chooseStrategy({ ...input, windowMs })).toBe('charge_now_refund_later');
  });

  it('accepts ISO strings with an offset and refuses ones without', () => {
    const input = {
      footprintStart: '2027-03-01T08:00:00-05:00',
      footprintEnd: '2027-03-07T23:59:59.999+01:00',
      now: '2027-03-01T13:00:00Z',
    };
    expect(chooseStrategy(input)).toBe('authorise_hold');
    expect(() => chooseStrategy({ ...input, now: '2027-03-01T13:00:00' })).toThrow(/offset/);
    expect(() => chooseStrategy({ ...input, now: new Date('nonsense') })).toThrow(/valid Date/);
  });

  it('refuses a footprint that ends before it starts or has already ended', () => {
    expect(() =>
      chooseStrategy({ footprintStart: after(2 * DAY), footprintEnd: after(DAY), now }),
    ).toThrow(/ends .* before it starts/);
    expect(() =>
      chooseStrategy({ footprintStart: after(-3 * DAY), footprintEnd: now, now }),
    ).toThrow(/already ended/);
  });

  it('holds exactly when the span from now to the end is shorter than the window (property)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 30 * DAY }),
        fc.integer({ min: 0, max: 30 * DAY }),
        (toEnd, footprintLength) => {
          const end = after(toEnd);
          const start = new Date(end.getTime() - footprintLength);
          const strategy = chooseStrategy({ footprintStart: start, footprintEnd: end, now });
          expect(strategy).toBe(toEnd < 7 * DAY ? 'authorise_hold' : 'charge_now_refund_later');
        },
      ),
    );
  });
});
