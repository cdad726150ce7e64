import type { TrackByFunction } from '@angular/core';
import type { ListQuery } from './list-query';
import type { ListLoadState } from './list-source';

/** What a list page's loading bar, error, no-rows row and paginator say. */
export interface ListWords {
  /** Accessible name of the loading bar, e.g. "Loading units". */
  readonly loading: string;
  /** Heading of the error state, e.g. "Units couldn’t be loaded". */
  readonly error: string;
  /** The no-rows row when search or filters leave nothing, given the search words. */
  readonly noMatch: (q: string) => string;
  /** Label of the no-rows row's button that clears search and filters; null for none. */
  readonly clear: string | null;
  /** Accessible name of the paginator, e.g. "Pages of units". */
  readonly pages: string;
}

/** The usual words for a list of `many` (one of which is a `one`), with any changed. */
export function listWords(one: string, many: string, changes: Partial<ListWords> = {}): ListWords {
  const Many = many.charAt(0).toLocaleUpperCase() + many.slice(1);
  return {
    loading: `Loading ${many}`,
    error: `${Many} couldn’t be loaded`,
    noMatch: () => `No ${one} matches these filters.`,
    clear: 'Clear filters',
    pages: `Pages of ${many}`,
    ...changes,
  };
}

/** One list page's parts for its template: the URL state, the loaded page and the words. */
export interface ListPage {
  readonly query: ListQuery<string, string>;
  readonly source: ListLoadState & { readonly trackBy: TrackByFunction<never> };
  readonly words: ListWords;
}
