import { getDistance, getPreciseDistance } from 'geolib';
import { earthRadius as GEOLIB_SPHERE_RADIUS_M } from 'geolib/es/constants';

import { CalendarCode, countryOf } from './business-days';

/** A point on the Earth in decimal degrees (WGS 84): latitude −90..90, longitude −180..180. */
export interface LatLng {
  /** Latitude in decimal degrees, north positive. */
  lat: number;
  /** Longitude in decimal degrees, east positive. */
  lng: number;
}

/**
 * Mean Earth radius R1 = (2a + b) / 3 of the WGS 84 ellipsoid as recommended by the IUGG, in
 * metres (6,371.0088 km). Using the mean radius on a sphere keeps the great-circle error small
 * on average for any direction of travel.
 */
export const IUGG_MEAN_EARTH_RADIUS_M = 6_371_008.8;

function assertLatLng(point: LatLng, name: string): void {
  const { lat, lng } = point;
  if (!Number.isFinite(lat) || !Number.isFinite(lng) || Math.abs(lat) > 90 || Math.abs(lng) > 180) {
    throw new RangeError(`${name} is not a valid latitude/longitude: ${JSON.stringify(point)}`);
  }
}

/**
 * Returns the central angle between two points in radians (the great-circle distance on the unit
 * sphere). geolib's `getDistance` evaluates the spherical law of cosines,
 * `acos(sin φ1 sin φ2 + cos φ1 cos φ2 cos Δλ)`, and multiplies by its own sphere radius
 * (6,378,137 m, the WGS 84 equatorial radius), so dividing by that radius gives the angle back.
 * A millimetre rounding step keeps geolib's whole-metre rounding out of the angle.
 */
export function centralAngleRad(from: LatLng, to: LatLng): number {
  assertLatLng(from, 'from');
  assertLatLng(to, 'to');
  return getDistance(from, to, 0.001) / GEOLIB_SPHERE_RADIUS_M;
}

/**
 * Great-circle distance in kilometres between two points on a sphere with the IUGG mean radius
 * (6,371.0088 km). geolib has no radius parameter, so the angle from {@link centralAngleRad} is
 * rescaled to the mean radius. A sphere errs by up to about 0.5 % against the ellipsoid (from
 * memory), far finer than the distance bands it feeds.
 */
export function greatCircleDistanceKm(from: LatLng, to: LatLng): number {
  return (centralAngleRad(from, to) * IUGG_MEAN_EARTH_RADIUS_M) / 1000;
}

/**
 * Distance in kilometres on the WGS 84 ellipsoid (Vincenty's inverse formula, geolib's
 * `getPreciseDistance`). Offered for display and cross-checks; transit bands use the sphere.
 */
export function ellipsoidalDistanceKm(from: LatLng, to: LatLng): number {
  assertLatLng(from, 'from');
  assertLatLng(to, 'to');
  return getPreciseDistance(from, to, 0.001) / 1000;
}

/**
 * One row of a lender's distance-band table: shipments up to `maxKm` (inclusive) take `days`
 * transit business days. `maxKm: null` is the open last band ("beyond").
 */
export interface DistanceBand {
  /** Upper bound of the band in km, inclusive; `null` for the open band beyond the last bound. */
  maxKm: number | null;
  /** Transit business days for a shipment in this band. */
  days: number;
}

/**
 * Default distance bands. These are assumptions of this product, not published figures: ground
 * parcel services commonly need about a day for a few hundred km and up to about a week across a
 * continent or an ocean (common practice). Every lender can replace the table.
 */
export const DEFAULT_DISTANCE_BANDS: readonly DistanceBand[] = Object.freeze([
  { maxKm: 300, days: 1 },
  { maxKm: 1000, days: 2 },
  { maxKm: 2500, days: 3 },
  { maxKm: 5000, days: 4 },
  { maxKm: null, days: 5 },
]);

/** Default customs clearance days added when a shipment crosses a border (an assumption). */
export const DEFAULT_CUSTOMS_DAYS = 2;

