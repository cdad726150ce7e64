import {
  complicationGrades,
  countComplications,
  isMajorComplication,
  proctoredProgress,
} from './outcomes';

describe('complications', () => {
  it('has the seven published Clavien–Dindo grades after our "0"', () => {
    // Dindo, Demartines, Clavien, Ann Surg 2004 (from memory, listed in docs/references.md):
    // I, II, IIIa, IIIb, IVa, IVb, V.
    expect(complicationGrades.slice(1)).toEqual(['I', 'II', 'IIIa', 'IIIb', 'IVa', 'IVb', 'V']);
  });

  it('counts cases by grade with every grade present', () => {
    const counts = countComplications(['0', '0', 'II', null, 'IIIb', '0', undefined]);
    expect(counts).toHaveLength(8);
    expect(Object.fromEntries(counts.map((c) => [c.grade, c.count]))).toEqual({
      '0': 3,
      I: 0,
      II: 1,
      IIIa: 0,
      IIIb: 1,
      IVa: 0,
      IVb: 0,
      V: 0,
    });
  });

  it('calls grade III and above major', () => {
    // Common practice in surgical reporting: "major" = Clavien–Dindo ≥ III.
    expect(complicationGrades.filter(isMajorComplication)).toEqual([
      'IIIa',
      'IIIb',
      'IVa',
      'IVb',
      'V',
    ]);
  });
});

describe('proctoredProgress', () => {
  it('compares proctored cases with the policy default of 3', () => {
    // Survey of 42 US hospital policies: mean 3.24 proctored cases; product default 3.
    expect(proctoredProgress(2)).toEqual({
      proctoredCases: 2,
      threshold: 3,
      reached: false,
      remaining: 1,
    });
    expect(proctoredProgress(4, 3)).toEqual({
      proctoredCases: 4,
      threshold: 3,
      reached: true,
      remaining: 0,
    });
  });

  it('refuses a threshold below one', () => {
    expect(() => proctoredProgress(1, 0)).toThrow(/threshold/);
  });
});
