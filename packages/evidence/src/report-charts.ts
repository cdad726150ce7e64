import { curveAt } from './learning-curve';

/**
 * The evaluation report's charts as plain chart options (the option object of the chart library
 * the client and the server both use), each with its text alternative: a summary sentence and a
 * table of the same numbers. Pure: the client renders the options in the browser, the server as
 * SVG for the PDF, so both show the same figures.
 */

/** One case as the report's charts need it. */
export interface ChartCase {
  caseNumber: number;
  clinicianId: number;
  clinicianName: string;
  operativeMinutes: number;
  ablationRateMm3PerMin: number | null;
}

/** A clinician's fitted learning curve (see `fitLearningCurve`). */
export interface ChartCurve {
  clinicianId: number;
  a: number;
  b: number;
  lastCase: number;
  plateauCase: number;
}

/** One survey item's answers. */
export interface ChartSurveyItem {
  label: string;
  /** Number of answers. */
  n: number;
  median: number | null;
  mean: number | null;
}

/** A chart and its text alternative. */
export interface ReportChart {
  /** Stable key (`operative-time`, `ablation-rate`, `survey`). */
  key: string;
  title: string;
  /** The chart library's option object: JSON only, animation off (identical SVG each time). */
  option: Record<string, unknown>;
  /** One or two sentences that say what the chart shows, for screen readers and the PDF. */
  summary: string;
  /** The chart's numbers as a table. */
  table: { columns: string[]; rows: (string | number)[][] };
}

/** Our palette (the app theme's primary, tertiary and neutrals), one colour per clinician. */
export const chartPalette = ['#1d5e66', '#8a4f1d', '#4f5b92', '#5d6b2f', '#8c3d5e', '#2f6b4f'];

const round1 = (x: number) => Math.round(x * 10) / 10;
const fmt = (x: number) => round1(x).toLocaleString('en-US', { maximumFractionDigits: 1 });

const baseOption = {
  animation: false,
  color: chartPalette,
  textStyle: { fontFamily: 'Helvetica, Arial, sans-serif' },
  grid: { left: 56, right: 24, top: 48, bottom: 48 },
};

/** Each clinician's cases in case-number order, numbered 1, 2, … as the curve fit counts them. */
function byClinician(cases: readonly ChartCase[]): Map<number, (ChartCase & { nth: number })[]> {
  const groups = new Map<number, (ChartCase & { nth: number })[]>();
  for (const c of [...cases].sort((x, y) => x.caseNumber - y.caseNumber)) {
    const list = groups.get(c.clinicianId) ?? [];
    list.push({ ...c, nth: list.length + 1 });
    groups.set(c.clinicianId, list);
  }
  return groups;
}

/**
 * Operative minutes by each clinician's case (1st, 2nd, …), points per clinician, with their
 * fitted power-law curve y = a·x^b drawn over the cases it was fitted to.
 */
