import {
  CalendarCode,
  IsoDate,
  PublicHoliday,
  addBusinessDays,
  addCalendarDays,
  assertIsoDate,
  publicHolidaysBetween,
  rollBackToBusinessDay,
  rollForwardToBusinessDay,
  subtractBusinessDays,
} from './business-days';
import {
  DEFAULT_CUSTOMS_DAYS,
  DEFAULT_DISTANCE_BANDS,
  DistanceBand,
  LatLng,
  TransitEstimate,
  assertDistanceBands,
  estimateTransit,
} from './distance';
import { shipmentEta } from './shipments';
import { Instant, assertTimeZone, toInstant, wallTimeToInstant } from './zones';

/** A closed interval of calendar dates: both `start` and `end` are included. */
export interface DateInterval {
  /** First day of the interval (`YYYY-MM-DD`). */
  start: IsoDate;
  /** Last day of the interval (`YYYY-MM-DD`), not before `start`. */
  end: IsoDate;
}

/** A hospital site (campus) as the footprint needs it. */
export interface HospitalSiteInput extends LatLng {
  /** Holiday calendar: ISO country code, optionally with a subdivision (`US`, `DE-BY`). */
  country: CalendarCode;
  /** IANA time zone of the site (`America/Chicago`); the use window is in this zone. */
  timeZone: string;
}

/** A lender's depot as the footprint needs it. */
export interface DepotSiteInput extends HospitalSiteInput {
  /** Latest hand-over to the carrier on a ship date, wall-clock `HH:mm` in the depot's zone. */
  cutoffTime: string;
}

/** Lender and hospital settings that shape a footprint. All day counts are business days. */
export interface SchedulingSettings {
  /** The lender's distance-band table. */
  distanceBands: readonly DistanceBand[];
  /** Customs days added to each leg that crosses a border. */
  customsDays: number;
  /** Hospital business days between delivery and the first case (delivery day counted), ≥ 1. */
  leadDays: number;
  /** Lead days instead of {@link leadDays} for a hospital's first loan of a model, ≥ 1. */
  firstLoanLeadDays: number;
  /** Hospital business days after the last case for decontamination before the return ships. */
  decontaminationDays: number;
  /** Depot business days after arrival for inspection and reprocessing. */
  turnaroundDays: number;
}

/**
 * Default settings. Lead days 2 / 3 follow sample hospital loaner policies (48 h for known sets,
 * 72 h for new ones; policy text, medium confidence); decontamination 1 day and turnaround 2 days
 * are the product brief's defaults (common practice); distance bands and customs days are
 * assumptions that each lender can change.
 */
export const DEFAULT_SCHEDULING_SETTINGS: Readonly<SchedulingSettings> = Object.freeze({
  distanceBands: DEFAULT_DISTANCE_BANDS,
  customsDays: DEFAULT_CUSTOMS_DAYS,
  leadDays: 2,
  firstLoanLeadDays: 3,
  decontaminationDays: 1,
  turnaroundDays: 2,
});

/** Input of {@link computeFootprint}. */
export interface FootprintInput {
  /** First case day, in the hospital site's zone. */
  useFrom: IsoDate;
  /** Last case day, in the hospital site's zone; not before `useFrom`. */
  useTo: IsoDate;
  /** The unit's depot (ships out and receives back). */
  depot: DepotSiteInput;
  /** The hospital site that receives the unit. */
  hospital: HospitalSiteInput;
  /** Whether this is the hospital's first loan of this model (longer lead time). */
  firstLoanOfModel: boolean;
  /** Settings; missing ones take {@link DEFAULT_SCHEDULING_SETTINGS}. */
  settings?: Partial<SchedulingSettings>;
  /** The current instant; when given, a ship date whose cut-off has passed is flagged. */
  now?: Instant;
}

/** The milestones of a loan, all calendar dates `YYYY-MM-DD`. */
export interface Milestones {
  /** Last day the depot may hand the unit to the carrier (depot zone, before the cut-off). */
  shipBy: IsoDate;
  /** Last day the unit may arrive at the hospital (hospital zone). */
  deliverBy: IsoDate;
  /** First case day (hospital zone). */
  useFrom: IsoDate;
  /** Last case day (hospital zone). */
  useTo: IsoDate;
  /** Day the hospital hands the decontaminated unit to the carrier (hospital zone). */
  returnShipBy: IsoDate;
  /** Expected arrival back at the depot (depot zone). */
  backAtDepot: IsoDate;
  /** Last day of inspection and reprocessing; the unit may ship again the next day (depot zone). */
  readyAgain: IsoDate;
}

/** One leg (outbound or return) of a footprint. */
export interface LegDetails extends TransitEstimate {
  /** Holiday calendar whose business days count the transit days. */
  originCountry: CalendarCode;
  /** Holiday calendar of the receiving site. */
  destinationCountry: CalendarCode;
  /** Ship date of the leg. */
  shipDate: IsoDate;
  /** Expected arrival from {@link shipmentEta} when shipped on `shipDate`. */
  eta: IsoDate;
}

