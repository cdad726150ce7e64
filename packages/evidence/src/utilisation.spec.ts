import {
  dayIndex,
  footprintSegments,
  unitDays,
  utilisationOf,
  weeklyBusyShares,
} from './utilisation';

/*
 * A hand-worked example (worked on paper, not from an outside source). Period 1–14 March 2027,
 * 14 days. One loan: ships 2 Mar, delivered 4 Mar, ships back 9 Mar, back at the depot 11 Mar,
 * ready again 13 Mar. So: transit 2–3 (2 days), hospital 4–8 (5), transit 9–10 (2),
 * reprocessing 11–12 (2). A maintenance hold 12–13 Mar wins over reprocessing on the 12th.
 * Idle: 1 and 14 Mar (2 days). Totals: hospital 5, transit 4, reprocessing 1, maintenance 2,
 * idle 2 = 14.
 */
const loan = {
  shipBy: '2027-03-02',
  deliverBy: '2027-03-04',
  returnShipBy: '2027-03-09',
  backAtDepot: '2027-03-11',
  readyAgain: '2027-03-13',
};

describe('utilisation', () => {
  it('turns a loan footprint into day segments', () => {
    expect(footprintSegments(loan)).toEqual([
      { state: 'in_transit', from: '2027-03-02', to: '2027-03-03' },
      { state: 'at_hospital', from: '2027-03-04', to: '2027-03-08' },
      { state: 'in_transit', from: '2027-03-09', to: '2027-03-10' },
      { state: 'reprocessing', from: '2027-03-11', to: '2027-03-12' },
    ]);
  });

  it('counts the hand-worked example', () => {
    const segments = [
      ...footprintSegments(loan),
      { state: 'maintenance' as const, from: '2027-03-12', to: '2027-03-13' },
    ];
    const days = unitDays(segments, '2027-03-01', '2027-03-14');
    expect(days).toHaveLength(14);
    const u = utilisationOf(days);
    expect(u.counts).toEqual({
      at_hospital: 5,
      in_transit: 4,
      reprocessing: 1,
      maintenance: 2,
      idle: 2,
    });
    expect(u.shares.at_hospital).toBeCloseTo(5 / 14, 10);
    expect(Object.values(u.shares).reduce((a, b) => a + b, 0)).toBeCloseTo(1, 10);
    // Week 1 (1–7 Mar): 6 of 7 busy; week 2 (8–14 Mar): 6 of 7 busy (14 Mar idle).
    expect(weeklyBusyShares(days)).toEqual([6 / 7, 6 / 7]);
  });

  it('clips segments to the period and crosses month and leap-day boundaries', () => {
    // 2028 is a leap year: 28 Feb, 29 Feb, 1 Mar are three consecutive days.
    expect(dayIndex('2028-03-01') - dayIndex('2028-02-28')).toBe(2);
    const days = unitDays(
      [{ state: 'at_hospital', from: '2028-02-20', to: '2028-02-29' }],
      '2028-02-28',
      '2028-03-02',
    );
    expect(days).toEqual(['at_hospital', 'at_hospital', 'idle', 'idle']);
    expect(() => unitDays([], '2028-03-02', '2028-03-01')).toThrow(/ends/);
  });
});
