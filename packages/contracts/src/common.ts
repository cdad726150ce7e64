import { z } from 'zod';

/** A calendar date `YYYY-MM-DD` (interpreted in the relevant site's time zone). */
export const isoDate = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date in the form YYYY-MM-DD.')
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)), 'This is not a real calendar date.');

/** A positive integer id (path or body). */
export const id = z.coerce.number().int().positive();

/** The one error shape every failing route returns. */
export const errorBody = z
  .object({
    error: z.object({
      code: z.string(),
      message: z.string(),
      details: z.unknown().optional(),
    }),
  })
  .meta({ id: 'ErrorBody' });
export type ErrorBody = z.infer<typeof errorBody>;

/** Wraps a list response: every list is `{items: [...]}`. */
export const listOf = <T extends z.ZodTypeAny>(item: T) => z.object({ items: z.array(item) });
