/// <reference types="google.maps" />
/**
 * Coordinates for the offline map stand-in: `LatLng`, `LatLngBounds`, `Point`, `Size` and the
 * spherical (Web) Mercator projection (EPSG:3857) in the hosted API's "world coordinates", where
 * the whole world is a 256 × 256 square at zoom 0.
 */

/** Width and height of the world at zoom 0, in world units (the hosted API's tile size). */
export const WORLD_SIZE = 256;

/**
 * Latitude at which the square Web Mercator world ends: atan(sinh(π)) ≈ 85.0511287798°
 * (EPSG:3857's area of use). Points nearer the poles are drawn on this edge.
 */
export const MAX_MERCATOR_LAT = (Math.atan(Math.sinh(Math.PI)) * 180) / Math.PI;

/** Radius of the sphere, in world units, such that 360° of longitude spans WORLD_SIZE. */
const R = WORLD_SIZE / (2 * Math.PI);

const DEG = Math.PI / 180;

/** Clamps `v` into [lo, hi]. */
export function clamp(v: number, lo: number, hi: number): number {
  return Math.min(hi, Math.max(lo, v));
}

/** Wraps a longitude into [-180, 180) unless it is already within [-180, 180]. */
export function wrapLng(lng: number): number {
  if (lng >= -180 && lng <= 180) return lng;
  return ((((lng + 180) % 360) + 360) % 360) - 180;
}

/** A latitude/longitude in degrees, as the hosted API's `LatLngLiteral`. */
export interface LatLngLike {
  lat: number;
  lng: number;
}

/** A geographic point in degrees. */
export class LatLng implements Pick<
  google.maps.LatLng,
  'lat' | 'lng' | 'equals' | 'toJSON' | 'toString' | 'toUrlValue'
> {
  private readonly latValue: number;
  private readonly lngValue: number;

  /**
   * Accepts `(lat, lng, noClampNoWrap?)` or `(literal | LatLng, noClampNoWrap?)`. Unless
   * `noClampNoWrap` is true, latitude is clamped to [-90, 90] and longitude wrapped to
   * [-180, 180], as the hosted API does.
   */
  constructor(
    latOrLiteral: number | LatLngLike | LatLng,
    lngOrNoWrap?: number | boolean | null,
    noClampNoWrap?: boolean,
  ) {
    let lat: number;
    let lng: number;
    let raw: boolean;
    if (typeof latOrLiteral === 'number') {
      lat = latOrLiteral;
      lng = Number(lngOrNoWrap);
      raw = noClampNoWrap === true;
    } else {
      const p = toLatLngLiteral(latOrLiteral);
      lat = p.lat;
      lng = p.lng;
      raw = lngOrNoWrap === true;
    }
    this.latValue = raw ? lat : clamp(lat, -90, 90);
    this.lngValue = raw ? lng : wrapLng(lng);
  }

  /** Latitude in degrees. */
  lat(): number {
    return this.latValue;
  }

  /** Longitude in degrees. */
  lng(): number {
    return this.lngValue;
  }

  /** Whether `other` has the same coordinates (within 1e-9°, as the hosted API rounds). */
  equals(other: google.maps.LatLng | LatLng | null): boolean {
    if (!other) return false;
    return (
      Math.abs(this.latValue - other.lat()) <= 1e-9 && Math.abs(this.lngValue - other.lng()) <= 1e-9
    );
  }

  /** The literal form `{lat, lng}`. */
  toJSON(): google.maps.LatLngLiteral {
    return { lat: this.latValue, lng: this.lngValue };
  }

  /** `(lat, lng)`, as the hosted API prints it. */
  toString(): string {
    return `(${this.latValue}, ${this.lngValue})`;
  }

  /** `lat,lng` rounded to `precision` decimals (default 6). */
  toUrlValue(precision = 6): string {
    const round = (v: number) => String(Number(v.toFixed(precision)));
    return `${round(this.latValue)},${round(this.lngValue)}`;
  }
}

/** Reads a `LatLng` or a `{lat, lng}` literal. */
export function toLatLngLiteral(p: LatLngLike | LatLng | google.maps.LatLng): LatLngLike {
  if (typeof (p as LatLng).lat === 'function') {
    const ll = p as LatLng;
    return { lat: ll.lat(), lng: ll.lng() };
  }
  const lit = p as LatLngLike;
  return { lat: Number(lit.lat), lng: Number(lit.lng) };
}

/** Turns either form into a `LatLng` (literals are clamped and wrapped, LatLngs kept). */
export function toLatLng(p: LatLngLike | LatLng | google.maps.LatLng): LatLng {
  return p instanceof LatLng ? p : new LatLng(toLatLngLiteral(p));
}

