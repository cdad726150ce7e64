import { ListNoRows } from './list-no-rows';
import { ListPaginator } from './list-paginator';
import { ListSearch } from './list-search';
import { ListStatus } from './list-status';
import { RowLink } from './row-link';

export * from './list-no-rows';
export * from './list-paginator';
export * from './list-query';
export * from './list-search';
export * from './list-source';
export * from './list-status';
export * from './row-link';

/** Everything a list page's template uses, for a component's `imports`. */
export const ListPageParts = [ListSearch, ListStatus, ListNoRows, ListPaginator, RowLink] as const;
