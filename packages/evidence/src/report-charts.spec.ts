import { fitLearningCurve } from './learning-curve';
import {
  ablationRateChart,
  operativeTimeChart,
  surveyChart,
  type ChartCase,
} from './report-charts';

type Series = { name: string; type: string; data: number[][] | number[] };

// Times on an exact power law y = 100 · x^−0.5 (arithmetic: 100, 70.7, 57.7, 50): the log-log
// fit must give back a = 100, b = −0.5, and the drawn curve must pass through the same values.
const exact = [1, 2, 3, 4].map((x) => Math.round(100 * Math.pow(x, -0.5) * 1000) / 1000);
const cases: ChartCase[] = [
  ...exact.map((minutes, i) => ({
    caseNumber: i * 2 + 1,
    clinicianId: 7,
    clinicianName: 'Clinician A',
    operativeMinutes: minutes,
    ablationRateMm3PerMin: i === 1 ? null : 100 + i * 10,
  })),
  {
    caseNumber: 2,
    clinicianId: 9,
    clinicianName: 'Clinician B',
    operativeMinutes: 65,
    ablationRateMm3PerMin: null,
  },
];

describe('operativeTimeChart', () => {
  const fit = fitLearningCurve(exact.map((m, i) => ({ caseNumber: i + 1, operativeMinutes: m })))!;
  const chart = operativeTimeChart(cases, [{ clinicianId: 7, ...fit }]);
  const series = (chart.option as { series: Series[] }).series;

  it('plots each clinician’s cases in their own order and the fitted curve through them', () => {
    expect(fit.a).toBeCloseTo(100, 2);
    expect(fit.b).toBeCloseTo(-0.5, 4);
    expect(series.map((s) => s.name)).toEqual([
      'Clinician A',
      'Clinician A: fitted curve',
      'Clinician B',
    ]);
    // Loan case numbers 1, 3, 5, 7 are the clinician's 1st … 4th case.
    expect(series[0].data).toEqual(exact.map((m, i) => [i + 1, m]));
    const line = series[1].data as number[][];
    expect(line[0]).toEqual([1, 100]);
    expect(line.find(([x]) => x === 4)![1]).toBeCloseTo(50, 1);
    expect(line.at(-1)![0]).toBe(4);
    expect(chart.option.animation).toBe(false);
  });

  it('says the same in words and in a table', () => {
    expect(chart.summary).toContain('Operative time of 5 case(s).');
    expect(chart.summary).toContain('Clinician A: 4 cases, fitted time 100 min at the first case');
    expect(chart.summary).toContain('Clinician B: 1 case(s), too few for a learning curve');
    expect(chart.table.rows.map((r) => r[0])).toEqual([1, 2, 3, 5, 7]);
    expect(chart.table.rows[1]).toEqual([2, 'Clinician B', 1, 65]);
  });

  it('has an empty state', () => {
    expect(operativeTimeChart([], []).summary).toBe('No cases recorded yet.');
  });
});

describe('ablationRateChart', () => {
  it('shows only the cases with a rate, by case number', () => {
    const chart = ablationRateChart(cases);
    const [bars] = (chart.option as { series: Series[] }).series;
    expect(bars.data).toEqual([100, 120, 130]);
    expect(chart.table.rows.map((r) => r[0])).toEqual([1, 5, 7]);
    expect(chart.summary).toBe(
      '3 case(s) with an ablation rate, from 100 to 130 mm³ per energy-on minute.',
    );
    expect(ablationRateChart([]).summary).toMatch(/no ablation rate/);
  });
});

describe('surveyChart', () => {
  it('charts medians, keeps unanswered items in the table as a dash', () => {
    const chart = surveyChart(
      [
        { label: 'Set-up', n: 2, median: 4.5, mean: 4.5 },
        { label: 'Handling', n: 0, median: null, mean: null },
      ],
      2,
    );
    const [bars] = (chart.option as { series: Series[] }).series;
    expect(bars.data).toEqual([4.5, 0]);
    expect(chart.table.rows).toEqual([
      ['Set-up', 2, 4.5, 4.5],
      ['Handling', 0, '–', '–'],
    ]);
    expect(chart.summary).toBe('2 clinician(s) answered. Median answers: Set-up 4.5.');
    expect(surveyChart([], 0).summary).toMatch(/No clinician/);
  });
});
