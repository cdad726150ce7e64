import { HttpParams } from '@angular/common/http';
import { Signal, computed, inject } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { ActivatedRoute, Params, Router } from '@angular/router';
import { parseSort, pageSizeOptions, type SortOrder } from '@evalon/contracts/values';

/** Rows per page before the person picks another size. */
const firstPageSize = pageSizeOptions[0]!;

/** What a list page asks the server for: the paging contract plus the page's own filters. */
export interface ListRequest<K extends string> {
  /** Page number, from 0. */
  readonly page: number;
  readonly size: number;
  readonly order: SortOrder;
  /** Search words, trimmed; '' for none. */
  readonly q: string;
  /** The page's own filters by name; '' when not set. */
  readonly filters: Readonly<Record<K, string>>;
}

/** Options of {@link listQuery}. */
export interface ListQueryOptions<F extends string, K extends string> {
  /** Columns the server sorts by. */
  readonly sortFields: readonly F[];
  /** Order when the URL has none. */
  readonly defaultSort: SortOrder<F>;
  /** Names of the page's own filters, kept in the URL beside `q`. */
  readonly filters?: readonly K[];
}

/**
 * A list page's paging, sorting, search and filters, kept in the URL's query string
 * (`?page=&size=&sort=field,dir&q=` plus the page's filters) so a reload or a shared link shows
 * the same rows. Values equal to the defaults stay out of the URL.
 */
export class ListQuery<F extends string, K extends string = never> {
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);
  private readonly params = toSignal(this.route.queryParamMap, {
    initialValue: this.route.snapshot.queryParamMap,
  });

  /** The request the URL describes now. */
  readonly request: Signal<ListRequest<K>>;

  constructor(private readonly options: ListQueryOptions<F, K>) {
    this.request = computed(
      () => {
        const params = this.params();
        const page = Number(params.get('page'));
        const size = Number(params.get('size'));
        const filters = {} as Record<K, string>;
        for (const name of options.filters ?? []) filters[name] = params.get(name) ?? '';
        return {
          page: Number.isInteger(page) && page > 0 ? page : 0,
          size: pageSizeOptions.includes(size) ? size : firstPageSize,
          order: parseSort(params.get('sort') ?? '', options.sortFields) ?? options.defaultSort,
          q: (params.get('q') ?? '').trim(),
          filters,
        };
      },
      { equal: (a, b) => JSON.stringify(a) === JSON.stringify(b) },
    );
  }

  /** The current order, for `matSortActive` and `matSortDirection`. */
  readonly order = computed(() => this.request().order);
  /** Whether search words or a filter narrow the list. */
  readonly narrowed = computed(() => {
    const { q, filters } = this.request();
    return !!q || Object.values<string>(filters).some((v) => v !== '');
  });

  /** Goes to another page or page size (from the paginator). */
  setPage(page: number, size: number): void {
    const current = this.request();
    this.write({ page: size === current.size ? page : 0, size });
  }

  /** Sorts by another column, from the first page; an empty direction means the default order. */
  setSort(field: string, dir: 'asc' | 'desc' | ''): void {
    const order = dir ? parseSort(`${field},${dir}`, this.options.sortFields) : null;
    this.write({ sort: order ?? this.options.defaultSort, page: 0 });
  }

  /** Searches for other words, from the first page. */
  setSearch(q: string): void {
    this.write({ q: q.trim(), page: 0 });
  }

  /** Sets one of the page's filters ('' or null clears it), from the first page. */
  setFilter(name: K, value: string | number | null): void {
    this.write({ filters: { [name]: value === null ? '' : String(value) }, page: 0 });
  }

  /** Clears the search words and every filter (keeps the order and the page size). */
  clear(): void {
    const filters = {} as Record<string, string>;
    for (const name of this.options.filters ?? []) filters[name] = '';
    this.write({ q: '', filters, page: 0 });
  }

  private write(change: {
    page?: number;
    size?: number;
    sort?: SortOrder;
    q?: string;
    filters?: Record<string, string>;
  }): void {
    const next = { ...this.request(), ...change };
    const order = change.sort ?? next.order;
    const isDefaultSort =
      order.field === this.options.defaultSort.field && order.dir === this.options.defaultSort.dir;
    const queryParams: Params = {
      page: next.page > 0 ? next.page : null,
      size: next.size !== firstPageSize ? next.size : null,
      sort: isDefaultSort ? null : `${order.field},${order.dir}`,
      q: next.q || null,
    };
    const filters = { ...this.request().filters, ...change.filters } as Record<string, string>;
    for (const name of this.options.filters ?? []) queryParams[name] = filters[name] || null;
    void this.router.navigate([], {
      relativeTo: this.route,
      queryParams,
      queryParamsHandling: 'merge',
      // Typing in the search field should not leave one history entry per letter.
      replaceUrl: change.q !== undefined,
    });
  }
}

/** Creates a page's {@link ListQuery}; call in an injection context (a field initialiser). */
export function listQuery<F extends string, K extends string = never>(
  options: ListQueryOptions<F, K>,
): ListQuery<F, K> {
  return new ListQuery(options);
}

/** The query string of a list request: `page`, `size`, `sort=field,dir`, `q` and set filters. */
export function listParams(request: ListRequest<string>): HttpParams {
  let params = new HttpParams()
    .set('page', request.page)
    .set('size', request.size)
    .set('sort', `${request.order.field},${request.order.dir}`);
  if (request.q) params = params.set('q', request.q);
  for (const [name, value] of Object.entries<string>(request.filters)) {
    if (value !== '') params = params.set(name, value);
  }
  return params;
}