/**
 * Checks a distance-band table: bounds strictly increasing, only the last band open, days whole
 * and not negative.
 * @throws RangeError describing the first problem found.
 */
export function assertDistanceBands(bands: readonly DistanceBand[]): void {
  if (bands.length === 0) throw new RangeError('The distance-band table is empty');
  let previous = -Infinity;
  bands.forEach((band, index) => {
    if (!Number.isInteger(band.days) || band.days < 0) {
      throw new RangeError(`Band ${index}: days must be a whole number ≥ 0, got ${band.days}`);
    }
    if (band.maxKm === null) {
      if (index !== bands.length - 1) throw new RangeError('Only the last band may be open');
      return;
    }
    if (!Number.isFinite(band.maxKm) || band.maxKm <= previous || band.maxKm < 0) {
      throw new RangeError(`Band ${index}: maxKm must increase, got ${band.maxKm}`);
    }
    previous = band.maxKm;
  });
}

/**
 * Returns the transit business days for a distance from a distance-band table: the first band
 * whose `maxKm` is at least the distance (bounds are inclusive: exactly 300 km is the ≤ 300 band).
 * @throws RangeError when the distance is beyond a table that has no open last band.
 */
export function transitDays(
  distanceKm: number,
  bands: readonly DistanceBand[] = DEFAULT_DISTANCE_BANDS,
): number {
  if (!Number.isFinite(distanceKm) || distanceKm < 0) {
    throw new RangeError(`distanceKm must be a finite number ≥ 0, got ${distanceKm}`);
  }
  assertDistanceBands(bands);
  const band = bands.find((b) => b.maxKm === null || distanceKm <= b.maxKm);
  if (!band) {
    throw new RangeError(`${distanceKm} km is beyond the lender's distance-band table`);
  }
  return band.days;
}

/** The transit time of one leg, with its parts. */
export interface TransitEstimate {
  /** Great-circle distance in km (IUGG mean radius). */
  distanceKm: number;
  /** Transit business days from the distance band. */
  bandDays: number;
  /** Customs days added (0 within one country). */
  customsDays: number;
  /** Whether the leg crosses a border (origin and destination countries differ). */
  crossBorder: boolean;
  /** Total transit business days: band days plus customs days. */
  totalDays: number;
}

/** Input of {@link estimateTransit}. */
export interface TransitInput {
  /** Where the shipment leaves from. */
  from: LatLng;
  /** Where the shipment goes. */
  to: LatLng;
  /** Holiday calendar (country) of the origin; only the country part is compared. */
  originCountry: CalendarCode;
  /** Holiday calendar (country) of the destination; only the country part is compared. */
  destinationCountry: CalendarCode;
  /** The lender's distance-band table (defaults to {@link DEFAULT_DISTANCE_BANDS}). */
  bands?: readonly DistanceBand[];
  /** Customs days for a cross-border leg (defaults to {@link DEFAULT_CUSTOMS_DAYS}). */
  customsDays?: number;
}

/**
 * Estimates the transit business days of one leg: distance band plus customs days when the
 * countries differ. Regions of one country (`DE-BY`, `DE-BE`) are the same customs territory.
 */
export function estimateTransit(input: TransitInput): TransitEstimate {
  const customs = input.customsDays ?? DEFAULT_CUSTOMS_DAYS;
  if (!Number.isInteger(customs) || customs < 0) {
    throw new RangeError(`customsDays must be a whole number ≥ 0, got ${customs}`);
  }
  const distanceKm = greatCircleDistanceKm(input.from, input.to);
  const bandDays = transitDays(distanceKm, input.bands ?? DEFAULT_DISTANCE_BANDS);
  const crossBorder = countryOf(input.originCountry) !== countryOf(input.destinationCountry);
  const customsDays = crossBorder ? customs : 0;
  return { distanceKm, bandDays, customsDays, crossBorder, totalDays: bandDays + customsDays };
}
