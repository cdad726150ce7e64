import { cardStrategy, depositDeadline, footprintInstants } from './deadline';

const hours = (n: number) => n * 3_600_000;

describe('deposit footprint, strategy and deadline', () => {
  it('reads each day in its depot zone, across a daylight-saving change', () => {
    // New York moves to daylight time at 2027-03-14 07:00Z (docs/references.md, derived from
    // 15 U.S.C. 260a and the IANA tz data): EST (−5 h) before, EDT (−4 h) after.
    const f = footprintInstants([
      { shipBy: '2027-03-12', readyAgain: '2027-03-15', depotTimeZone: 'America/New_York' },
    ]);
    expect(f.start.toISOString()).toBe('2027-03-12T05:00:00.000Z');
    // End of the ready-again day = start of 2027-03-16 in EDT.
    expect(f.end.toISOString()).toBe('2027-03-16T04:00:00.000Z');
  });

  it('spans every unit of a multi-depot loan', () => {
    const f = footprintInstants([
      { shipBy: '2027-05-03', readyAgain: '2027-05-20', depotTimeZone: 'Europe/Berlin' },
      { shipBy: '2027-05-04', readyAgain: '2027-05-21', depotTimeZone: 'America/Los_Angeles' },
    ]);
    // Berlin is UTC+2 in May (EU summer time); Los Angeles UTC−7.
    expect(f.start.toISOString()).toBe('2027-05-02T22:00:00.000Z');
    expect(f.end.toISOString()).toBe('2027-05-22T07:00:00.000Z');
  });

  it('holds on the card only when the footprint ends inside the 7-day authorisation window', () => {
    // Window: online card authorisations stay valid 7 days (docs/references.md, provider docs).
    const unit = { shipBy: '2027-06-01', readyAgain: '2027-06-05', depotTimeZone: 'UTC' };
    // Ends 2027-06-06T00:00Z: 6 days after this `now` → hold.
    expect(cardStrategy([unit], new Date('2027-05-31T00:00:00Z'))).toBe('authorise_hold');
    // Exactly 7 days before the end → charge (the package keeps to the side that cannot lapse).
    expect(cardStrategy([unit], new Date('2027-05-30T00:00:00Z'))).toBe('charge_now_refund_later');
    expect(cardStrategy([unit], new Date('2027-05-20T00:00:00Z'))).toBe('charge_now_refund_later');
  });

  it('gives 72 h after approval, but never past the start of the ship-by day (common practice: our product default)', () => {
    const approved = new Date('2027-03-01T15:00:00Z');
    const far = [{ shipBy: '2027-03-08', depotTimeZone: 'America/New_York' }];
    expect(depositDeadline(approved, far, hours(72)).toISOString()).toBe(
      '2027-03-04T15:00:00.000Z',
    );
    const near = [{ shipBy: '2027-03-03', depotTimeZone: 'America/New_York' }];
    // Start of 2027-03-03 in New York (EST, −5 h).
    expect(depositDeadline(approved, near, hours(72)).toISOString()).toBe(
      '2027-03-03T05:00:00.000Z',
    );
    // The earliest ship day of several units wins.
    expect(depositDeadline(approved, [...far, ...near], hours(72)).toISOString()).toBe(
      '2027-03-03T05:00:00.000Z',
    );
    // Approved on the ship-by day itself: the approval time stands (never a deadline in the past).
    const late = new Date('2027-03-03T14:00:00Z');
    expect(depositDeadline(late, near, hours(72)).toISOString()).toBe(late.toISOString());
  });
});
