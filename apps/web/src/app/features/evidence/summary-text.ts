import type { NumericSummaryDto } from '@evalon/contracts';

/** A number with at most `digits` decimals, grouped for the reader's locale. */
export function num(value: number, digits = 1, locale = 'en-US'): string {
  return value.toLocaleString(locale, { maximumFractionDigits: digits, minimumFractionDigits: 0 });
}

/** "72.5 (60.1–80)": median with the quartiles, or an em dash when there is nothing. */
export function medianIqr(s: NumericSummaryDto | null, digits = 1, locale = 'en-US'): string {
  if (!s) return '—';
  return `${num(s.median, digits, locale)} (${num(s.iqr[0], digits, locale)}–${num(s.iqr[1], digits, locale)})`;
}

/** "70.2 ± 8.1", or the mean alone for a single value (no SD). */
export function meanSd(s: NumericSummaryDto | null, digits = 1, locale = 'en-US'): string {
  if (!s) return '—';
  return s.sd === null
    ? num(s.mean, digits, locale)
    : `${num(s.mean, digits, locale)} ± ${num(s.sd, digits, locale)}`;
}
