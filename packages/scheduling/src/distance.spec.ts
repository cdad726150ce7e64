import { earthRadius } from 'geolib/es/constants';

import {
  DEFAULT_DISTANCE_BANDS,
  IUGG_MEAN_EARTH_RADIUS_M,
  assertDistanceBands,
  centralAngleRad,
  ellipsoidalDistanceKm,
  estimateTransit,
  greatCircleDistanceKm,
  transitDays,
} from './distance';

// Aviation Formulary (E. Williams), worked example: LAX 33°57′N 118°24′W, JFK 40°38′N 73°47′W.
const LAX = { lat: 33 + 57 / 60, lng: -(118 + 24 / 60) };
const JFK = { lat: 40 + 38 / 60, lng: -(73 + 47 / 60) };

describe('great-circle distance', () => {
  it('uses geolib’s spherical law of cosines with the WGS 84 equatorial radius', () => {
    // geolib 3.3 source: getDistance = acos(sin φ1 sin φ2 + cos φ1 cos φ2 cos Δλ) · earthRadius,
    // earthRadius = 6,378,137 m (WGS 84 semi-major axis). Our rescaling relies on this radius.
    expect(earthRadius).toBe(6_378_137);
  });

  it('matches the Aviation Formulary central angle for LAX–JFK', () => {
    // Aviation Formulary: d = 0.623585 rad; it prints 6 decimals, so allow half a unit in the last.
    expect(Math.abs(centralAngleRad(LAX, JFK) - 0.623585)).toBeLessThan(5e-7);
  });

  it('gives 2144 nm for LAX–JFK', () => {
    // Aviation Formulary: 0.623585 rad = 2144 nm, one nautical mile per minute of arc.
    const nauticalMiles = centralAngleRad(LAX, JFK) * (180 / Math.PI) * 60;
    expect(Math.round(nauticalMiles)).toBe(2144);
  });

  it('gives 3,972.86 km for LAX–JFK on the IUGG mean-radius sphere', () => {
    // docs/references.md (derived): 0.623585 rad × 6,371.0088 km = 3,972.86 km. Tolerance
    // 0.01 km: the rounding of the printed angle (±5e-7 rad) alone is ±0.003 km.
    expect(IUGG_MEAN_EARTH_RADIUS_M).toBe(6_371_008.8);
    expect(Math.abs(greatCircleDistanceKm(LAX, JFK) - 3972.86)).toBeLessThan(0.01);
  });

  it('stays within 0.5 % of the ellipsoidal (Vincenty) distance', () => {
    // From memory: a sphere with the mean radius errs by up to about 0.5 % against the WGS 84
    // ellipsoid. Plausibility only; geolib's getPreciseDistance implements Vincenty's formula.
    const sphere = greatCircleDistanceKm(LAX, JFK);
    const ellipsoid = ellipsoidalDistanceKm(LAX, JFK);
    expect(Math.abs(sphere - ellipsoid) / ellipsoid).toBeLessThan(0.005);
  });

  it('is symmetric and zero for the same point', () => {
    expect(greatCircleDistanceKm(JFK, LAX)).toBeCloseTo(greatCircleDistanceKm(LAX, JFK), 9);
    expect(greatCircleDistanceKm(LAX, LAX)).toBe(0);
  });

  it('gives a quarter meridian of π/2 · R', () => {
    // Geometry: equator to pole is a quarter of a great circle, π/2 · 6,371.0088 km ≈ 10,007.54 km.
    const km = greatCircleDistanceKm({ lat: 0, lng: 0 }, { lat: 90, lng: 0 });
    expect(km).toBeCloseTo((Math.PI / 2) * 6371.0088, 2);
  });

  it('rejects impossible coordinates', () => {
    expect(() => greatCircleDistanceKm({ lat: 91, lng: 0 }, LAX)).toThrow(RangeError);
    expect(() => greatCircleDistanceKm({ lat: 0, lng: Number.NaN }, LAX)).toThrow(RangeError);
  });
});

describe('transit days from distance bands', () => {
  // The default table is the product's own assumption (≤300→1, ≤1000→2, ≤2500→3, ≤5000→4, else 5);
  // these checks pin the band edges, which are inclusive.
  it.each([
    [0, 1],
    [300, 1],
    [300.001, 2],
    [1000, 2],
    [1000.5, 3],
    [2500, 3],
    [5000, 4],
    [5000.1, 5],
    [20_000, 5],
  ])('%d km → %d days', (km, days) => {
    expect(transitDays(km, DEFAULT_DISTANCE_BANDS)).toBe(days);
  });

  it('puts LAX–JFK in the 2,500–5,000 km band', () => {
    expect(transitDays(greatCircleDistanceKm(LAX, JFK))).toBe(4);
  });

  it('uses a lender’s own table', () => {
    const bands = [
      { maxKm: 50, days: 0 },
      { maxKm: 800, days: 1 },
    ];
    expect(transitDays(20, bands)).toBe(0);
    expect(transitDays(800, bands)).toBe(1);
    expect(() => transitDays(801, bands)).toThrow(/beyond/);
  });

  it('rejects malformed tables', () => {
    expect(() => assertDistanceBands([])).toThrow(RangeError);
    expect(() =>
      assertDistanceBands([
        { maxKm: 500, days: 1 },
        { maxKm: 400, days: 2 },
      ]),
    ).toThrow(/increase/);
    expect(() =>
      assertDistanceBands([
        { maxKm: null, days: 1 },
        { maxKm: 400, days: 2 },
      ]),
    ).toThrow(/last band/);
    expect(() => assertDistanceBands([{ maxKm: 100, days: -1 }])).toThrow(RangeError);
  });

  it('adds customs days across a border only', () => {
    const depot = { lat: 50.11, lng: 8.68 };
    const hospital = { lat: 39.95, lng: -75.17 };
    const abroad = estimateTransit({
      from: depot,
      to: hospital,
      originCountry: 'DE',
      destinationCountry: 'US',
    });
    // About 6,330 km: beyond 5,000 km → 5 days, plus the default 2 customs days.
    expect(abroad).toMatchObject({ bandDays: 5, customsDays: 2, crossBorder: true, totalDays: 7 });
    const regional = estimateTransit({
      from: { lat: 48.14, lng: 11.58 },
      to: { lat: 52.52, lng: 13.4 },
      originCountry: 'DE-BY',
      destinationCountry: 'DE-BE',
      customsDays: 3,
    });
    // About 500 km inside one customs territory: 2 days, no customs.
    expect(regional).toMatchObject({ bandDays: 2, customsDays: 0, crossBorder: false });
  });
});
