/*
 * Catalogue values without zod, for the browser and the schemas alike.
 */

/** Columns `GET /api/models` sorts by; `lender` is lender name, then model name. */
export const modelSortFields = [
  'lender',
  'name',
  'category',
  'listValue',
  'deposit',
  'units',
] as const;
/** A sortable column of the model list. */
export type ModelSortField = (typeof modelSortFields)[number];

/** Columns `GET /api/units` sorts by; `next` is the first day of the unit's next hold. */
export const unitSortFields = ['model', 'serial', 'depot', 'status', 'next'] as const;
/** A sortable column of the unit list. */
export type UnitSortField = (typeof unitSortFields)[number];

/** Categories of equipment a lender lists. */
export const modelCategories = [
  'robotic_platform',
  'flexible_endoscope',
  'laser',
  'imaging',
  'fluid_management',
  'accessory',
] as const;
/** One of `modelCategories`. */
export type ModelCategory = (typeof modelCategories)[number];

/** Human labels for categories, shared by screens and e-mails. */
export const modelCategoryLabels: Record<ModelCategory, string> = {
  robotic_platform: 'Robotic platform',
  flexible_endoscope: 'Flexible endoscope',
  laser: 'Laser system',
  imaging: 'Imaging tower',
  fluid_management: 'Fluid management',
  accessory: 'Accessory',
};
