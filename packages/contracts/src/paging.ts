import { z } from 'zod';
import { defaultPageSize, maxPageSize, maxSearchLength, parseSort } from './values/paging';

/**
 * The one paging and sorting query of every list route: `?page=&size=&sort=field,dir&q=`.
 * `fields` are the sortable columns of that route; `defaultSort` applies when `sort` is absent.
 * A plain object schema (no transform) so routes can `.extend` it with their own filters and the
 * OpenAPI generator can list its parameters; read the checked sort with `parseSort`.
 */
export function pageQuery<const F extends readonly [string, ...string[]]>(
  fields: F,
  defaultSort: `${F[number]},${'asc' | 'desc'}`,
) {
  return z.object({
    /** Page number, from 0. */
    page: z.coerce.number().int().min(0).max(100_000).default(0),
    /** Rows per page. */
    size: z.coerce.number().int().min(1).max(maxPageSize).default(defaultPageSize),
    /** `field,dir`, e.g. `name,asc`. */
    sort: z
      .string()
      .default(defaultSort)
      .refine(
        (s) => parseSort(s, fields) !== null,
        `Sort by one of ${fields.join(', ')}, then ",asc" or ",desc".`,
      ),
    /** Search words; each route says which columns they match. */
    q: z.string().trim().max(maxSearchLength).optional(),
  });
}

/** The paging part of a parsed list query. */
export interface PageQuery {
  page: number;
  size: number;
  sort: string;
  q?: string;
}

/** One page of a list: `{items, total, page, size}` (`total` counts every matching row). */
export const pageOf = <T extends z.ZodTypeAny>(item: T) =>
  z.object({
    items: z.array(item),
    /** Rows matching the filter across all pages. */
    total: z.number().int().min(0),
    /** This page's number, from 0. */
    page: z.number().int().min(0),
    /** Rows per page asked for. */
    size: z.number().int().min(1),
  });
