import {
  CalendarCode,
  IsoDate,
  addBusinessDays,
  addCalendarDays,
  assertIsoDate,
  rollForwardToBusinessDay,
} from './business-days';

/**
 * Expected delivery date of a shipment (docs/design/product.md §5): `transitDays` business days of the
 * ORIGIN country after the ship date (the ship date itself is not counted; carriers move goods on
 * the origin's working days). When `destinationCountry` is given, an arrival on a destination
 * weekend or public holiday moves to the next destination business day, since the receiving
 * dock is closed then.
 * @param shipDate Date handed to the carrier, in the origin site's zone.
 * @param transitDays Transit business days (distance band plus customs), whole, ≥ 0.
 * @param originCountry Holiday calendar of the origin site.
 * @param destinationCountry Holiday calendar of the receiving site, if known.
 */
export function shipmentEta(
  shipDate: IsoDate,
  transitDays: number,
  originCountry: CalendarCode,
  destinationCountry?: CalendarCode,
): IsoDate {
  if (!Number.isInteger(transitDays) || transitDays < 0) {
    throw new RangeError(`transitDays must be a whole number ≥ 0, got ${transitDays}`);
  }
  const arrival = addBusinessDays(shipDate, transitDays, originCountry);
  return destinationCountry ? rollForwardToBusinessDay(arrival, destinationCountry) : arrival;
}

/**
 * Whether a shipment is overdue, i.e. not delivered by its expected date (docs/design/product.md §5).
 * While it is undelivered it is overdue once `today` is after `expected`; once delivered it
 * counts as overdue when it was delivered after `expected` (a late delivery stays on record).
 * All three are calendar dates in the receiving site's zone.
 * @param expected Expected delivery date.
 * @param deliveredAt Date of delivery, or `null` while not delivered.
 * @param today Today's date in the receiving site's zone.
 */
export function isOverdue(expected: IsoDate, deliveredAt: IsoDate | null, today: IsoDate): boolean {
  assertIsoDate(expected);
  assertIsoDate(today);
  if (deliveredAt !== null) return assertIsoDate(deliveredAt) > expected;
  return today > expected;
}

/**
 * Whether the return reminder is due: from `daysBefore` calendar days before `returnShipBy` up
 * to and including `returnShipBy` itself. After that day a reminder no longer helps; the return
 * shipment's overdue check takes over. Calendar days (not business days) because the reminder
 * is a message to people, who plan by the calendar.
 * @param returnShipBy The loan's `returnShipBy` milestone (hospital zone).
 * @param today Today's date in the hospital site's zone.
 * @param daysBefore How many calendar days ahead to start reminding, whole, ≥ 0.
 */
export function returnReminderDue(
  returnShipBy: IsoDate,
  today: IsoDate,
  daysBefore: number,
): boolean {
  if (!Number.isInteger(daysBefore) || daysBefore < 0) {
    throw new RangeError(`daysBefore must be a whole number ≥ 0, got ${daysBefore}`);
  }
  assertIsoDate(today);
  return today >= addCalendarDays(returnShipBy, -daysBefore) && today <= returnShipBy;
}
