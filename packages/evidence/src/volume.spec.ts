import { ablationRateMm3PerMin, ellipsoidVolumeMm3, mm3PerJouleToPerMinute } from './volume';

describe('ellipsoidVolumeMm3', () => {
  it('gives a 20 mm sphere 4,188.8 mm³', () => {
    // Geometry: sphere V = 4/3·π·r³ = π/6·d³; 20 mm → 4,188.79 mm³ (docs/references.md).
    expect(ellipsoidVolumeMm3({ lengthMm: 20, widthMm: 20, heightMm: 20 })).toBeCloseTo(4188.79, 2);
    expect(ellipsoidVolumeMm3({ lengthMm: 20, widthMm: 20, heightMm: 20 })).toBeCloseTo(
      (4 / 3) * Math.PI * 10 ** 3,
      9,
    );
  });

  it('multiplies the three diameters of an ellipsoid', () => {
    // Ellipsoid V = 4/3·π·a·b·c with semi-axes a, b, c (geometry): 12 × 8 × 6 mm → 4/3·π·6·4·3.
    expect(ellipsoidVolumeMm3({ lengthMm: 12, widthMm: 8, heightMm: 6 })).toBeCloseTo(
      (4 / 3) * Math.PI * 6 * 4 * 3,
      9,
    );
  });

  it.each([0, -1, Number.NaN, Number.POSITIVE_INFINITY])('refuses a diameter of %p', (d) => {
    expect(() => ellipsoidVolumeMm3({ lengthMm: 10, widthMm: d, heightMm: 10 })).toThrow(
      /widthMm must be a positive number/,
    );
  });
});

describe('ablationRateMm3PerMin', () => {
  it('divides volume by energy-on minutes', () => {
    expect(ablationRateMm3PerMin(4188.79, 20)).toBeCloseTo(209.44, 2);
  });

  it.each([
    [100, 0],
    [100, null],
    [null, 5],
    [100, undefined],
  ])('is undefined (null) for volume %p over %p minutes', (v, t) => {
    expect(ablationRateMm3PerMin(v, t)).toBeNull();
  });
});

describe('mm3PerJouleToPerMinute', () => {
  it('puts the published bench range at 10 W into mm³/min', () => {
    // In-vitro pulsed thulium laser at 10 W: 0.021–0.039 mm³/J (World J Urol 2023, via
    // docs/references.md) → about 12.6–23.4 mm³/min (derived there by the same rule).
    expect(mm3PerJouleToPerMinute(0.021, 10)).toBeCloseTo(12.6, 9);
    expect(mm3PerJouleToPerMinute(0.039, 10)).toBeCloseTo(23.4, 9);
  });
});
