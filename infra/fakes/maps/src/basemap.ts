/**
 * Base-map geometry: Natural Earth 1:110m country outlines (from the `world-atlas` package's
 * TopoJSON), turned into SVG path data in world units (a 256 × 256 Web Mercator square) once per
 * page, plus a graticule whose spacing follows the zoom.
 */
import { feature, mesh } from 'topojson-client';
import type { GeometryCollection, Topology } from 'topojson-specification';
import type { MultiLineString, MultiPolygon, Polygon } from 'geojson';
import countries110m from 'world-atlas/countries-110m.json';
import { MAX_MERCATOR_LAT, project, WORLD_SIZE } from './geo';

type Ring = number[][];

/** Path data for the three base-map layers, in world units. */
export interface BaseMapPaths {
  /** Land areas (countries merged), filled and outlined as coastline. */
  land: string;
  /** Borders between two countries (each drawn once). */
  borders: string;
}

/**
 * Makes a ring's longitudes continuous: where consecutive points jump by more than 180° (the
 * data splits shapes at the antimeridian, and merging countries joins the pieces), the rest of
 * the ring is shifted by 360°. A ring that then ends 360° away from its start goes round a pole
 * (Antarctica); it is closed along that pole, as a Mercator map shows it.
 */
export function unwrapRing(ring: Ring): Ring {
  if (ring.length === 0) return ring;
  const out: Ring = [[ring[0][0], ring[0][1]]];
  let offset = 0;
  for (let i = 1; i < ring.length; i++) {
    let lng = ring[i][0] + offset;
    const prev = out[i - 1][0];
    if (lng - prev > 180) {
      offset -= 360;
      lng -= 360;
    } else if (lng - prev < -180) {
      offset += 360;
      lng += 360;
    }
    out.push([lng, ring[i][1]]);
  }
  const first = out[0];
  const last = out[out.length - 1];
  if (Math.abs(last[0] - first[0]) > 180) {
    const meanLat = out.reduce((sum, p) => sum + p[1], 0) / out.length;
    const poleLat = meanLat < 0 ? -90 : 90;
    out.push([last[0], poleLat], [first[0], poleLat], [first[0], first[1]]);
  }
  return out;
}

/** Projected base-map geometry: flat [x0, y0, x1, y1, ...] arrays in world units. */
export interface WorldGeometry {
  /** Land rings (outer rings and holes), closed. */
  rings: Float64Array[];
  /** Country border lines. */
  lines: Float64Array[];
  /** Bounding box of each ring: [minX, minY, maxX, maxY]. */
  ringBoxes: Float64Array[];
  /** Bounding box of each line. */
  lineBoxes: Float64Array[];
}

function toFlat(ring: Ring): Float64Array {
  const out = new Float64Array(ring.length * 2);
  ring.forEach(([lng, lat], i) => {
    const p = project(lat, lng);
    out[2 * i] = p.x;
    out[2 * i + 1] = p.y;
  });
  return out;
}

function boxOf(a: Float64Array): Float64Array {
  let minX = Infinity;
  let minY = Infinity;
  let maxX = -Infinity;
  let maxY = -Infinity;
  for (let i = 0; i < a.length; i += 2) {
    minX = Math.min(minX, a[i]);
    maxX = Math.max(maxX, a[i]);
    minY = Math.min(minY, a[i + 1]);
    maxY = Math.max(maxY, a[i + 1]);
  }
  return Float64Array.of(minX, minY, maxX, maxY);
}

let geometry: WorldGeometry | undefined;

/** The projected outlines, computed on first use and kept for the page's lifetime. */
export function worldGeometry(): WorldGeometry {
  if (geometry) return geometry;
  const topo = countries110m as unknown as Topology<{
    countries: GeometryCollection;
    land: GeometryCollection;
  }>;
  const landCollection = feature(topo, topo.objects.land);
  const rings: Ring[] = [];
  for (const f of landCollection.features) {
    const g = f.geometry as MultiPolygon | Polygon;
    const polygons = g.type === 'Polygon' ? [g.coordinates] : g.coordinates;
    for (const polygon of polygons) for (const ring of polygon) rings.push(unwrapRing(ring));
  }
  // Borders shared by two different countries; coastlines come from the land outline.
  const borders = mesh(topo, topo.objects.countries, (a, b) => a !== b) as MultiLineString;
  const flatRings = rings.filter((r) => r.length > 2).map(toFlat);
  const flatLines = borders.coordinates.filter((l) => l.length > 1).map(toFlat);
  geometry = {
    rings: flatRings,
    lines: flatLines,
    ringBoxes: flatRings.map(boxOf),
    lineBoxes: flatLines.map(boxOf),
  };
  return geometry;
}

