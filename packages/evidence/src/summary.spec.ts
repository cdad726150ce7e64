import { summarise } from './summary';

describe('summarise', () => {
  it('gives the quartiles of the spreadsheet quartile worked example', () => {
    // Worked example of the QUARTILE / QUARTILE.INC function in the spreadsheet vendor's help
    // (from memory): data 1, 2, 4, 7, 8, 9, 10, 12 → first quartile 3.5. Same as R's
    // quantile(type = 7) (Hyndman & Fan 1996): Q3 = 9 + 0.25·(10 − 9) = 9.25, median 7.5.
    const s = summarise([1, 2, 4, 7, 8, 9, 10, 12])!;
    expect(s.iqr[0]).toBeCloseTo(3.5, 12);
    expect(s.iqr[1]).toBeCloseTo(9.25, 12);
    expect(s.median).toBe(7.5);
  });

  it('matches the odd-sized textbook set of the quartile article', () => {
    // Wikipedia "Quartile", example 1 (from memory): 6, 7, 15, 36, 39, 40, 41, 42, 43, 47, 49;
    // with the median included in both halves Q1 = 25.5, Q2 = 40, Q3 = 42.5, which for
    // n = 11 coincides with type 7 (index (n − 1)·p = 2.5 and 7.5).
    const s = summarise([49, 6, 7, 15, 36, 39, 40, 41, 42, 43, 47])!;
    expect(s.iqr).toEqual([25.5, 42.5]);
    expect(s.median).toBe(40);
  });

  it('gives mean and sample SD of the standard-deviation textbook set', () => {
    // Wikipedia "Standard deviation" (from memory): 2, 4, 4, 4, 5, 5, 7, 9 has mean 5 and
    // population SD 2; the sample SD (n − 1) is √(32/7) ≈ 2.138.
    const s = summarise([2, 4, 4, 4, 5, 5, 7, 9])!;
    expect(s.mean).toBe(5);
    expect(s.sd).toBeCloseTo(Math.sqrt(32 / 7), 12);
    expect(s.min).toBe(2);
    expect(s.max).toBe(9);
    expect(s.n).toBe(8);
  });

  it('leaves out missing values and gives no SD for one value', () => {
    const s = summarise([null, 42, undefined, Number.NaN])!;
    expect(s).toMatchObject({ n: 1, median: 42, iqr: [42, 42], mean: 42, sd: null });
  });

  it('is null for no values', () => {
    expect(summarise([])).toBeNull();
    expect(summarise([null])).toBeNull();
  });
});