/** A public holiday that falls inside a footprint, with the calendar it belongs to. */
export interface FootprintHoliday extends PublicHoliday {
  /** The calendar (site country) the holiday belongs to. */
  calendar: CalendarCode;
}

/** Result of {@link computeFootprint}. */
export interface LoanFootprint {
  /** The seven milestones. */
  milestones: Milestones;
  /** The unit's hold: the closed interval `[shipBy, readyAgain]` in the depot's calendar. */
  hold: DateInterval;
  /** Great-circle distance depot → hospital in km (IUGG mean radius). */
  distanceKm: number;
  /** Transit business days of each leg (distance band + customs). */
  transitDays: number;
  /** Lead days applied (first-loan or regular). */
  leadDays: number;
  /** UTC instant (ISO, `Z`) of the depot cut-off on `shipBy`. */
  shipByCutoff: string;
  /** Whether `now` was given and is at or past the cut-off on `shipBy` (window infeasible). */
  shipByPassed: boolean;
  /** How each milestone came about. */
  details: {
    /** Outbound leg depot → hospital. */
    outbound: LegDetails;
    /** Return leg hospital → depot. */
    return: LegDetails;
    /** Settings used, defaults filled in. */
    settings: SchedulingSettings;
    /** Public holidays of the depot's and the hospital's calendars within the hold. */
    holidays: FootprintHoliday[];
  };
}

function resolveSettings(partial: Partial<SchedulingSettings> | undefined): SchedulingSettings {
  const settings: SchedulingSettings = { ...DEFAULT_SCHEDULING_SETTINGS, ...partial };
  assertDistanceBands(settings.distanceBands);
  const minimum: Record<Exclude<keyof SchedulingSettings, 'distanceBands'>, number> = {
    customsDays: 0,
    // A unit cannot arrive on the day of the case: loaner sets need receiving, inspection and
    // sterilisation first (AORN guidance as summarised in CNOR study material; AAMI ST79).
    leadDays: 1,
    firstLoanLeadDays: 1,
    decontaminationDays: 0,
    turnaroundDays: 0,
  };
  for (const [key, min] of Object.entries(minimum) as [keyof typeof minimum, number][]) {
    const value = settings[key];
    if (!Number.isInteger(value) || value < min) {
      throw new RangeError(`settings.${key} must be a whole number ≥ ${min}, got ${value}`);
    }
  }
  return settings;
}

function validateInput(input: FootprintInput): void {
  assertIsoDate(input.useFrom);
  assertIsoDate(input.useTo);
  if (input.useTo < input.useFrom) {
    throw new RangeError(`useTo ${input.useTo} is before useFrom ${input.useFrom}`);
  }
  assertTimeZone(input.depot.timeZone);
  assertTimeZone(input.hospital.timeZone);
}

/**
 * Computes a loan's footprint from the hospital's use window (docs/design/product.md §1). Pure: the same
 * input always gives the same output; the clock is read only from `input.now`.
 *
 * Choices, step by step:
 * 1. `deliverBy` = `lead` hospital business days before `useFrom`, counting the delivery day
 *    itself (so `lead` business days lie in `[deliverBy, useFrom)`). Carriers deliver during the
 *    working day, so a delivery on Monday with a Wednesday first case gives Monday and Tuesday
 *    for receiving, inspection and sterilisation (sample policies: 48 h / 72 h).
 * 2. Transit days = distance band of the great-circle distance + customs days across a border,
 *    counted in the ORIGIN country's business days (weekends and origin public holidays do not
 *    count), as {@link shipmentEta} does. Customs clearance happens at import, so the destination
 *    calendar could matter too; counting all transit days in one calendar is a simplification.
 * 3. `shipBy` = the LATEST depot business day whose ETA is on or before `deliverBy`: step back
 *    to the last origin business day on or before `deliverBy`, then `transit` origin business
 *    days further. Dates of the two zones are compared as calendar dates: the few hours between
 *    the zones are inside the whole-day granularity of transit bands.
 * 4. The unit must be with the carrier before the depot's cut-off on `shipBy`, wall-clock time in
 *    the depot's zone (so daylight saving is honoured); when `now` is at or past that instant the
 *    window is infeasible (`shipByPassed`). This covers both a past `shipBy` and "today, after
 *    the cut-off".
 * 5. `returnShipBy` = `decontaminationDays` hospital business days after `useTo` (the last case
 *    day is not counted: cases can run late; decontamination happens on the next business day,
 *    and the carrier collects at the end of it). With 0 days it is the next business day from
 *    `useTo` on.
 * 6. `backAtDepot` = ETA of the return leg: the same distance band and customs, counted in the
 *    hospital country's business days (the return leg's origin), moved to a depot business day.
 * 7. `readyAgain` = `turnaroundDays` depot business days after `backAtDepot` (arrival day not
 *    counted, as returns often arrive late in the day). The unit is held through `readyAgain`.
 */