const r3 = (v: number) => Math.round(v * 1000) / 1000;

function flatToPath(a: Float64Array, close: boolean): string {
  const pts: string[] = [];
  for (let i = 0; i < a.length; i += 2) pts.push(`${r3(a[i])} ${r3(a[i + 1])}`);
  return `M${pts.join(' ')}${close ? 'Z' : ''}`;
}

let cached: BaseMapPaths | undefined;

/** The base-map paths in world units (drawn scaled, at low and middle zooms). */
export function baseMapPaths(): BaseMapPaths {
  if (cached) return cached;
  const g = worldGeometry();
  cached = {
    land: g.rings.map((r) => flatToPath(r, true)).join(''),
    borders: g.lines.map((l) => flatToPath(l, false)).join(''),
  };
  return cached;
}

/** A rectangle in world units: [minX, minY, maxX, maxY]. */
export type WorldRect = [number, number, number, number];

/**
 * Clips a closed ring to a rectangle (Sutherland–Hodgman). The result may run along the
 * rectangle's edges, which is harmless for a fill and off-screen when the rectangle is larger
 * than the view.
 */
export function clipRing(ring: Float64Array, dx: number, rect: WorldRect): number[] {
  let pts: number[] = [];
  for (let i = 0; i < ring.length; i += 2) pts.push(ring[i] + dx, ring[i + 1]);
  const edges: [number, number, boolean][] = [
    [0, rect[0], true], // x >= minX
    [0, rect[2], false], // x <= maxX
    [1, rect[1], true], // y >= minY
    [1, rect[3], false], // y <= maxY
  ];
  for (const [axis, bound, isMin] of edges) {
    if (pts.length === 0) break;
    const out: number[] = [];
    const inside = (i: number) => (isMin ? pts[i + axis] >= bound : pts[i + axis] <= bound);
    const n = pts.length;
    for (let i = 0; i < n; i += 2) {
      const j = (i + n - 2) % n; // previous point
      const cur = inside(i);
      const prev = inside(j);
      if (cur !== prev) {
        const t = (bound - pts[j + axis]) / (pts[i + axis] - pts[j + axis]);
        out.push(pts[j] + t * (pts[i] - pts[j]), pts[j + 1] + t * (pts[i + 1] - pts[j + 1]));
      }
      if (cur) out.push(pts[i], pts[i + 1]);
    }
    pts = out;
  }
  return pts;
}

/** Clips one segment to a rectangle (Liang–Barsky); null when it misses. */
function clipSegment(
  x0: number,
  y0: number,
  x1: number,
  y1: number,
  rect: WorldRect,
): [number, number, number, number] | null {
  let t0 = 0;
  let t1 = 1;
  const dx = x1 - x0;
  const dy = y1 - y0;
  const tests: [number, number][] = [
    [-dx, x0 - rect[0]],
    [dx, rect[2] - x0],
    [-dy, y0 - rect[1]],
    [dy, rect[3] - y0],
  ];
  for (const [p, q] of tests) {
    if (p === 0) {
      if (q < 0) return null;
    } else {
      const r = q / p;
      if (p < 0) t0 = Math.max(t0, r);
      else t1 = Math.min(t1, r);
      if (t0 > t1) return null;
    }
  }
  return [x0 + t0 * dx, y0 + t0 * dy, x0 + t1 * dx, y0 + t1 * dy];
}

/** The view a near-zoom drawing is made for. */
export interface NearView {
  /** Centre in world units. */
  cx: number;
  cy: number;
  /** Pixels per world unit (2^zoom). */
  scale: number;
  /** Size of the map in pixels. */
  w: number;
  h: number;
}

/**
 * Land and border paths in screen pixels for a close view: only the outlines near the view,
 * clipped to it (plus a margin). Used at high zooms, where scaling the whole world's paths by
 * 2^zoom exceeds what browsers draw reliably.
 */
