import fc from 'fast-check';
import {
  DEFAULT_SCHEDULING_SETTINGS,
  addCalendarDays,
  earliestFeasibleWindow,
  intervalsOverlap,
} from '@evalon/scheduling';
import type { CandidateUnit } from '../data-access/availability-repository';
import { earliestShift, overlaps } from './engine';
import { PlannerCache } from './planner-cache';

// The search's fast paths are checked against the scheduling package they stand in for, on
// random inputs (fast-check): the overlap rule against `intervalsOverlap`, and the
// earliest-window search with its jumps against `earliestFeasibleWindow`, which tries every day.

const day = (offset: number) => addCalendarDays('2027-01-01', offset);
const interval = fc
  .tuple(fc.integer({ min: 0, max: 400 }), fc.integer({ min: 0, max: 40 }))
  .map(([start, length]) => ({ start: day(start), end: day(start + length) }));

describe('overlaps', () => {
  it('agrees with intervalsOverlap of @evalon/scheduling', () => {
    fc.assert(
      fc.property(interval, interval, (a, b) => {
        expect(overlaps(a.start, a.end, b)).toBe(intervalsOverlap(a, b));
      }),
      { numRuns: 2_000 },
    );
  });
});

describe('earliestShift', () => {
  // Invented places: a New Jersey-like depot and a Chicago-like campus (about 1,100 km apart).
  const depot = {
    id: 1,
    name: 'East',
    latitude: 40.5186,
    longitude: -74.3479,
    country: 'US',
    timeZone: 'America/New_York',
    cutoffTime: '15:00',
  };
  const site = {
    id: 2,
    latitude: 41.8562,
    longitude: -87.6198,
    country: 'US',
    timeZone: 'America/Chicago',
  };
  const unit = { unitId: 1, depot } as CandidateUnit;
  // Close to the first case day, so the first shifts are too late for the cut-off.
  const now = new Date('2027-01-04T18:00:00Z');

  it('finds the same earliest window as earliestFeasibleWindow, holds and cut-off included', () => {
    const plans = new PlannerCache();
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 40 }),
        fc.integer({ min: 0, max: 6 }),
        fc.boolean(),
        fc.array(interval, { maxLength: 12 }),
        (startOffset, length, firstLoan, holds) => {
          const useFrom = day(startOffset);
          const useTo = addCalendarDays(useFrom, length);
          const horizonDays = 120;
          const plan = plans.plan({
            depot,
            site,
            lenderId: 9,
            settingsVersion: 'd',
            settings: DEFAULT_SCHEDULING_SETTINGS,
            firstLoanOfModel: firstLoan,
            useFrom,
            useTo,
          });
          const held = holds.map((h, i) => ({
            ...h,
            id: i,
            unitId: 1,
            kind: 'loan' as const,
            loanId: i,
            hospitalId: 1,
          }));
          const m0 = plan.milestones(0);
          const fitsAtOnce =
            !plans.cutoffPassed(depot, m0.shipBy, now) &&
            !held.some((h) => overlaps(m0.shipBy, m0.readyAgain, h));
          const ours = fitsAtOnce
            ? 0
            : earliestShift(plan, unit, held, { now, horizonDays, useFrom, plans });
          const reference = earliestFeasibleWindow(
            {
              useFrom,
              useTo,
              depot: {
                lat: depot.latitude,
                lng: depot.longitude,
                country: 'US',
                timeZone: depot.timeZone,
                cutoffTime: '15:00',
              },
              hospital: {
                lat: site.latitude,
                lng: site.longitude,
                country: 'US',
                timeZone: site.timeZone,
              },
              firstLoanOfModel: firstLoan,
              now,
            },
            holds,
            horizonDays,
          );
          expect(ours).toBe(reference?.shiftDays ?? null);
        },
      ),
      { numRuns: 200 },
    );
  });
});
