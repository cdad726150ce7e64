import fc from 'fast-check';
import { DateTime } from 'luxon';

import {
  DepotSiteInput,
  HospitalSiteInput,
  computeFootprint,
  createFootprintPlanner,
} from './footprint';
import { shipmentEta } from './shipments';
import {
  RUNS,
  footprintInputArb,
  oracleCountClosedOpen,
  oracleCountOpenClosed,
  oracleIsBusinessDay,
  oraclePlusDays,
} from './test-support';

// Invented sites; coordinates are those of the cities, nothing else is real.
const bostonAreaDepot: DepotSiteInput = {
  lat: 42.36,
  lng: -71.06,
  country: 'US',
  timeZone: 'America/New_York',
  cutoffTime: '17:00',
};
const chicagoHospital: HospitalSiteInput = {
  lat: 41.88,
  lng: -87.63,
  country: 'US',
  timeZone: 'America/Chicago',
};
const frankfurtAreaDepot: DepotSiteInput = {
  lat: 50.11,
  lng: 8.68,
  country: 'DE',
  timeZone: 'Europe/Berlin',
  cutoffTime: '16:00',
};
const philadelphiaHospital: HospitalSiteInput = {
  lat: 39.95,
  lng: -75.17,
  country: 'US',
  timeZone: 'America/New_York',
};

