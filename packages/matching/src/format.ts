/**
 * Wording helpers for the reason sentences (internal). Reasons are English sentences; month
 * names come from a fixed table rather than `Intl`, because ICU versions differ on short month
 * names (e.g. `Sep` or `Sept` for en-GB) and reasons must not change with the runtime.
 */
import { assertIsoDate } from '@evalon/scheduling';

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

const grouping = new Intl.NumberFormat('en-US', { maximumFractionDigits: 0 });

/** `2027-06-30` → `30 Jun 2027`. */
export function formatDay(date: string): string {
  assertIsoDate(date);
  const [year, month, day] = date.split('-').map(Number) as [number, number, number];
  return `${day} ${MONTHS[month - 1]} ${year}`;
}

/** A whole number with thousands separators: `1180` → `1,180`. */
export function formatWhole(value: number): string {
  return grouping.format(Math.round(value));
}

/** Joins phrases as `a`, `a and b`, `a, b and c`; more than `max` end in `and N more`. */
export function joinPhrases(phrases: readonly string[], max = 3): string {
  const shown = phrases.slice(0, max);
  const hidden = phrases.length - shown.length;
  if (hidden > 0) return `${shown.join(', ')} and ${hidden} more`;
  if (shown.length <= 1) return shown.join('');
  return `${shown.slice(0, -1).join(', ')} and ${shown[shown.length - 1]}`;
}

/** `1 day` / `3 days`. */
export function plural(count: number, singular: string, pluralForm = `${singular}s`): string {
  return `${formatWhole(count)} ${count === 1 ? singular : pluralForm}`;
}
