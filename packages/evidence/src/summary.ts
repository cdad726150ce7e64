import {
  interquartileRange,
  max,
  mean,
  median,
  min,
  quantileSorted,
  sampleStandardDeviation,
} from 'simple-statistics';

/**
 * Summary of one numeric variable for a value-analysis table.
 *
 * Quartiles use simple-statistics' `quantileSorted`, which (in 7.12.1) is the linear
 * interpolation between order statistics at index (n − 1)·p: Hyndman & Fan (1996) type 7, the
 * default of R's `quantile` and numpy's `percentile`, and Excel's QUARTILE.INC. Other programs
 * may print slightly different quartiles for the same small sample; the table says which.
 */
export interface NumericSummary {
  /** Number of values summarised. */
  n: number;
  median: number;
  /** First and third quartiles (type 7), so the IQR is iqr[1] − iqr[0]. */
  iqr: [number, number];
  mean: number;
  /** Sample standard deviation (n − 1 in the denominator); `null` for a single value. */
  sd: number | null;
  min: number;
  max: number;
}

/** Name of the quantile definition, for tables and reports. */
export const quantileMethod = 'Hyndman & Fan type 7, linear interpolation';

/**
 * Median, quartiles, mean ± SD, min and max of the finite values; `null` when there are none.
 * Non-finite values (NaN, ±Infinity) and nulls are left out rather than poisoning the result.
 */
export function summarise(values: readonly (number | null | undefined)[]): NumericSummary | null {
  const xs = values.filter((v): v is number => typeof v === 'number' && Number.isFinite(v));
  if (xs.length === 0) return null;
  const sorted = [...xs].sort((a, b) => a - b);
  const q1 = quantileSorted(sorted, 0.25);
  const q3 = quantileSorted(sorted, 0.75);
  // interquartileRange is the library's own q3 − q1; asserting it agrees keeps us on its method.
  const spread = interquartileRange(sorted);
  if (Math.abs(spread - (q3 - q1)) > 1e-9 * Math.max(1, Math.abs(spread))) {
    throw new Error('The quartile method changed: interquartileRange disagrees with q3 − q1.');
  }
  return {
    n: xs.length,
    median: median(sorted),
    iqr: [q1, q3],
    mean: mean(xs),
    sd: xs.length > 1 ? sampleStandardDeviation(xs) : null,
    min: min(xs),
    max: max(xs),
  };
}
