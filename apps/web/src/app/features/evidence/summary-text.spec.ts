import { meanSd, medianIqr, num } from './summary-text';

const s = {
  n: 8,
  median: 7.5,
  iqr: [3.5, 9.25] as [number, number],
  mean: 6.625,
  sd: 3.8891,
  min: 1,
  max: 12,
};

describe('summary text', () => {
  it('shows the median with its quartiles and the mean ± SD', () => {
    expect(medianIqr(s)).toBe('7.5 (3.5–9.3)');
    expect(meanSd(s, 2)).toBe('6.63 ± 3.89');
    expect(num(4188.79, 0)).toBe('4,189');
  });

  it('shows a dash for nothing and the mean alone without SD', () => {
    expect(medianIqr(null)).toBe('—');
    expect(meanSd({ ...s, n: 1, sd: null, mean: 42 })).toBe('42');
  });
});