describe('computeFootprint, worked examples', () => {
  it('Boston-area depot to a Chicago hospital around Independence Day 2027', () => {
    // Hand-derived. Distance ≈ 1,366 km (≤ 2,500 band) → 3 transit days, no customs.
    // Use window Wed Jul 7 – Fri Jul 9. Lead 2 US business days before Wed Jul 7:
    //   Tue Jul 6 (1), Mon Jul 5 observed Independence Day (5 U.S.C. 6103) skipped, Fri Jul 2 (2)
    //   → deliverBy Fri Jul 2.
    // shipBy: 3 US business days before Fri Jul 2: Thu Jul 1, Wed Jun 30, Tue Jun 29 → Jun 29.
    // returnShipBy: 1 business day after Fri Jul 9 → Mon Jul 12.
    // backAtDepot: 3 days after Mon Jul 12: Tue 13, Wed 14, Thu 15 → Jul 15.
    // readyAgain: 2 depot business days after Thu Jul 15: Fri 16, Mon 19 → Jul 19.
    const fp = computeFootprint({
      useFrom: '2027-07-07',
      useTo: '2027-07-09',
      depot: bostonAreaDepot,
      hospital: chicagoHospital,
      firstLoanOfModel: false,
    });
    expect(fp.milestones).toEqual({
      shipBy: '2027-06-29',
      deliverBy: '2027-07-02',
      useFrom: '2027-07-07',
      useTo: '2027-07-09',
      returnShipBy: '2027-07-12',
      backAtDepot: '2027-07-15',
      readyAgain: '2027-07-19',
    });
    expect(fp.hold).toEqual({ start: '2027-06-29', end: '2027-07-19' });
    expect(fp.transitDays).toBe(3);
    expect(fp.leadDays).toBe(2);
    expect(fp.distanceKm).toBeGreaterThan(1300);
    expect(fp.distanceKm).toBeLessThan(1400);
    expect(fp.details.holidays.map((h) => h.date)).toEqual(['2027-07-04', '2027-07-05']);
    // Cut-off 17:00 EDT (UTC−4 in summer, 15 U.S.C. 260a) on Jun 29 → 21:00Z.
    expect(fp.shipByCutoff).toBe('2027-06-29T21:00:00.000Z');
  });

  it('takes three lead days for the hospital’s first loan of the model', () => {
    // Hand-derived. Lead 3 before Wed Jul 7: Tue Jul 6, (Mon Jul 5 holiday), Fri Jul 2, Thu Jul 1
    // → deliverBy Jul 1; shipBy 3 days earlier: Wed Jun 30, Tue Jun 29, Mon Jun 28 → Jun 28.
    const fp = computeFootprint({
      useFrom: '2027-07-07',
      useTo: '2027-07-09',
      depot: bostonAreaDepot,
      hospital: chicagoHospital,
      firstLoanOfModel: true,
    });
    expect(fp.leadDays).toBe(3);
    expect(fp.milestones.deliverBy).toBe('2027-07-01');
    expect(fp.milestones.shipBy).toBe('2027-06-28');
    expect(fp.milestones.readyAgain).toBe('2027-07-19');
  });

  it('German depot to a US hospital across Easter, with customs', () => {
    // Hand-derived. Distance ≈ 6,333 km (> 5,000) → 5 days + 2 customs (DE ≠ US) = 7.
    // Use window Wed Apr 7 – Thu Apr 8. Lead 2 US business days: Tue Apr 6, Mon Apr 5
    //   → deliverBy Mon Apr 5 (a German business day too).
    // shipBy: 7 German business days before Apr 5: Fri Apr 2, Thu Apr 1, Wed Mar 31, Tue Mar 30,
    //   (Mon Mar 29 Easter Monday, Fri Mar 26 Good Friday skipped), Thu Mar 25, Wed Mar 24,
    //   Tue Mar 23 → Mar 23.
    // returnShipBy: Fri Apr 9. Return transit 7 US business days: Apr 12, 13, 14, 15, 16, 19, 20
    //   → backAtDepot Tue Apr 20 (a German business day). readyAgain: Wed 21, Thu 22 → Apr 22.
    const fp = computeFootprint({
      useFrom: '2027-04-07',
      useTo: '2027-04-08',
      depot: frankfurtAreaDepot,
      hospital: philadelphiaHospital,
      firstLoanOfModel: false,
    });
    expect(fp.milestones).toEqual({
      shipBy: '2027-03-23',
      deliverBy: '2027-04-05',
      useFrom: '2027-04-07',
      useTo: '2027-04-08',
      returnShipBy: '2027-04-09',
      backAtDepot: '2027-04-20',
      readyAgain: '2027-04-22',
    });
    expect(fp.details.outbound).toMatchObject({ bandDays: 5, customsDays: 2, crossBorder: true });
    expect(fp.details.holidays.map((h) => `${h.date} ${h.calendar}`)).toEqual([
      '2027-03-26 DE',
      '2027-03-29 DE',
    ]);
    // Cut-off 16:00 CET (UTC+1; Berlin moves to CEST only on Mar 28, EU Directive 2000/84/EC).
    expect(fp.shipByCutoff).toBe('2027-03-23T15:00:00.000Z');
  });

  it('counts Veterans Day and Thanksgiving on both legs (hand-derived)', () => {
    // 5 U.S.C. 6103: Veterans Day Thu 2027-11-11, Thanksgiving Thu 2027-11-25.
    // Use window Tue Nov 16 – Wed Nov 17. deliverBy: Mon Nov 15 (1), Fri Nov 12 (2) → Nov 12.
    // shipBy: 3 US business days before Fri Nov 12: Thu Nov 11 holiday skipped, Wed Nov 10 (1),
    //   Tue Nov 9 (2), Mon Nov 8 (3) → Nov 8.
    // returnShipBy: Thu Nov 18. backAtDepot: Fri 19 (1), Mon 22 (2), Tue 23 (3) → Nov 23.
    // readyAgain: Wed Nov 24 (1), Thu Nov 25 Thanksgiving skipped, Fri Nov 26 (2) → Nov 26.
    const fp = computeFootprint({
      useFrom: '2027-11-16',
      useTo: '2027-11-17',
      depot: bostonAreaDepot,
      hospital: chicagoHospital,
      firstLoanOfModel: false,
    });
    expect(fp.milestones.shipBy).toBe('2027-11-08');
    expect(fp.milestones.deliverBy).toBe('2027-11-12');
    expect(fp.milestones.returnShipBy).toBe('2027-11-18');
    expect(fp.milestones.backAtDepot).toBe('2027-11-23');
    expect(fp.milestones.readyAgain).toBe('2027-11-26');
  });

  describe('cut-off on the ship date right after a DST change', () => {
    // Hand-derived: use window Apr 12 → deliverBy Thu Apr 8 (Fri 9, Thu 8); 7 German business
    // days back: Apr 7, 6, 5, 2, 1, Mar 31, Mar 30 → shipBy Tue Mar 30, after Berlin's change to
    // CEST on 2027-03-28 01:00Z (EU Directive 2000/84/EC): 16:00 CEST = 14:00Z, not 15:00Z.
    const input = {
      useFrom: '2027-04-12',
      useTo: '2027-04-12',
      depot: frankfurtAreaDepot,
      hospital: philadelphiaHospital,
      firstLoanOfModel: false,
    };
    it.each([
      ['2027-03-30T13:59:59Z', false],
      ['2027-03-30T14:00:00Z', true],
      ['2027-03-30T14:30:00Z', true], // would wrongly pass with the winter offset
      ['2027-03-29T20:00:00Z', false],
      ['2027-03-31T08:00:00Z', true],
    ])('Berlin depot, now %s → shipByPassed %s', (now, passed) => {
      const fp = computeFootprint({ ...input, now });
      expect(fp.milestones.shipBy).toBe('2027-03-30');
      expect(fp.shipByCutoff).toBe('2027-03-30T14:00:00.000Z');
      expect(fp.shipByPassed).toBe(passed);
    });

    // Hand-derived: Boston → Chicago, window Mon Mar 22: deliverBy Thu Mar 18 (Fri 19, Thu 18),
    // shipBy Mon Mar 15 (Wed 17, Tue 16, Mon 15), the day after New York's change to EDT at
    // 2027-03-14 07:00Z (15 U.S.C. 260a): 17:00 EDT = 21:00Z.
    it.each([
      ['2027-03-15T20:59:00Z', false],
      ['2027-03-15T21:00:00Z', true],
      ['2027-03-15T21:30:00Z', true],
    ])('New York depot in March, now %s → shipByPassed %s', (now, passed) => {
      const fp = computeFootprint({
        useFrom: '2027-03-22',
        useTo: '2027-03-24',
        depot: bostonAreaDepot,
        hospital: chicagoHospital,
        firstLoanOfModel: false,
        now,
      });
      expect(fp.milestones.shipBy).toBe('2027-03-15');
      expect(fp.shipByCutoff).toBe('2027-03-15T21:00:00.000Z');
      expect(fp.shipByPassed).toBe(passed);
    });

    // shipBy Mon Nov 8 (previous example), the day after New York returns to EST at
    // 2027-11-07 06:00Z: 17:00 EST = 22:00Z.
    it.each([
      ['2027-11-08T21:30:00Z', false],
      ['2027-11-08T22:00:00Z', true],
    ])('New York depot in November, now %s → shipByPassed %s', (now, passed) => {
      const fp = computeFootprint({
        useFrom: '2027-11-16',
        useTo: '2027-11-17',
        depot: bostonAreaDepot,
        hospital: chicagoHospital,
        firstLoanOfModel: false,
        now: new Date(now),
      });
      expect(fp.shipByCutoff).toBe('2027-11-08T22:00:00.000Z');
      expect(fp.shipByPassed).toBe(passed);
    });
  });

  it('rejects inconsistent input', () => {
    const base = {
      useFrom: '2027-07-07',
      useTo: '2027-07-09',
      depot: bostonAreaDepot,
      hospital: chicagoHospital,
      firstLoanOfModel: false,
    };
    expect(() => computeFootprint({ ...base, useTo: '2027-07-06' })).toThrow(/before useFrom/);
    expect(() => computeFootprint({ ...base, settings: { leadDays: 0 } })).toThrow(/leadDays/);
    expect(() => computeFootprint({ ...base, settings: { turnaroundDays: -1 } })).toThrow(
      /turnaroundDays/,
    );
    expect(() =>
      computeFootprint({ ...base, depot: { ...bostonAreaDepot, cutoffTime: '5pm' } }),
    ).toThrow(/HH:mm/);
    expect(() =>
      computeFootprint({ ...base, hospital: { ...chicagoHospital, timeZone: 'Chicago' } }),
    ).toThrow(/time zone/);
  });
});