export function computeFootprint(input: FootprintInput): LoanFootprint {
  return createFootprintPlanner(input).footprint(0);
}

/**
 * A footprint input prepared once (validated, settings resolved, both legs' transit computed)
 * for computing the same loan with its use window moved by whole days. The availability search
 * uses it to test many start dates cheaply: {@link FootprintPlanner.milestones} does only the
 * business-day steps, {@link FootprintPlanner.footprint} adds the cut-off instant and details.
 */
export interface FootprintPlanner {
  /** Milestones of the use window moved `shiftDays` calendar days later (0 = as given). */
  milestones(shiftDays: number): Milestones;
  /** The full footprint of the use window moved `shiftDays` calendar days later. */
  footprint(shiftDays: number): LoanFootprint;
}

/**
 * Prepares a footprint input; see {@link computeFootprint} for the rules and
 * {@link FootprintPlanner} for the use.
 * @throws RangeError for invalid dates, zones, calendars, cut-off time or settings.
 */
export function createFootprintPlanner(input: FootprintInput): FootprintPlanner {
  validateInput(input);
  const settings = resolveSettings(input.settings);
  const { depot, hospital } = input;
  const leadDays = input.firstLoanOfModel ? settings.firstLoanLeadDays : settings.leadDays;
  const nowMillis = input.now === undefined ? undefined : toInstant(input.now).toMillis();
  // Steps 2 and 6: the distance, and so the transit days, do not depend on the dates.
  const outboundTransit = estimateTransit({
    from: depot,
    to: hospital,
    originCountry: depot.country,
    destinationCountry: hospital.country,
    bands: settings.distanceBands,
    customsDays: settings.customsDays,
  });
  const returnTransit = estimateTransit({
    from: hospital,
    to: depot,
    originCountry: hospital.country,
    destinationCountry: depot.country,
    bands: settings.distanceBands,
    customsDays: settings.customsDays,
  });
  // Fails early on a bad cut-off time rather than at the first feasible-looking date.
  wallTimeToInstant(input.useFrom, depot.cutoffTime, depot.timeZone);

  const milestones = (shiftDays: number): Milestones => {
    const useFrom = addCalendarDays(input.useFrom, shiftDays);
    const useTo = addCalendarDays(input.useTo, shiftDays);
    // Step 1: leadDays ≥ 1, so deliverBy is a hospital business day strictly before useFrom.
    const deliverBy = subtractBusinessDays(useFrom, leadDays, hospital.country);
    // Step 3: the latest origin business day whose ETA is on or before deliverBy.
    const lastOriginArrival = rollBackToBusinessDay(deliverBy, depot.country);
    const shipBy = subtractBusinessDays(
      lastOriginArrival,
      outboundTransit.totalDays,
      depot.country,
    );
    // Step 5: rolling forward only matters with 0 decontamination days and a non-business useTo.
    const returnShipBy = rollForwardToBusinessDay(
      addBusinessDays(useTo, settings.decontaminationDays, hospital.country),
      hospital.country,
    );
    // Step 6.
    const backAtDepot = shipmentEta(
      returnShipBy,
      returnTransit.totalDays,
      hospital.country,
      depot.country,
    );
    // Step 7.
    const readyAgain = addBusinessDays(backAtDepot, settings.turnaroundDays, depot.country);
    return { shipBy, deliverBy, useFrom, useTo, returnShipBy, backAtDepot, readyAgain };
  };

  const footprint = (shiftDays: number): LoanFootprint => {
    const m = milestones(shiftDays);
    // Step 4.
    const shipByCutoff = wallTimeToInstant(m.shipBy, depot.cutoffTime, depot.timeZone);
    const shipByPassed = nowMillis !== undefined && nowMillis >= Date.parse(shipByCutoff);
    const holidays: FootprintHoliday[] = [depot.country, hospital.country]
      .filter((code, index, all) => all.indexOf(code) === index)
      .flatMap((calendar) =>
        publicHolidaysBetween(m.shipBy, m.readyAgain, calendar).map((h) => ({ ...h, calendar })),
      )
      .sort((a, b) => a.date.localeCompare(b.date) || a.calendar.localeCompare(b.calendar));
    return {
      milestones: m,
      hold: { start: m.shipBy, end: m.readyAgain },
      distanceKm: outboundTransit.distanceKm,
      transitDays: outboundTransit.totalDays,
      leadDays,
      shipByCutoff,
      shipByPassed,
      details: {
        outbound: {
          ...outboundTransit,
          originCountry: depot.country,
          destinationCountry: hospital.country,
          shipDate: m.shipBy,
          eta: shipmentEta(m.shipBy, outboundTransit.totalDays, depot.country, hospital.country),
        },
        return: {
          ...returnTransit,
          originCountry: hospital.country,
          destinationCountry: depot.country,
          shipDate: m.returnShipBy,
          eta: m.backAtDepot,
        },
        settings,
        holidays,
      },
    };
  };

  return { milestones, footprint };
}
