import { computeDestinationPoint, getDistance, getGreatCircleBearing } from 'geolib';
import { earthRadius } from 'geolib/es/constants';

/** A point as the maps API takes it. */
export interface LatLngLiteral {
  lat: number;
  lng: number;
}

/**
 * `segments + 1` points along the great circle from `from` to `to`, both ends included (geolib:
 * initial bearing, then the destination point at each fraction of the distance along it). The
 * distance and the steps use geolib's one sphere radius, so the last step lands on `to`.
 */
export function greatCirclePath(
  from: LatLngLiteral,
  to: LatLngLiteral,
  segments = 24,
): LatLngLiteral[] {
  const a = { latitude: from.lat, longitude: from.lng };
  const b = { latitude: to.lat, longitude: to.lng };
  const metres = getDistance(a, b, 0.001);
  if (metres === 0) return [from, to];
  const bearing = getGreatCircleBearing(a, b);
  const points: LatLngLiteral[] = [from];
  for (let i = 1; i < segments; i++) {
    const p = computeDestinationPoint(a, (metres * i) / segments, bearing, earthRadius);
    points.push({ lat: p.latitude, lng: p.longitude });
  }
  points.push(to);
  return points;
}
