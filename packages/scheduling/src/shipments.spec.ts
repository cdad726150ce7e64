import { isOverdue, returnReminderDue, shipmentEta } from './shipments';

describe('shipmentEta', () => {
  it('counts origin business days after the ship date (hand-derived)', () => {
    // Germany 2027 (docs/references.md): Good Friday Mar 26, Easter Monday Mar 29.
    // Thu Mar 25 + 1 German business day → Tue Mar 30; + 3 → Thu Apr 1.
    expect(shipmentEta('2027-03-25', 1, 'DE')).toBe('2027-03-30');
    expect(shipmentEta('2027-03-25', 3, 'DE')).toBe('2027-04-01');
    // 5 U.S.C. 6103: Dec 24, 2027 is the observed Christmas; Thu Dec 23 + 1 → Mon Dec 27.
    expect(shipmentEta('2027-12-23', 1, 'US')).toBe('2027-12-27');
  });

  it('moves an arrival on a destination holiday to the next destination business day', () => {
    // Fri Jul 2 + 1 German business day is Mon Jul 5, the observed US Independence Day
    // (5 U.S.C. 6103), so a US hospital receives it on Tue Jul 6.
    expect(shipmentEta('2027-07-02', 1, 'DE')).toBe('2027-07-05');
    expect(shipmentEta('2027-07-02', 1, 'DE', 'US')).toBe('2027-07-06');
  });

  it('ships and arrives the same day with zero transit days', () => {
    expect(shipmentEta('2027-07-06', 0, 'US')).toBe('2027-07-06');
    expect(() => shipmentEta('2027-07-06', -1, 'US')).toThrow(RangeError);
  });
});

describe('isOverdue', () => {
  it.each([
    ['2027-07-06', null, '2027-07-06', false], // due today, not yet late
    ['2027-07-06', null, '2027-07-07', true],
    ['2027-07-06', '2027-07-06', '2027-07-20', false],
    ['2027-07-06', '2027-07-07', '2027-07-20', true], // delivered a day late
    ['2027-12-31', null, '2028-01-01', true], // across the year end
  ])('expected %s, delivered %s, today %s → %s', (expected, deliveredAt, today, overdue) => {
    expect(isOverdue(expected, deliveredAt, today)).toBe(overdue);
  });
});

describe('returnReminderDue', () => {
  it.each([
    ['2027-03-01', '2027-02-25', 3, false], // four days before
    ['2027-03-01', '2027-02-26', 3, true], // three days before (February 2027 has 28 days)
    ['2027-03-01', '2027-03-01', 3, true], // the day itself
    ['2027-03-01', '2027-03-02', 3, false], // afterwards the overdue check takes over
    ['2028-03-01', '2028-02-27', 3, true], // 2028 is a leap year: Feb 27 is three days before
    ['2027-03-01', '2027-02-28', 0, false],
    ['2027-03-01', '2027-03-01', 0, true],
  ])('returnShipBy %s, today %s, %d days before → %s', (returnShipBy, today, days, due) => {
    expect(returnReminderDue(returnShipBy, today, days)).toBe(due);
  });

  it('rejects a negative lead', () => {
    expect(() => returnReminderDue('2027-03-01', '2027-03-01', -1)).toThrow(RangeError);
  });
});
