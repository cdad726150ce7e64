import fc from 'fast-check';
import { curveAt, fitLearningCurve } from './learning-curve';

const onCurve = (a: number, b: number, n: number) =>
  Array.from({ length: n }, (_, i) => ({ caseNumber: i + 1, operativeMinutes: a * (i + 1) ** b }));

describe('fitLearningCurve', () => {
  it('recovers a and b of an exact power law', () => {
    // y = 100·x^−0.5 exactly: the log-log least-squares line is ln y = ln 100 − 0.5·ln x.
    const curve = fitLearningCurve(onCurve(100, -0.5, 40))!;
    expect(curve.a).toBeCloseTo(100, 9);
    expect(curve.b).toBeCloseTo(-0.5, 12);
    expect(curve.rSquared).toBeCloseTo(1, 12);
  });

  it('finds the plateau case of a curve with a known answer', () => {
    // Derived by hand: plateau ŷ(40) = 100/√40 = 15.811; within 10 % means ŷ(k) ≤ 17.393,
    // i.e. k ≥ 40 · 1.1^(1/−0.5) = 40/1.21 = 33.06 → case 34 (ŷ(33) = 17.408, ŷ(34) = 17.150).
    const curve = fitLearningCurve(onCurve(100, -0.5, 40))!;
    expect(curve.plateauMinutes).toBeCloseTo(100 / Math.sqrt(40), 9);
    expect(curve.plateauCase).toBe(34);
    expect(curveAt(curve, 33)).toBeGreaterThan(1.1 * curve.plateauMinutes);
    expect(curveAt(curve, 34)).toBeLessThanOrEqual(1.1 * curve.plateauMinutes);
  });

  it('gives the 80 % learning rate of a Wright curve with b = log2(0.8)', () => {
    // Wright (1936): each doubling of cumulative output multiplies unit time by the learning
    // rate; an 80 % curve has b = log2(0.8) ≈ −0.3219 (textbook value, from memory).
    const curve = fitLearningCurve(onCurve(120, Math.log2(0.8), 10))!;
    expect(curve.learningRatePercent).toBeCloseTo(80, 9);
    expect(curve.b).toBeCloseTo(-0.3219, 4);
  });

  it('fits noisy data by least squares on the logs', () => {
    // Reference computed independently: the closed-form OLS slope Σ(x−x̄)(y−ȳ)/Σ(x−x̄)² on ln x, ln y.
    const pts = [
      { caseNumber: 1, operativeMinutes: 120 },
      { caseNumber: 2, operativeMinutes: 95 },
      { caseNumber: 3, operativeMinutes: 101 },
      { caseNumber: 4, operativeMinutes: 80 },
      { caseNumber: 5, operativeMinutes: 78 },
    ];
    const xs = pts.map((p) => Math.log(p.caseNumber));
    const ys = pts.map((p) => Math.log(p.operativeMinutes));
    const mx = xs.reduce((s, v) => s + v, 0) / xs.length;
    const my = ys.reduce((s, v) => s + v, 0) / ys.length;
    const slope =
      xs.reduce((s, x, i) => s + (x - mx) * (ys[i]! - my), 0) /
      xs.reduce((s, x) => s + (x - mx) ** 2, 0);
    const curve = fitLearningCurve(pts)!;
    expect(curve.b).toBeCloseTo(slope, 12);
    expect(Math.log(curve.a)).toBeCloseTo(my - slope * mx, 12);
    expect(curve.rSquared).toBeGreaterThan(0.5);
    expect(curve.rSquared).toBeLessThan(1);
  });

  it('puts the plateau at case 1 when cases did not get faster', () => {
    const curve = fitLearningCurve(onCurve(60, 0.1, 6))!;
    expect(curve.plateauCase).toBe(1);
  });

  it('needs three distinct case numbers', () => {
    expect(fitLearningCurve(onCurve(100, -0.5, 2))).toBeNull();
    expect(
      fitLearningCurve([
        { caseNumber: 1, operativeMinutes: 90 },
        { caseNumber: 1, operativeMinutes: 80 },
        { caseNumber: 2, operativeMinutes: 70 },
        { caseNumber: 3, operativeMinutes: 0 },
      ]),
    ).toBeNull();
  });

  it('always names the first case within 10 % of the fitted last case', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 10, max: 500, noNaN: true }),
        fc.double({ min: -1.5, max: -0.01, noNaN: true }),
        fc.integer({ min: 3, max: 60 }),
        (a, b, n) => {
          const curve = fitLearningCurve(onCurve(a, b, n))!;
          const k = curve.plateauCase;
          const limit = 1.1 * curve.plateauMinutes;
          expect(k).toBeGreaterThanOrEqual(1);
          expect(k).toBeLessThanOrEqual(n);
          expect(curveAt(curve, k)).toBeLessThanOrEqual(limit * (1 + 1e-12));
          if (k > 1) expect(curveAt(curve, k - 1)).toBeGreaterThan(limit * (1 - 1e-12));
        },
      ),
    );
  });
});
