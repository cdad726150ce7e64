import type { EntityManager } from 'typeorm';

/** Visit events someone wants to hear about. */
export const visitNotificationEvents = [
  'offered',
  'declined',
  'expired',
  'unfilled',
  'accepted',
  'cancelled',
  'withdrawn',
  'signed_off',
] as const;
export type VisitNotificationEvent = (typeof visitNotificationEvents)[number];

/** What happened to a visit; the hook reads whatever else it needs with the manager. */
export interface VisitEventNotice {
  visitId: number;
  event: VisitNotificationEvent;
  /** Who did it (null for the deadline job). */
  actorUserId: number | null;
  /** The proctor concerned: offered, declined, expired, accepted. */
  proctorUserId?: number;
  /** Reason given (decline, cancel). */
  reason?: string | null;
  /** Whether the visit had been accepted before it was cancelled (then a CANCEL invite goes out). */
  wasAccepted?: boolean;
  /**
   * SEQUENCE of the calendar invite this event sends (RFC 5545 §3.8.7.4): `accepted` REQUEST,
   * `cancelled` and `withdrawn` CANCEL. Each withdrawal raises it, so a later REQUEST to the
   * next proctor supersedes the earlier one. Absent: 0 for a REQUEST, 1 for a CANCEL.
   */
  inviteSequence?: number;
  /** `signed_off`: the trainee and the one-page record. */
  signOff?: { traineeUserId: number; pdf: Buffer; fileName: string };
}

/**
 * Called inside the transaction that changed the visit, so the outbox rows commit (or roll back)
 * with the change. It must not send anything itself.
 */
export type NotifyVisitEvent = (
  manager: EntityManager,
  notice: VisitEventNotice,
) => Promise<unknown>;

/** Nothing to notify (tests that do not look at messages). */
export const noVisitNotifications: NotifyVisitEvent = async () => undefined;
