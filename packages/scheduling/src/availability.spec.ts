import fc from 'fast-check';

import {
  allFeasible,
  checkFeasibility,
  earliestFeasibleWindow,
  earliestFeasibleWindowForAll,
  intervalsOverlap,
  isFeasible,
  windowLengthDays,
} from './availability';
import { DateInterval, DepotSiteInput, FootprintInput, computeFootprint } from './footprint';
import { RUNS, depotArb, footprintInputArb, oraclePlusDays } from './test-support';

const bostonAreaDepot: DepotSiteInput = {
  lat: 42.36,
  lng: -71.06,
  country: 'US',
  timeZone: 'America/New_York',
  cutoffTime: '17:00',
};
// Hand-derived in footprint.spec.ts: this request's hold is [2027-06-29, 2027-07-19].
const request: FootprintInput = {
  useFrom: '2027-07-07',
  useTo: '2027-07-09',
  depot: bostonAreaDepot,
  hospital: { lat: 41.88, lng: -87.63, country: 'US', timeZone: 'America/Chicago' },
  firstLoanOfModel: false,
};

/** Independent overlap test on epoch milliseconds (not string comparison). */
function overlapsByTime(a: DateInterval, b: DateInterval): boolean {
  return Date.parse(a.start) <= Date.parse(b.end) && Date.parse(b.start) <= Date.parse(a.end);
}

describe('intervalsOverlap', () => {
  it.each([
    [{ start: '2027-01-01', end: '2027-01-03' }, { start: '2027-01-03', end: '2027-01-05' }, true],
    [{ start: '2027-01-01', end: '2027-01-03' }, { start: '2027-01-04', end: '2027-01-05' }, false],
    [{ start: '2027-01-01', end: '2027-01-31' }, { start: '2027-01-10', end: '2027-01-10' }, true],
    [{ start: '2027-12-31', end: '2028-01-02' }, { start: '2027-06-01', end: '2027-12-30' }, false],
  ])('%j and %j → %s', (a, b, expected) => {
    expect(intervalsOverlap(a, b)).toBe(expected);
    expect(intervalsOverlap(b, a)).toBe(expected);
  });

  it('rejects an interval that ends before it starts', () => {
    const bad = { start: '2027-01-05', end: '2027-01-01' };
    expect(() => intervalsOverlap(bad, bad)).toThrow(RangeError);
  });
});

describe('isFeasible', () => {
  const footprint = computeFootprint(request);

  it.each([
    [{ start: '2027-07-19', end: '2027-07-25' }, false], // touches readyAgain
    [{ start: '2027-07-20', end: '2027-07-25' }, true],
    [{ start: '2027-06-20', end: '2027-06-28' }, true],
    [{ start: '2027-06-20', end: '2027-06-29' }, false], // touches shipBy
    [{ start: '2027-07-01', end: '2027-07-02' }, false], // inside
  ])('against hold %j → %s', (hold, feasible) => {
    expect(isFeasible(footprint, [hold])).toBe(feasible);
  });

  it('lists the conflicting holds and the passed cut-off', () => {
    const holds = [
      { start: '2027-05-01', end: '2027-05-02', id: 'maintenance' },
      { start: '2027-07-10', end: '2027-07-12', id: 'other loan' },
    ];
    expect(checkFeasibility(footprint, holds).conflicts.map((h) => h.id)).toEqual(['other loan']);
    const late = computeFootprint({ ...request, now: '2027-06-29T21:00:00Z' });
    expect(checkFeasibility(late, [])).toEqual({
      feasible: false,
      shipByPassed: true,
      conflicts: [],
    });
  });
});

describe('earliestFeasibleWindow, examples', () => {
  it('returns the requested window when it fits', () => {
    const found = earliestFeasibleWindow(request, []);
    expect(found).toMatchObject({ useFrom: '2027-07-07', useTo: '2027-07-09', shiftDays: 0 });
  });

  it('moves past a maintenance hold (hand-derived)', () => {
    // Hold until Thu Jul 1 → shipBy must be Fri Jul 2 or later. With 3 transit days shipBy
    // Jul 2 means deliverBy Thu Jul 8 (Jul 6, 7, 8; Jul 5 observed holiday, 5 U.S.C. 6103).
    // useFrom Fri Jul 9 gives deliverBy Wed Jul 7 → shipBy Thu Jul 1 (conflict); Sat Jul 10 gives
    // deliverBy Thu Jul 8 (Fri 9, Thu 8) → shipBy Fri Jul 2. So useFrom Jul 10, 3 days later.
    const found = earliestFeasibleWindow(request, [{ start: '2027-06-20', end: '2027-07-01' }]);
    expect(found).toMatchObject({ useFrom: '2027-07-10', useTo: '2027-07-12', shiftDays: 3 });
    expect(found!.footprint.milestones.shipBy).toBe('2027-07-02');
  });

  it('moves past a cut-off that has passed (hand-derived)', () => {
    // now = 17:00 EDT on Tue Jun 29, the cut-off of the requested shipBy. useFrom Thu Jul 8:
    // deliverBy Tue Jul 6 (Wed 7, Tue 6), shipBy Wed Jun 30 (Jul 2, Jul 1, Jun 30) → fits.
    const found = earliestFeasibleWindow({ ...request, now: '2027-06-29T21:00:00Z' }, []);
    expect(found).toMatchObject({ useFrom: '2027-07-08', useTo: '2027-07-10', shiftDays: 1 });
  });

  it('returns null when nothing fits within the horizon', () => {
    const holds = [{ start: '2027-06-01', end: '2027-12-31' }];
    expect(earliestFeasibleWindow(request, holds, 30)).toBeNull();
  });

  it('keeps the window length', () => {
    const found = earliestFeasibleWindow(request, [{ start: '2027-06-20', end: '2027-07-01' }]);
    expect(windowLengthDays(found!.useFrom, found!.useTo)).toBe(3);
  });
});

