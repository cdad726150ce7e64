/*
 * `@evalon/contracts/values`: the contracts' plain constants (labels, limits, sortable columns)
 * without the schema library, so the browser's initial bundle stays free of zod. The schemas in
 * `@evalon/contracts` import the same values, so there is one copy.
 */
export * from './catalog';
export * from './identity';
export * from './loans';
export * from './members';
export * from './notifications';
export * from './payments';
export * from './paging';