/** A point in world or pixel units. */
export class Point implements Pick<google.maps.Point, 'x' | 'y' | 'equals' | 'toString'> {
  /** Creates a point at (x, y). */
  constructor(
    public x: number,
    public y: number,
  ) {}

  /** Whether `other` has the same coordinates. */
  equals(other: google.maps.Point | Point | null): boolean {
    return !!other && other.x === this.x && other.y === this.y;
  }

  /** `(x, y)`. */
  toString(): string {
    return `(${this.x}, ${this.y})`;
  }
}

/** A two-dimensional size in pixels. */
export class Size implements Pick<google.maps.Size, 'width' | 'height' | 'equals' | 'toString'> {
  /** Creates a size of width × height. */
  constructor(
    public width: number,
    public height: number,
  ) {}

  /** Whether `other` has the same width and height. */
  equals(other: google.maps.Size | Size | null): boolean {
    return !!other && other.width === this.width && other.height === this.height;
  }

  /** `(width, height)`. */
  toString(): string {
    return `(${this.width}, ${this.height})`;
  }
}

/**
 * Projects degrees to world coordinates with the spherical Mercator formula (EPSG:3857):
 * x = R·λ, y = R·ln(tan(π/4 + φ/2)), shifted so the world spans [0, 256] with north up.
 * Latitude is clamped to ±MAX_MERCATOR_LAT, where the square world ends.
 */
export function project(lat: number, lng: number): { x: number; y: number } {
  const phi = clamp(lat, -MAX_MERCATOR_LAT, MAX_MERCATOR_LAT) * DEG;
  return {
    x: WORLD_SIZE / 2 + R * lng * DEG,
    y: WORLD_SIZE / 2 - R * Math.log(Math.tan(Math.PI / 4 + phi / 2)),
  };
}

/** Inverse of `project`: world coordinates back to degrees (longitude not wrapped). */
export function unproject(x: number, y: number): { lat: number; lng: number } {
  const lng = (x - WORLD_SIZE / 2) / R / DEG;
  const lat = (2 * Math.atan(Math.exp((WORLD_SIZE / 2 - y) / R)) - Math.PI / 2) / DEG;
  return { lat, lng };
}

/** The map projection object that `Map.getProjection()` returns. */
export const mercatorProjection: google.maps.Projection = {
  fromLatLngToPoint(latLng, point) {
    const { lat, lng } = toLatLngLiteral(latLng);
    const p = project(lat, lng);
    if (point) {
      point.x = p.x;
      point.y = p.y;
      return point;
    }
    return new Point(p.x, p.y);
  },
  fromPointToLatLng(point, noClampNoWrap) {
    const { lat, lng } = unproject(point.x, point.y);
    return new LatLng(lat, lng, noClampNoWrap ?? false) as unknown as google.maps.LatLng;
  },
};

/** Positive distance going east from `a` to `b`, in [0, 360). */
function eastward(a: number, b: number): number {
  const d = b - a;
  return d >= 0 ? d : d + 360;
}

/**
 * A longitude interval on the circle, stored as [lo, hi] going east from lo to hi; lo > hi means it
 * crosses the antimeridian. Empty is [180, -180], full is [-180, 180]. The rules (extend to the
 * nearer side, union with the smaller gap) follow the S1Interval class of the open-source S2
 * geometry library, which is what the hosted API's bounds also behave like.
 */
class LngInterval {
  constructor(
    public lo: number,
    public hi: number,
  ) {
    // -180 and 180 are the same meridian; keep the canonical forms of empty and full.
    if (lo === -180 && hi !== 180) this.lo = 180;
    if (hi === -180 && lo !== -180) this.hi = 180;
  }

  static empty(): LngInterval {
    // Bypasses the constructor's normalisation, which would turn [180, -180] into [180, 180].
    const e = new LngInterval(0, 0);
    e.lo = 180;
    e.hi = -180;
    return e;
  }

  isEmpty(): boolean {
    return this.lo - this.hi === 360;
  }

  isFull(): boolean {
    return this.hi - this.lo === 360;
  }

  isInverted(): boolean {
    return this.lo > this.hi;
  }

  contains(p: number): boolean {
    if (p === -180) p = 180;
    return this.fastContains(p);
  }

  fastContains(p: number): boolean {
    if (this.isInverted()) return (p >= this.lo || p <= this.hi) && !this.isEmpty();
    return p >= this.lo && p <= this.hi;
  }

