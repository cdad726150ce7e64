import { z } from 'zod';

/** `GET /api/health`: 200 when the database answers, 503 (same shape) when it does not. */
export const healthResponse = z
  .object({
    status: z.enum(['ok', 'degraded']),
    database: z.enum(['up', 'down']),
  })
  .meta({ id: 'HealthResponse' });
export type HealthResponse = z.infer<typeof healthResponse>;

/**
 * `details` of a 400/422 `validation_failed` error: messages per field (dotted path, e.g.
 * `email` or `items.0.quantity`) and messages about the request as a whole.
 */
export const validationErrorDetails = z
  .object({
    fieldErrors: z.record(z.string(), z.array(z.string())),
    formErrors: z.array(z.string()),
  })
  .meta({ id: 'ValidationErrorDetails' });
export type ValidationErrorDetails = z.infer<typeof validationErrorDetails>;