describe('several units (all-or-nothing)', () => {
  const unitA = { input: request, holds: [{ start: '2027-06-20', end: '2027-07-01' }] };
  const unitB = { input: request, holds: [{ start: '2027-06-20', end: '2027-07-02' }] };
  const free = { input: request, holds: [] };

  it('is feasible only when every unit fits', () => {
    expect(allFeasible([free, free]).feasible).toBe(true);
    const result = allFeasible([free, unitA]);
    expect(result.feasible).toBe(false);
    expect(result.units.map((u) => u.feasible)).toEqual([true, false]);
    expect(result.units[1]!.conflicts).toEqual(unitA.holds);
    expect(() => allFeasible([])).toThrow(RangeError);
  });

  it('finds the earliest window in which all units fit (hand-derived)', () => {
    // Unit A alone: useFrom Jul 10 (previous example). Unit B's hold runs to Fri Jul 2, so its
    // shipBy must be Tue Jul 6 (Jul 5 is a holiday): deliverBy Fri Jul 9 (Jul 7, 8, 9) and the
    // first useFrom with deliverBy Jul 9 is Tue Jul 13 (Mon 12, Fri 9); Jul 10–12 give Jul 8.
    expect(earliestFeasibleWindow(unitB.input, unitB.holds)?.useFrom).toBe('2027-07-13');
    const both = earliestFeasibleWindowForAll([unitA, unitB]);
    expect(both).toMatchObject({ useFrom: '2027-07-13', useTo: '2027-07-15', shiftDays: 6 });
    expect(both!.footprints).toHaveLength(2);
  });

  it('requires one shared use window', () => {
    const other = { input: { ...request, useTo: '2027-07-10' }, holds: [] };
    expect(() => earliestFeasibleWindowForAll([free, other])).toThrow(/share one use window/);
  });
});

describe('availability, properties', () => {
  // Windows within about four months so that random requests on one unit often collide.
  const nearDateArb = fc.integer({ min: 0, max: 120 }).map((d) => oraclePlusDays('2027-01-01', d));
  const nearInputArb = fc
    .tuple(footprintInputArb, nearDateArb)
    .map(([input, useFrom]): FootprintInput => {
      const length = Date.parse(input.useTo) - Date.parse(input.useFrom);
      return {
        ...input,
        useFrom,
        useTo: oraclePlusDays(useFrom, Math.round(length / 86_400_000)),
      };
    });

  it('never lets greedily accepted footprints on one unit overlap', () => {
    fc.assert(
      fc.property(
        depotArb,
        fc.array(nearInputArb, { minLength: 1, maxLength: 12 }),
        (depot, requests) => {
          const accepted: DateInterval[] = [];
          for (const input of requests) {
            const footprint = computeFootprint({ ...input, depot });
            if (isFeasible(footprint, accepted)) accepted.push(footprint.hold);
            else expect(accepted.some((h) => overlapsByTime(h, footprint.hold))).toBe(true);
          }
          expect(accepted.length).toBeGreaterThanOrEqual(1);
          for (let i = 0; i < accepted.length; i += 1) {
            for (let j = i + 1; j < accepted.length; j += 1) {
              expect(overlapsByTime(accepted[i]!, accepted[j]!)).toBe(false);
            }
          }
        },
      ),
      { numRuns: RUNS },
    );
  });

  it('returns a feasible window, and no earlier start within the horizon is feasible', () => {
    const horizon = 30;
    const holdArb = fc
      .tuple(fc.integer({ min: -20, max: 160 }), fc.integer({ min: 0, max: 25 }))
      .map(([start, length]) => ({
        start: oraclePlusDays('2027-01-01', start),
        end: oraclePlusDays('2027-01-01', start + length),
      }));
    const nowArb = fc.option(
      fc
        .integer({ min: -30 * 24, max: 140 * 24 })
        .map((h) => new Date(Date.UTC(2027, 0, 1) + h * 3_600_000)),
      { nil: undefined },
    );
    /** Independent feasibility: own overlap test and own cut-off comparison. */
    const fits = (input: FootprintInput, holds: DateInterval[]): boolean => {
      const fp = computeFootprint(input);
      const passed = input.now !== undefined && Number(input.now) >= Date.parse(fp.shipByCutoff);
      return !passed && holds.every((h) => !overlapsByTime(h, fp.hold));
    };
    fc.assert(
      fc.property(nearInputArb, fc.array(holdArb, { maxLength: 4 }), nowArb, (base, holds, now) => {
        const input = { ...base, now };
        const shiftedBy = (days: number): FootprintInput => ({
          ...input,
          useFrom: oraclePlusDays(input.useFrom, days),
          useTo: oraclePlusDays(input.useTo, days),
        });
        const found = earliestFeasibleWindow(input, holds, horizon);
        const limit = found ? found.shiftDays : horizon + 1;
        for (let shift = 0; shift < limit; shift += 1) {
          expect(fits(shiftedBy(shift), holds)).toBe(false);
        }
        if (found) {
          expect(found.shiftDays).toBeLessThanOrEqual(horizon);
          expect(found.useFrom).toBe(oraclePlusDays(input.useFrom, found.shiftDays));
          expect(found.useTo).toBe(oraclePlusDays(input.useTo, found.shiftDays));
          expect(fits(shiftedBy(found.shiftDays), holds)).toBe(true);
          expect(isFeasible(found.footprint, holds)).toBe(true);
        }
      }),
      { numRuns: RUNS },
    );
  });
});