describe('computeFootprint, properties', () => {
  it('orders the milestones, with deliverBy strictly before useFrom', () => {
    fc.assert(
      fc.property(footprintInputArb, (input) => {
        const m = computeFootprint(input).milestones;
        expect(m.shipBy <= m.deliverBy).toBe(true);
        expect(m.deliverBy < m.useFrom).toBe(true);
        expect(m.useFrom <= m.useTo).toBe(true);
        expect(m.useTo <= m.returnShipBy).toBe(true);
        expect(m.returnShipBy <= m.backAtDepot).toBe(true);
        expect(m.backAtDepot <= m.readyAgain).toBe(true);
      }),
      { numRuns: RUNS },
    );
  });

  it('ships on an origin business day and counts only origin business days in transit', () => {
    fc.assert(
      fc.property(footprintInputArb, (input) => {
        const fp = computeFootprint(input);
        const { shipBy, deliverBy } = fp.milestones;
        const origin = input.depot.country;
        expect(oracleIsBusinessDay(shipBy, origin)).toBe(true);
        // Exactly `transitDays` origin business days lie in (shipBy, deliverBy]: the transit
        // skips weekends and origin holidays, and no later ship date would still arrive in time.
        expect(oracleCountOpenClosed(shipBy, deliverBy, origin)).toBe(fp.transitDays);
        expect(fp.details.outbound.eta <= deliverBy).toBe(true);
        const nextShipDate = shipmentEta(shipBy, 1, origin);
        expect(
          shipmentEta(nextShipDate, fp.transitDays, origin, input.hospital.country) > deliverBy,
        ).toBe(true);
      }),
      { numRuns: RUNS },
    );
  });

  it('gives the hospital its lead time in business days', () => {
    fc.assert(
      fc.property(footprintInputArb, (input) => {
        const fp = computeFootprint(input);
        const { deliverBy, useFrom } = fp.milestones;
        const hospital = input.hospital.country;
        const expectedLead = input.firstLoanOfModel
          ? input.settings!.firstLoanLeadDays!
          : input.settings!.leadDays!;
        expect(fp.leadDays).toBe(expectedLead);
        expect(oracleIsBusinessDay(deliverBy, hospital)).toBe(true);
        expect(oracleCountClosedOpen(deliverBy, useFrom, hospital)).toBe(expectedLead);
      }),
      { numRuns: RUNS },
    );
  });

  it('keeps decontamination, return transit and turnaround in business days', () => {
    fc.assert(
      fc.property(footprintInputArb, (input) => {
        const fp = computeFootprint(input);
        const { useTo, returnShipBy, backAtDepot, readyAgain } = fp.milestones;
        const hospital = input.hospital.country;
        const depot = input.depot.country;
        const settings = fp.details.settings;
        expect(oracleIsBusinessDay(returnShipBy, hospital)).toBe(true);
        if (settings.decontaminationDays > 0) {
          expect(oracleCountOpenClosed(useTo, returnShipBy, hospital)).toBe(
            settings.decontaminationDays,
          );
        }
        // Return transit counts hospital-country business days, then lands on a depot one.
        expect(oracleCountOpenClosed(returnShipBy, backAtDepot, hospital)).toBeGreaterThanOrEqual(
          fp.details.return.totalDays,
        );
        expect(oracleIsBusinessDay(backAtDepot, depot)).toBe(true);
        expect(oracleCountOpenClosed(backAtDepot, readyAgain, depot)).toBe(settings.turnaroundDays);
      }),
      { numRuns: RUNS },
    );
  });

  it('places the cut-off at the depot’s wall-clock time on shipBy and flags it once passed', () => {
    const nowOffsetArb = fc.integer({ min: -3 * 24 * 60, max: 3 * 24 * 60 });
    fc.assert(
      fc.property(footprintInputArb, nowOffsetArb, (input, minutes) => {
        const plain = computeFootprint(input);
        expect(plain.shipByPassed).toBe(false);
        const local = DateTime.fromISO(plain.shipByCutoff).setZone(input.depot.timeZone);
        // Ship dates are business days, and no zone in the pool changes its clocks on a weekday
        // in these years (IANA tz), so the wall time always exists.
        expect(local.toISODate()).toBe(plain.milestones.shipBy);
        expect(local.toFormat('HH:mm')).toBe(input.depot.cutoffTime);
        const now = new Date(Date.parse(plain.shipByCutoff) + minutes * 60_000);
        expect(computeFootprint({ ...input, now }).shipByPassed).toBe(minutes >= 0);
      }),
      { numRuns: RUNS },
    );
  });

  it('moves no milestone earlier when the window moves later', () => {
    fc.assert(
      fc.property(footprintInputArb, fc.integer({ min: 1, max: 10 }), (input, shift) => {
        const a = computeFootprint(input).milestones;
        const b = computeFootprint({
          ...input,
          useFrom: oraclePlusDays(input.useFrom, shift),
          useTo: oraclePlusDays(input.useTo, shift),
        }).milestones;
        for (const key of Object.keys(a) as (keyof typeof a)[]) {
          expect(b[key] >= a[key]).toBe(true);
        }
      }),
      { numRuns: RUNS },
    );
  });

  it('gives the same footprint through the planner as for the moved window', () => {
    fc.assert(
      fc.property(
        footprintInputArb,
        fc.integer({ min: 0, max: 30 }),
        fc.date({
          min: new Date('2026-01-01T00:00:00Z'),
          max: new Date('2030-01-01T00:00:00Z'),
          noInvalidDate: true,
        }),
        (input, shift, now) => {
          const planned = createFootprintPlanner({ ...input, now }).footprint(shift);
          const direct = computeFootprint({
            ...input,
            now,
            useFrom: oraclePlusDays(input.useFrom, shift),
            useTo: oraclePlusDays(input.useTo, shift),
          });
          expect(planned).toEqual(direct);
        },
      ),
      { numRuns: RUNS },
    );
  });
});
