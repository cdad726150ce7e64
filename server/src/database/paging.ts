import { parseSort, type PageQuery } from '@evalon/contracts';

/** SQL pieces of one page: `ORDER BY ... LIMIT ? OFFSET ?` and its two parameters. */
export interface PageSql {
  /** `ORDER BY <column> <dir>, <tie-break> LIMIT ? OFFSET ?`. */
  sql: string;
  /** The LIMIT and OFFSET values, to append after the WHERE parameters. */
  params: [number, number];
}

/**
 * Turns a checked `sort=field,dir` and the page into SQL. `columns` maps each sortable field to
 * a SQL expression of our own (never text from the request); `tieBreak` keeps the order stable
 * between pages when the sorted values repeat (e.g. `u.id`). `nullsLast` lists fields whose NULLs
 * go last in both directions (MariaDB puts them first in ascending order).
 */
export function pageSql<F extends string>(
  query: PageQuery,
  columns: Readonly<Record<F, string>>,
  tieBreak: string,
  nullsLast: readonly F[] = [],
): PageSql {
  const fields = Object.keys(columns) as F[];
  // The contract already refused unknown fields; the first column is a safe fallback.
  const order = parseSort(query.sort, fields) ?? { field: fields[0]!, dir: 'asc' as const };
  const column = columns[order.field];
  const dir = order.dir === 'desc' ? 'DESC' : 'ASC';
  const nulls = nullsLast.includes(order.field) ? `${column} IS NULL, ` : '';
  return {
    sql: `ORDER BY ${nulls}${column} ${dir}, ${tieBreak} ${dir} LIMIT ? OFFSET ?`,
    params: [query.size, query.page * query.size],
  };
}

/** The answer of a list route: `{items, total, page, size}`. */
export function pageAnswer<T>(
  items: T[],
  total: number,
  query: Pick<PageQuery, 'page' | 'size'>,
): { items: T[]; total: number; page: number; size: number } {
  return { items, total, page: query.page, size: query.size };
}
