import { deriveCase, loanMetrics, type MetricsCase } from './metrics';

const base = { setupMinutes: 20, complicationGrade: '0' as const, proctored: false };

describe('deriveCase', () => {
  it('adds volume and ablation rate', () => {
    // 20 mm sphere → π/6·20³ = 4,188.79 mm³ (geometry, docs/references.md); over 20 min → 209.44.
    const d = deriveCase({
      target: { lengthMm: 20, widthMm: 20, heightMm: 20 },
      energyMinutes: 20,
    });
    expect(d.targetVolumeMm3).toBeCloseTo(4188.79, 2);
    expect(d.ablationRateMm3PerMin).toBeCloseTo(209.44, 2);
  });

  it('has no rate without energy minutes or target', () => {
    expect(deriveCase({ target: { lengthMm: 5, widthMm: 5, heightMm: 5 } })).toMatchObject({
      ablationRateMm3PerMin: null,
    });
    expect(deriveCase({ target: null, energyMinutes: 10 })).toEqual({
      targetVolumeMm3: null,
      ablationRateMm3PerMin: null,
    });
  });
});

describe('loanMetrics', () => {
  // Clinician 7 follows y = 100·x^−0.5 exactly over cases 1, 3, 5, 7 (their own 1st–4th case);
  // clinician 9 has two cases (too few for a curve).
  const cases: MetricsCase[] = [
    { ...base, caseNumber: 1, clinicianId: 7, operativeMinutes: 100, proctored: true },
    { ...base, caseNumber: 2, clinicianId: 9, operativeMinutes: 80, complicationGrade: 'II' },
    {
      ...base,
      caseNumber: 3,
      clinicianId: 7,
      operativeMinutes: 100 / Math.sqrt(2),
      proctored: true,
    },
    {
      ...base,
      caseNumber: 4,
      clinicianId: 9,
      operativeMinutes: 60,
      energyMinutes: 10,
      target: { lengthMm: 10, widthMm: 10, heightMm: 10 },
    },
    { ...base, caseNumber: 5, clinicianId: 7, operativeMinutes: 100 / Math.sqrt(3) },
    { ...base, caseNumber: 7, clinicianId: 7, operativeMinutes: 50, setupMinutes: 10 },
  ];

  it('summarises per loan and per clinician', () => {
    const m = loanMetrics(cases);
    expect(m.cases).toBe(6);
    expect(m.perClinician.map((c) => [c.clinicianId, c.n])).toEqual([
      [7, 4],
      [9, 2],
    ]);
    const seven = m.perClinician[0]!;
    expect(seven.curve!.a).toBeCloseTo(100, 9);
    expect(seven.curve!.b).toBeCloseTo(-0.5, 9);
    // n = 4: 4 · 1.1^−2 = 3.31 → plateau case 4 (ŷ(3) = 57.7 > 1.1 · 50 = 55).
    expect(seven.curve!.plateauCase).toBe(4);
    expect(seven.proctored).toEqual({
      proctoredCases: 2,
      threshold: 3,
      reached: false,
      remaining: 1,
    });
    expect(seven.setupMinutes.median).toBe(20);
    expect(m.perClinician[1]!.curve).toBeNull();
    expect(m.perClinician[1]!.operativeMinutes).toMatchObject({ n: 2, median: 70, mean: 70 });
  });

  it('summarises volumes and ablation rates of the cases that have them', () => {
    const m = loanMetrics(cases);
    expect(m.volumes).toMatchObject({ n: 1 });
    expect(m.volumes!.median).toBeCloseTo((Math.PI / 6) * 1000, 9);
    expect(m.ablationRates!.median).toBeCloseTo((Math.PI / 6) * 100, 9);
    expect(m.complications.find((c) => c.grade === 'II')!.count).toBe(1);
    expect(m.complications.find((c) => c.grade === '0')!.count).toBe(5);
  });

  it('is empty but well formed without cases', () => {
    const m = loanMetrics([], 4);
    expect(m).toMatchObject({ cases: 0, perClinician: [], volumes: null, operativeMinutes: null });
    expect(m.complications.every((c) => c.count === 0)).toBe(true);
  });
});
