// The one home of the column helpers every component's entities use.
import type { EntitySchemaColumnOptions, ValueTransformer } from 'typeorm';

/** mysql2 returns DECIMAL as a string to keep precision; coordinates are fine as numbers. */
export const decimalAsNumber: ValueTransformer = {
  to: (value: number | null | undefined) => value,
  from: (value: string | null) => (value === null || value === undefined ? value : Number(value)),
};

/** mysql2 hands BIGINT back as a string (TypeORM turns on bigNumberStrings); amounts fit a double. */
export const bigintAsNumber: ValueTransformer = {
  to: (value: number | null | undefined) => value,
  from: (value: string | number | null) =>
    value === null || value === undefined ? value : Number(value),
};

/** Auto-increment integer primary key. */
export const idColumn: EntitySchemaColumnOptions = {
  type: 'int',
  unsigned: true,
  primary: true,
  generated: 'increment',
};

/** A UTC instant with millisecond precision (the connection runs with `timezone: 'Z'`). */
export function instantColumn(name: string, nullable = false): EntitySchemaColumnOptions {
  return { type: 'datetime', precision: 3, name, nullable };
}

/** A calendar date (`YYYY-MM-DD`); the zone it is read in is stored beside it. */
export function dateColumn(name: string): EntitySchemaColumnOptions {
  return { type: 'date', name };
}

/** Foreign-key integer column. */
export function refColumn(name: string, nullable = false): EntitySchemaColumnOptions {
  return { type: 'int', unsigned: true, name, nullable };
}
