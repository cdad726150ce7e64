/*
 * Notification values without zod, for the browser and the schemas alike.
 */

/**
 * Where an outbox e-mail stands: `pending` (waiting for its next attempt), `sending` (claimed by
 * a worker), `sent` (the mail server accepted it), `parked` (attempts used up; an admin may
 * send it again).
 */
export const outboxStatuses = ['pending', 'sending', 'sent', 'parked'] as const;
/** One of `outboxStatuses`. */
export type OutboxStatus = (typeof outboxStatuses)[number];
