import { DepositError } from '@evalon/deposits';
import { greatCircleDistanceKm } from '@evalon/scheduling';
import fc from 'fast-check';
import { DateTime } from 'luxon';

import { estimateFee, planTravel } from './plan';
import { JFK_CAMPUS, LAX, RUNS, daysInclusive, plusDays } from './test-support';

describe('planTravel: distance and travel days', () => {
  const visit = { from: '2027-06-08', to: '2027-06-10' };

  it('gives a proctor at LAX travel days for a campus at JFK (3,972.86 km)', () => {
    // Aviation Formulary (E. Williams) worked example LAX 33°57′N 118°24′W → JFK 40°38′N 73°47′W:
    // 0.623585 rad; with the IUGG mean radius 6,371.0088 km that is 3,972.86 km (derived, as in
    // docs/references.md). Shown to 0.1 km: 3,972.9 km, beyond the 500 km threshold.
    const plan = planTravel(LAX, JFK_CAMPUS, visit, 500);
    expect(Math.abs(plan.distanceKm - 3972.86)).toBeLessThanOrEqual(0.05);
    expect(plan.distanceKm).toBe(3972.9);
    expect(plan).toMatchObject({
      travelDays: 2,
      visitDays: 3,
      footprint: { from: '2027-06-07', to: '2027-06-11' },
    });
  });

  it('puts the threshold on the shown distance: at most the threshold means same-day travel', () => {
    // Thresholds just below and at the LAX–JFK distance (3,972.9 km shown).
    expect(planTravel(LAX, JFK_CAMPUS, visit, 3972.8).travelDays).toBe(2);
    expect(planTravel(LAX, JFK_CAMPUS, visit, 3972.9)).toMatchObject({
      travelDays: 0,
      footprint: visit,
    });
  });

  it('uses the scheduling package’s distance, rounded to 0.1 km', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -80, max: 80, noNaN: true }),
        fc.double({ min: -179, max: 179, noNaN: true }),
        fc.integer({ min: 0, max: 2000 }),
        (lat, lng, threshold) => {
          const plan = planTravel({ lat, lng }, JFK_CAMPUS, visit, threshold);
          const km = greatCircleDistanceKm({ lat, lng }, JFK_CAMPUS);
          expect(Math.abs(plan.distanceKm - km)).toBeLessThanOrEqual(0.05 + 1e-9);
          expect(plan.travelDays).toBe(plan.distanceKm > threshold ? 2 : 0);
          expect(daysInclusive(plan.footprint.from, plan.footprint.to)).toBe(3 + plan.travelDays);
        },
      ),
      { numRuns: RUNS },
    );
  });

  it.each([
    // DST 2027 (docs/references.md): New York springs forward 2027-03-14 07:00Z, falls back
    // 2027-11-07 06:00Z; Berlin springs forward 2027-03-28 01:00Z.
    ['America/New_York', '2027-03-12', '2027-03-16', 119],
    ['America/New_York', '2027-11-05', '2027-11-09', 121],
    ['Europe/Berlin', '2027-03-26', '2027-03-30', 119],
  ])('counts calendar days in %s across the change (%s – %s)', (zone, from, to, hours) => {
    // The visit really holds a 23- or 25-hour day ...
    const elapsed = DateTime.fromISO(`${plusDays(to, 1)}T00:00`, { zone })
      .diff(DateTime.fromISO(`${from}T00:00`, { zone }), 'hours')
      .as('hours');
    expect(elapsed).toBe(hours);
    // ... yet it is 5 visit days and the travel days are whole calendar days either side.
    const plan = planTravel(LAX, { ...JFK_CAMPUS }, { from, to }, 500);
    expect(plan.visitDays).toBe(5);
    expect(plan.footprint).toEqual({ from: plusDays(from, -1), to: plusDays(to, 1) });
  });

  it('rejects a visit that ends before it starts and a bad threshold', () => {
    expect(() =>
      planTravel(LAX, JFK_CAMPUS, { from: '2027-06-10', to: '2027-06-08' }, 500),
    ).toThrow(RangeError);
    expect(() => planTravel(LAX, JFK_CAMPUS, visit, -1)).toThrow(RangeError);
  });
});

describe('estimateFee', () => {
  const rates = {
    dayRate: { amount: 200_000, currency: 'USD' },
    travelDayRate: { amount: 75_000, currency: 'USD' },
  };

  it('is day rate × visit days + travel-day rate × travel days, in minor units', () => {
    // 3 × USD 2,000.00 + 2 × USD 750.00 = USD 7,500.00 = 750,000 cents (amounts in the smallest
    // currency unit, as in the payment provider's documentation: 1000 = 10.00 USD).
    expect(estimateFee(rates, 3, 2)).toEqual({ amount: 750_000, currency: 'USD' });
    expect(estimateFee(rates, 1, 0)).toEqual({ amount: 200_000, currency: 'USD' });
    // A zero-decimal currency (ISO 4217 exponent 0): 10 = 10 JPY.
    const yen = {
      dayRate: { amount: 150_000, currency: 'JPY' },
      travelDayRate: { amount: 40_000, currency: 'JPY' },
    };
    expect(estimateFee(yen, 2, 2)).toEqual({ amount: 380_000, currency: 'JPY' });
  });

  it('refuses mixed currencies, fractions, negative amounts and unknown currencies', () => {
    expect(() =>
      estimateFee({ ...rates, travelDayRate: { amount: 1, currency: 'EUR' } }, 1, 0),
    ).toThrow(/USD but travelDayRate in EUR/);
    expect(() =>
      estimateFee({ ...rates, dayRate: { amount: 1.5, currency: 'USD' } }, 1, 0),
    ).toThrow(DepositError);
    expect(() => estimateFee({ ...rates, dayRate: { amount: -1, currency: 'USD' } }, 1, 0)).toThrow(
      DepositError,
    );
    expect(() =>
      estimateFee(
        { dayRate: { amount: 1, currency: 'ZZZ' }, travelDayRate: { amount: 1, currency: 'ZZZ' } },
        1,
        0,
      ),
    ).toThrow(DepositError);
    expect(() => estimateFee(rates, 1.5, 0)).toThrow(RangeError);
    expect(() =>
      estimateFee(
        { ...rates, dayRate: { amount: Number.MAX_SAFE_INTEGER, currency: 'USD' } },
        2,
        0,
      ),
    ).toThrow(DepositError);
  });

  it('is monotonic in visit days and travel days, and exact', () => {
    const amount = fc.integer({ min: 0, max: 10_000_000 });
    const days = fc.integer({ min: 0, max: 60 });
    fc.assert(
      fc.property(amount, amount, days, days, (day, travel, v, t) => {
        const r = {
          dayRate: { amount: day, currency: 'EUR' },
          travelDayRate: { amount: travel, currency: 'EUR' },
        };
        const fee = estimateFee(r, v, t).amount;
        expect(Number.isSafeInteger(fee)).toBe(true);
        expect(fee).toBe(day * v + travel * t);
        expect(estimateFee(r, v + 1, t).amount).toBeGreaterThanOrEqual(fee);
        expect(estimateFee(r, v, t + 1).amount).toBeGreaterThanOrEqual(fee);
      }),
      { numRuns: RUNS },
    );
  });
});
