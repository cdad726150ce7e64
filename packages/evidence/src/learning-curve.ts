import { linearRegression, rSquared } from 'simple-statistics';

/** One clinician's case: its number within the evaluation and its operative time. */
export interface CurvePoint {
  caseNumber: number;
  operativeMinutes: number;
}

/**
 * A power-law learning curve y = a · x^b fitted to operative minutes (y) by case number (x).
 *
 * Fitted by ordinary least squares on the logs, ln y = ln a + b · ln x (simple-statistics
 * `linearRegression`), the usual way to fit Wright's learning curve. b < 0 means cases got
 * faster; `learningRatePercent` = 2^b · 100 is the time of case 2k as a percentage of case k.
 *
 * **Plateau.** The two-parameter power law has no finite asymptote above zero, and a loan gives
 * too few cases (often 5–40) to fit a three-parameter form y = c + a · x^b reliably. So the
 * plateau is defined as the fitted time at the last case recorded, ŷ(n): the best time the
 * evaluation itself has evidence for, not an extrapolation beyond it. `plateauCase` is the first
 * case number k (1 ≤ k ≤ n) whose fitted time is within 10 % of it, ŷ(k) ≤ 1.10 · ŷ(n). For b < 0
 * that is k = ⌈n · 1.1^(1/b)⌉; when b ≥ 0 (no speed-up) it is case 1. A longer evaluation can
 * move the plateau case later, which the report states beside the number.
 */
export interface LearningCurve {
  a: number;
  b: number;
  /** Time of case 2k as a percentage of case k (2^b · 100). */
  learningRatePercent: number;
  /** Coefficient of determination of the log-log fit (1 when all points lie on the curve). */
  rSquared: number;
  /** Highest case number used in the fit (n). */
  lastCase: number;
  /** Fitted minutes at the last case, ŷ(n): the plateau as defined above. */
  plateauMinutes: number;
  /** First case whose fitted time is within `tolerance` of the plateau. */
  plateauCase: number;
  /** Number of cases the fit used. */
  points: number;
}

/** Fewest cases with distinct case numbers for which a two-parameter fit means anything. */
export const minimumCurvePoints = 3;

/** Fitted minutes at case x. */
export function curveAt(curve: Pick<LearningCurve, 'a' | 'b'>, x: number): number {
  return curve.a * Math.pow(x, curve.b);
}

/**
 * Fits the curve; `null` with fewer than three distinct case numbers (a line through two points
 * is always exact and tells nothing). Points with a non-positive case number or time are left
 * out because their logarithm does not exist.
 */
export function fitLearningCurve(
  points: readonly CurvePoint[],
  tolerance = 0.1,
): LearningCurve | null {
  const usable = points.filter(
    (p) =>
      Number.isFinite(p.caseNumber) &&
      Number.isFinite(p.operativeMinutes) &&
      p.caseNumber >= 1 &&
      p.operativeMinutes > 0,
  );
  if (new Set(usable.map((p) => p.caseNumber)).size < minimumCurvePoints) return null;
  const logs = usable.map((p) => [Math.log(p.caseNumber), Math.log(p.operativeMinutes)]);
  const fit = linearRegression(logs);
  const a = Math.exp(fit.b);
  const b = fit.m;
  const line = (x: number) => fit.m * x + fit.b;
  const n = Math.max(...usable.map((p) => p.caseNumber));
  const plateauMinutes = a * Math.pow(n, b);
  return {
    a,
    b,
    learningRatePercent: Math.pow(2, b) * 100,
    rSquared: rSquared(logs, line),
    lastCase: n,
    plateauMinutes,
    plateauCase: plateauCaseOf(a, b, n, tolerance),
    points: usable.length,
  };
}

/** First k in 1..n with a·k^b ≤ (1 + tolerance)·a·n^b; see `LearningCurve`. */
function plateauCaseOf(a: number, b: number, n: number, tolerance: number): number {
  if (b >= 0) return 1;
  // Closed form, then a check step either side against floating-point rounding at the boundary.
  let k = Math.max(1, Math.ceil(n * Math.pow(1 + tolerance, 1 / b)));
  const limit = (1 + tolerance) * a * Math.pow(n, b);
  while (k > 1 && a * Math.pow(k - 1, b) <= limit) k -= 1;
  while (k < n && a * Math.pow(k, b) > limit) k += 1;
  return k;
}