export function operativeTimeChart(
  cases: readonly ChartCase[],
  curves: readonly ChartCurve[],
): ReportChart {
  const groups = byClinician(cases);
  const series: Record<string, unknown>[] = [];
  const sentences: string[] = [];
  for (const [clinicianId, list] of groups) {
    const name = list[0].clinicianName;
    series.push({
      name,
      type: 'scatter',
      symbolSize: 9,
      data: list.map((c) => [c.nth, c.operativeMinutes]),
    });
    const curve = curves.find((k) => k.clinicianId === clinicianId);
    if (curve) {
      const xs = Array.from({ length: curve.lastCase * 4 - 3 }, (_, i) => 1 + i / 4);
      series.push({
        name: `${name}: fitted curve`,
        type: 'line',
        showSymbol: false,
        smooth: false,
        lineStyle: { type: 'dashed', width: 2 },
        data: xs.map((x) => [x, round1(curveAt(curve, x))]),
      });
      sentences.push(
        `${name}: ${list.length} cases, fitted time ${fmt(curveAt(curve, 1))} min at the first ` +
          `case and ${fmt(curveAt(curve, curve.lastCase))} min at case ${curve.lastCase}; within ` +
          `10 % of that by case ${curve.plateauCase}.`,
      );
    } else {
      sentences.push(`${name}: ${list.length} case(s), too few for a learning curve (3 needed).`);
    }
  }
  return {
    key: 'operative-time',
    title: 'Operative time by case, with the fitted learning curve',
    option: {
      ...baseOption,
      // Room between the legend and the y-axis name above the plot.
      grid: { ...baseOption.grid, top: 68 },
      legend: { top: 4, type: 'scroll' },
      xAxis: {
        type: 'value',
        name: 'Clinician’s case (1st, 2nd, …)',
        nameLocation: 'middle',
        nameGap: 28,
        minInterval: 1,
        min: 1,
      },
      yAxis: { type: 'value', name: 'Minutes', min: 0 },
      series,
    },
    summary:
      cases.length === 0
        ? 'No cases recorded yet.'
        : `Operative time of ${cases.length} case(s). ${sentences.join(' ')}`,
    table: {
      columns: ['Case', 'Clinician', 'Clinician’s case', 'Operative minutes'],
      rows: [...groups.values()]
        .flat()
        .sort((x, y) => x.caseNumber - y.caseNumber)
        .map((c) => [c.caseNumber, c.clinicianName, c.nth, c.operativeMinutes]),
    },
  };
}

/** Ablation rate (mm³ per energy-on minute) per case, for the cases where it applies. */
export function ablationRateChart(cases: readonly ChartCase[]): ReportChart {
  const rated = [...cases]
    .filter((c) => c.ablationRateMm3PerMin !== null)
    .sort((x, y) => x.caseNumber - y.caseNumber);
  const rates = rated.map((c) => c.ablationRateMm3PerMin!);
  return {
    key: 'ablation-rate',
    title: 'Ablation rate per case',
    option: {
      ...baseOption,
      xAxis: {
        type: 'category',
        name: 'Case',
        nameLocation: 'middle',
        nameGap: 28,
        data: rated.map((c) => String(c.caseNumber)),
      },
      yAxis: { type: 'value', name: 'mm³ per minute', min: 0 },
      series: [{ name: 'Ablation rate', type: 'bar', barMaxWidth: 28, data: rates.map(round1) }],
    },
    summary:
      rated.length === 0
        ? 'No case has both a target size and energy-on minutes, so no ablation rate.'
        : `${rated.length} case(s) with an ablation rate, from ${fmt(Math.min(...rates))} to ` +
          `${fmt(Math.max(...rates))} mm³ per energy-on minute.`,
    table: {
      columns: ['Case', 'Clinician', 'Ablation rate (mm³/min)'],
      rows: rated.map((c) => [c.caseNumber, c.clinicianName, round1(c.ablationRateMm3PerMin!)]),
    },
  };
}

/** Survey results: the median answer per item on the 1–5 scale, with the mean beside it. */
export function surveyChart(items: readonly ChartSurveyItem[], responses: number): ReportChart {
  const answered = items.filter((i) => i.median !== null);
  return {
    key: 'survey',
    title: 'Clinician survey (1 = strongly disagree … 5 = strongly agree)',
    option: {
      ...baseOption,
      grid: { ...baseOption.grid, left: 96 },
      xAxis: {
        type: 'value',
        min: 0,
        max: 5,
        interval: 1,
        name: 'Median answer',
        nameLocation: 'middle',
        nameGap: 28,
      },
      yAxis: { type: 'category', data: items.map((i) => i.label), inverse: true },
      series: [
        { name: 'Median', type: 'bar', barMaxWidth: 18, data: items.map((i) => i.median ?? 0) },
      ],
    },
    summary:
      responses === 0
        ? 'No clinician has answered the survey yet.'
        : `${responses} clinician(s) answered. Median answers: ` +
          answered.map((i) => `${i.label} ${fmt(i.median!)}`).join(', ') +
          '.',
    table: {
      columns: ['Item', 'Answers', 'Median', 'Mean'],
      rows: items.map((i) => [
        i.label,
        i.n,
        i.median === null ? '–' : round1(i.median),
        i.mean === null ? '–' : round1(i.mean),
      ]),
    },
  };
}
