/**
 * Target (stone) volume and ablation rate. Pure arithmetic, no I/O.
 */

/** The three perpendicular diameters of a target, in millimetres. */
export interface TargetSize {
  lengthMm: number;
  widthMm: number;
  heightMm: number;
}

/**
 * Volume of an ellipsoid with the given diameters, V = π/6 · L · W · H (mm³). Stone-burden
 * reporting approximates a stone by this ellipsoid (common practice); a sphere is the case
 * L = W = H = d, V = π/6 · d³.
 */
export function ellipsoidVolumeMm3(size: TargetSize): number {
  const { lengthMm, widthMm, heightMm } = size;
  for (const [name, value] of Object.entries({ lengthMm, widthMm, heightMm })) {
    if (!Number.isFinite(value) || value <= 0) {
      throw new RangeError(`${name} must be a positive number of millimetres, got ${value}.`);
    }
  }
  return (Math.PI / 6) * lengthMm * widthMm * heightMm;
}

/**
 * Ablation rate in mm³ per minute of energy-on (laser) time: volume ÷ minutes. `null` when
 * there is no volume or no energy time (0 or missing), because a rate over no time says nothing.
 */
export function ablationRateMm3PerMin(
  volumeMm3: number | null | undefined,
  energyMinutes: number | null | undefined,
): number | null {
  if (volumeMm3 == null || energyMinutes == null) return null;
  if (!Number.isFinite(volumeMm3) || !Number.isFinite(energyMinutes)) return null;
  if (energyMinutes <= 0 || volumeMm3 < 0) return null;
  return volumeMm3 / energyMinutes;
}

/**
 * Converts an ablation efficiency quoted per joule (bench studies quote mm³/J) to mm³ per minute
 * at a constant average power: mm³/J × W (J/s) × 60 s/min. Used to place a rate measured in cases
 * against published bench figures (a plausibility range only).
 */
export function mm3PerJouleToPerMinute(mm3PerJoule: number, watts: number): number {
  return mm3PerJoule * watts * 60;
}