export function nearPaths(view: NearView): BaseMapPaths {
  const g = worldGeometry();
  const margin = 16 / view.scale;
  const halfW = view.w / 2 / view.scale + margin;
  const halfH = view.h / 2 / view.scale + margin;
  const rect: WorldRect = [view.cx - halfW, view.cy - halfH, view.cx + halfW, view.cy + halfH];
  const sx = (x: number) => r3((x - view.cx) * view.scale + view.w / 2);
  const sy = (y: number) => r3((y - view.cy) * view.scale + view.h / 2);
  const shifts = [-WORLD_SIZE, 0, WORLD_SIZE];
  const land: string[] = [];
  g.rings.forEach((ring, i) => {
    const b = g.ringBoxes[i];
    for (const dx of shifts) {
      if (b[2] + dx < rect[0] || b[0] + dx > rect[2] || b[3] < rect[1] || b[1] > rect[3]) continue;
      const pts = clipRing(ring, dx, rect);
      if (pts.length < 6) continue;
      const parts: string[] = [];
      for (let k = 0; k < pts.length; k += 2) parts.push(`${sx(pts[k])} ${sy(pts[k + 1])}`);
      land.push(`M${parts.join(' ')}Z`);
    }
  });
  const borders: string[] = [];
  g.lines.forEach((line, i) => {
    const b = g.lineBoxes[i];
    for (const dx of shifts) {
      if (b[2] + dx < rect[0] || b[0] + dx > rect[2] || b[3] < rect[1] || b[1] > rect[3]) continue;
      for (let k = 2; k < line.length; k += 2) {
        const seg = clipSegment(line[k - 2] + dx, line[k - 1], line[k] + dx, line[k + 1], rect);
        if (seg) borders.push(`M${sx(seg[0])} ${sy(seg[1])}L${sx(seg[2])} ${sy(seg[3])}`);
      }
    }
  });
  return { land: land.join(''), borders: borders.join('') };
}

/** Graticule path in screen pixels for a close view (lines every `step` degrees). */
export function nearGraticulePath(view: NearView, step: number): string {
  const parts: string[] = [];
  const left = view.cx - view.w / 2 / view.scale;
  const right = view.cx + view.w / 2 / view.scale;
  const unitsPerDeg = WORLD_SIZE / 360;
  for (
    let x = Math.ceil(left / unitsPerDeg / step) * step * unitsPerDeg;
    x <= right;
    x += step * unitsPerDeg
  ) {
    parts.push(`M${r3((x - view.cx) * view.scale + view.w / 2)} 0V${view.h}`);
  }
  const maxLat = Math.floor(MAX_MERCATOR_LAT / step) * step;
  for (let lat = -maxLat; lat <= maxLat; lat += step) {
    const y = (project(lat, 0).y - view.cy) * view.scale + view.h / 2;
    if (y >= 0 && y <= view.h) parts.push(`M0 ${r3(y)}H${view.w}`);
  }
  return parts.join('');
}

/** Graticule spacings in degrees, finest first. */
const GRATICULE_STEPS = [1, 2, 5, 10, 15, 30];

/** Degrees between graticule lines at `zoom`: lines at least ~120 px apart on screen. */
export function graticuleStep(zoom: number): number {
  const worldPx = WORLD_SIZE * 2 ** zoom;
  const minDeg = (120 * 360) / worldPx;
  return GRATICULE_STEPS.find((s) => s >= minDeg) ?? GRATICULE_STEPS[GRATICULE_STEPS.length - 1];
}

/** Graticule path data (meridians and parallels every `step` degrees) in world units. */
export function graticulePath(step: number): string {
  const parts: string[] = [];
  for (let lng = -180; lng < 180; lng += step) {
    const x = r3(project(0, lng).x);
    parts.push(`M${x} 0V${WORLD_SIZE}`);
  }
  const maxLat = Math.floor(MAX_MERCATOR_LAT / step) * step;
  for (let lat = -maxLat; lat <= maxLat; lat += step) {
    const y = r3(project(lat, 0).y);
    parts.push(`M0 ${y}H${WORLD_SIZE}`);
  }
  return parts.join('');
}
