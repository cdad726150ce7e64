/*
 * Paging and sorting of list routes, as plain values (no zod), so the browser can import them
 * without the schema library. The query format follows the common `page`/`size`/`sort=field,dir`
 * convention; `page` counts from 0, like Angular Material's paginator `pageIndex`.
 */

/** Rows per page when the query does not say. */
export const defaultPageSize = 100;
/** Most rows one page may ask for. */
export const maxPageSize = 500;
/** Page sizes the list pages offer. */
export const pageSizeOptions: readonly number[] = [10, 25, 50];
/** Longest search text a list route accepts. */
export const maxSearchLength = 100;

/** Sort directions. */
export const sortDirections = ['asc', 'desc'] as const;
/** A sort direction. */
export type SortDirection = (typeof sortDirections)[number];

/** A parsed `sort=field,dir`. */
export interface SortOrder<F extends string = string> {
  readonly field: F;
  readonly dir: SortDirection;
}

/** Parses `field,dir`; null when it does not name one of `fields` with a direction. */
export function parseSort<F extends string>(
  text: string,
  fields: readonly F[],
): SortOrder<F> | null {
  const [field, dir, ...rest] = text.split(',');
  if (rest.length || !fields.includes(field as F)) return null;
  if (dir !== 'asc' && dir !== 'desc') return null;
  return { field: field as F, dir };
}

/** Writes a sort order back as `field,dir`. */
export function sortText(order: SortOrder): string {
  return `${order.field},${order.dir}`;
}

/** One page of a list: the rows, how many match in all, and which page this is. */
export interface Page<T> {
  readonly items: readonly T[];
  readonly total: number;
  readonly page: number;
  readonly size: number;
}