  containsInterval(y: LngInterval): boolean {
    if (this.isInverted()) {
      if (y.isInverted()) return y.lo >= this.lo && y.hi <= this.hi;
      return (y.lo >= this.lo || y.hi <= this.hi) && !this.isEmpty();
    }
    if (y.isInverted()) return this.isFull() || y.isEmpty();
    return y.lo >= this.lo && y.hi <= this.hi;
  }

  intersects(y: LngInterval): boolean {
    if (this.isEmpty() || y.isEmpty()) return false;
    if (this.isInverted()) return y.isInverted() || y.lo <= this.hi || y.hi >= this.lo;
    if (y.isInverted()) return y.lo <= this.hi || y.hi >= this.lo;
    return y.lo <= this.hi && y.hi >= this.lo;
  }

  extend(p: number): void {
    if (p === -180) p = 180;
    if (this.fastContains(p)) return;
    if (this.isEmpty()) {
      this.lo = p;
      this.hi = p;
    } else if (eastward(p, this.lo) < eastward(this.hi, p)) {
      this.lo = p;
    } else {
      this.hi = p;
    }
  }

  union(y: LngInterval): void {
    if (y.isEmpty()) return;
    if (this.fastContains(y.lo)) {
      if (this.fastContains(y.hi)) {
        if (this.containsInterval(y)) return;
        this.lo = -180;
        this.hi = 180;
        return;
      }
      this.hi = y.hi;
      return;
    }
    if (this.fastContains(y.hi)) {
      this.lo = y.lo;
      return;
    }
    if (this.isEmpty() || y.fastContains(this.lo)) {
      this.lo = y.lo;
      this.hi = y.hi;
      return;
    }
    if (eastward(y.hi, this.lo) < eastward(this.hi, y.lo)) this.lo = y.lo;
    else this.hi = y.hi;
  }

  center(): number {
    const c = (this.lo + this.hi) / 2;
    if (!this.isInverted()) return c;
    return c <= 0 ? c + 180 : c - 180;
  }

  span(): number {
    if (this.isEmpty()) return 0;
    return this.isInverted() ? 360 - (this.lo - this.hi) : this.hi - this.lo;
  }
}

/** The hosted API's `LatLngBoundsLiteral`. */
export interface BoundsLiteral {
  south: number;
  west: number;
  north: number;
  east: number;
}

function isBoundsLiteral(v: unknown): v is BoundsLiteral {
  return (
    !!v &&
    typeof v === 'object' &&
    typeof (v as BoundsLiteral).south === 'number' &&
    typeof (v as BoundsLiteral).north === 'number'
  );
}

/** A latitude/longitude rectangle, which may cross the antimeridian. */
export class LatLngBounds implements Pick<
  google.maps.LatLngBounds,
  | 'contains'
  | 'equals'
  | 'extend'
  | 'getCenter'
  | 'getNorthEast'
  | 'getSouthWest'
  | 'intersects'
  | 'isEmpty'
  | 'toJSON'
  | 'toSpan'
  | 'toString'
  | 'toUrlValue'
  | 'union'
