import { ListFrame } from './list-frame';
import { ListNoRows } from './list-no-rows';
import { ListSearch } from './list-search';
import { ListTable, SortHeaderWords } from './list-sort';
import { RowLink } from './row-link';

export * from './list-frame';
export * from './list-no-rows';
export * from './list-page';
export * from './list-query';
export * from './list-search';
export * from './list-sort';
export * from './list-source';
export * from './row-link';

/** Everything a list page's template uses, for a component's `imports`. */
export const ListPageParts = [
  ListSearch,
  ListFrame,
  ListTable,
  SortHeaderWords,
  ListNoRows,
  RowLink,
] as const;
export * from './load-state';
export * from './load-on-change';
