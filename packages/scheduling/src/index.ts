/**
 * `@evalon/scheduling`: the pure scheduling computations of Evalon (no I/O, no clock reads).
 *
 * - Business days per country calendar (weekends and public holidays): {@link isBusinessDay},
 *   {@link addBusinessDays}, {@link subtractBusinessDays}.
 * - Distance and transit: {@link greatCircleDistanceKm}, {@link transitDays},
 *   {@link estimateTransit}.
 * - Loan footprint and milestones: {@link computeFootprint}.
 * - Availability: {@link isFeasible}, {@link earliestFeasibleWindow}, {@link allFeasible}.
 * - Shipments: {@link shipmentEta}, {@link isOverdue}, {@link returnReminderDue}.
 *
 * Dates are `YYYY-MM-DD` strings meaning a calendar day in the zone of the site they belong to;
 * instants are `Date`s or ISO strings with an offset. Computed dates are estimates until the
 * lender confirms; contracts, carriers' commitments and local rules prevail.
 * @packageDocumentation
 */

/** Business-day calendars: weekends, public holidays (date-holidays), day arithmetic. */
export {
  type CalendarCode,
  type IsoDate,
  type PublicHoliday,
  addBusinessDays,
  addCalendarDays,
  assertIsoDate,
  businessDaysBetween,
  calendarDaysBetween,
  countryOf,
  isBusinessDay,
  isPublicHoliday,
  isWeekend,
  isoWeekday,
  publicHolidayOn,
  publicHolidays,
  publicHolidaysBetween,
  rollBackToBusinessDay,
  rollForwardToBusinessDay,
  subtractBusinessDays,
} from './business-days';

/** Great-circle distance (geolib, IUGG mean radius) and the lender's distance bands. */
export {
  DEFAULT_CUSTOMS_DAYS,
  DEFAULT_DISTANCE_BANDS,
  type DistanceBand,
  IUGG_MEAN_EARTH_RADIUS_M,
  type LatLng,
  type TransitEstimate,
  type TransitInput,
  assertDistanceBands,
  centralAngleRad,
  ellipsoidalDistanceKm,
  estimateTransit,
  greatCircleDistanceKm,
  transitDays,
} from './distance';

/** Time zones: instants, site dates and wall-clock cut-offs (luxon). */
export { type Instant, assertTimeZone, toInstant, toSiteDate, wallTimeToInstant } from './zones';

/** The loan footprint: milestones from the use window and both sites. */
export {
  DEFAULT_SCHEDULING_SETTINGS,
  type DateInterval,
  type DepotSiteInput,
  type FootprintHoliday,
  type FootprintInput,
  type FootprintPlanner,
  type HospitalSiteInput,
  type LegDetails,
  type LoanFootprint,
  type Milestones,
  type SchedulingSettings,
  computeFootprint,
  createFootprintPlanner,
} from './footprint';

/** Availability of units against their holds, and the earliest feasible window. */
export {
  type AllFeasibleResult,
  DEFAULT_HORIZON_DAYS,
  type FeasibilityCheck,
  type FeasibleWindow,
  type FeasibleWindowForAll,
  type UnitRequest,
  allFeasible,
  checkFeasibility,
  earliestFeasibleWindow,
  earliestFeasibleWindowForAll,
  intervalsOverlap,
  isFeasible,
  windowLengthDays,
} from './availability';

/** Shipment ETA, overdue shipments and return reminders (docs/design/product.md §5). */
export { isOverdue, returnReminderDue, shipmentEta } from './shipments';