> {
  private latLo = 1;
  private latHi = -1;
  private lng = LngInterval.empty();

  /**
   * Accepts `(sw, ne)` corners, a `LatLngBounds`, a `{south, west, north, east}` literal, or
   * nothing for empty bounds.
   */
  constructor(
    swOrBounds?: LatLngLike | LatLng | LatLngBounds | BoundsLiteral | google.maps.LatLng | null,
    ne?: LatLngLike | LatLng | google.maps.LatLng | null,
  ) {
    if (!swOrBounds) return;
    if (swOrBounds instanceof LatLngBounds) {
      this.union(swOrBounds);
      return;
    }
    if (isBoundsLiteral(swOrBounds)) {
      this.setCorners(swOrBounds.south, swOrBounds.west, swOrBounds.north, swOrBounds.east);
      return;
    }
    const sw = toLatLng(swOrBounds as LatLngLike);
    const nePoint = ne ? toLatLng(ne) : sw;
    this.setCorners(sw.lat(), sw.lng(), nePoint.lat(), nePoint.lng());
  }

  private setCorners(south: number, west: number, north: number, east: number): void {
    this.latLo = clamp(south, -90, 90);
    this.latHi = clamp(north, -90, 90);
    if (east - west >= 360) {
      this.lng = new LngInterval(-180, 180);
    } else {
      this.lng = new LngInterval(wrapLng(west), wrapLng(east));
    }
  }

  /** Whether the point lies inside (edges included). */
  contains(latLng: google.maps.LatLng | google.maps.LatLngLiteral | LatLng): boolean {
    const p = toLatLngLiteral(latLng);
    return p.lat >= this.latLo && p.lat <= this.latHi && this.lng.contains(wrapLng(p.lng));
  }

  /** Whether both bounds have the same edges (within 1e-9°), or are both empty. */
  equals(
    other: google.maps.LatLngBounds | google.maps.LatLngBoundsLiteral | LatLngBounds | null,
  ): boolean {
    if (!other) return false;
    const o = other instanceof LatLngBounds ? other : new LatLngBounds(toBounds(other));
    if (this.isEmpty() || o.isEmpty()) return this.isEmpty() && o.isEmpty();
    const a = this.toJSON();
    const b = o.toJSON();
    return (['south', 'west', 'north', 'east'] as const).every(
      (k) => Math.abs(a[k] - b[k]) <= 1e-9,
    );
  }

  /** Grows the bounds to include the point, on whichever side adds the smaller longitude span. */
  extend(point: google.maps.LatLng | google.maps.LatLngLiteral | LatLng): this {
    const p = toLatLng(point);
    if (this.latLo > this.latHi) {
      this.latLo = p.lat();
      this.latHi = p.lat();
    } else {
      this.latLo = Math.min(this.latLo, p.lat());
      this.latHi = Math.max(this.latHi, p.lat());
    }
    this.lng.extend(p.lng());
    return this;
  }

  /** Latitude midpoint and longitude midpoint (going east from west to east edge). */
  getCenter(): google.maps.LatLng {
    return new LatLng(
      (this.latLo + this.latHi) / 2,
      this.lng.center(),
    ) as unknown as google.maps.LatLng;
  }

  /** North-east corner. */
  getNorthEast(): google.maps.LatLng {
    return new LatLng(this.latHi, this.lng.hi, true) as unknown as google.maps.LatLng;
  }

  /** South-west corner. */
  getSouthWest(): google.maps.LatLng {
    return new LatLng(this.latLo, this.lng.lo, true) as unknown as google.maps.LatLng;
  }

  /** Whether the two rectangles share at least one point. */
  intersects(
    other: google.maps.LatLngBounds | google.maps.LatLngBoundsLiteral | LatLngBounds,
  ): boolean {
    const o = other instanceof LatLngBounds ? other : new LatLngBounds(toBounds(other));
    if (this.isEmpty() || o.isEmpty()) return false;
    return this.latLo <= o.latHi && o.latLo <= this.latHi && this.lng.intersects(o.lng);
  }

  /** Whether the bounds hold no point. */
  isEmpty(): boolean {
    return this.latLo > this.latHi || this.lng.isEmpty();
  }

  /** The literal form. */
  toJSON(): google.maps.LatLngBoundsLiteral {
    return { south: this.latLo, west: this.lng.lo, north: this.latHi, east: this.lng.hi };
  }

  /** Latitude span and longitude span as a LatLng. */
  toSpan(): google.maps.LatLng {
    const latSpan = this.latLo > this.latHi ? 0 : this.latHi - this.latLo;
    return new LatLng(latSpan, this.lng.span(), true) as unknown as google.maps.LatLng;
  }

  /** `((south, west), (north, east))`. */
  toString(): string {
    return `(${this.getSouthWest().toString()}, ${this.getNorthEast().toString()})`;
  }

  /** `south,west,north,east` rounded to `precision` decimals (default 6). */
  toUrlValue(precision = 6): string {
    return `${this.getSouthWest().toUrlValue(precision)},${this.getNorthEast().toUrlValue(precision)}`;
  }

  /** Grows the bounds to contain `other` too. */
  union(other: google.maps.LatLngBounds | google.maps.LatLngBoundsLiteral | LatLngBounds): this {
    const o = other instanceof LatLngBounds ? other : new LatLngBounds(toBounds(other));
    if (o.isEmpty()) return this;
    if (this.latLo > this.latHi) {
      this.latLo = o.latLo;
      this.latHi = o.latHi;
    } else {
      this.latLo = Math.min(this.latLo, o.latLo);
      this.latHi = Math.max(this.latHi, o.latHi);
    }
    this.lng.union(o.lng);
    return this;
  }

  /** Longitude span in degrees going east from the west edge (0 when empty). */
  lngSpan(): number {
    return this.lng.span();
  }
}

/** Reads bounds given as a `LatLngBounds` (of this stand-in or look-alike) or a literal. */
export function toBounds(
  b: google.maps.LatLngBounds | google.maps.LatLngBoundsLiteral | LatLngBounds,
): LatLngBounds {
  if (b instanceof LatLngBounds) return b;
  if (isBoundsLiteral(b)) return new LatLngBounds(b);
  const json = (b as google.maps.LatLngBounds).toJSON();
  return new LatLngBounds(json);
}
