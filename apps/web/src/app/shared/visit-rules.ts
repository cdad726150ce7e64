import type { VisitState } from '@evalon/contracts';

/** Plain words for a visit's states (kept here so lists need not load the contracts). */
export const visitStateLabels: Readonly<Record<VisitState, string>> = {
  requested: 'Requested',
  offered: 'Waiting for a proctor',
  accepted: 'Accepted',
  completed: 'Completed',
  signed_off: 'Signed off',
  cancelled: 'Cancelled',
  unfilled: 'No proctor found',
};

/** Plain words for the events of a visit's timeline. */
export const visitEventLabels: Readonly<Partial<Record<string, string>>> = {
  requested: 'Requested',
  offered: 'Offered',
  declined: 'Declined',
  expired: 'Offer lapsed',
  skipped: 'Skipped (no longer fits)',
  unfilled: 'No proctor left',
  accepted: 'Accepted',
  cancelled: 'Cancelled',
  withdrawn: 'Proctor withdrew',
  case_recorded: 'Case recorded',
  completed: 'Completed',
  signed_off: 'Signed off',
};

/** Plain words for the trainee's part in a case. */
export const traineeRoleLabels: Readonly<Record<string, string>> = {
  observed: 'Observed',
  assisted: 'Assisted',
  performed_supervised: 'Performed under supervision',
};

/**
 * The time left until `deadline` as "1 d 4 h", "3 h 12 min" or "12 min"; "passed" once over.
 * @param deadline ISO instant.
 * @param now Milliseconds since the epoch.
 */
export function timeLeft(deadline: string, now: number): string {
  const ms = Date.parse(deadline) - now;
  if (!(ms > 0)) return 'passed';
  const minutes = Math.floor(ms / 60_000);
  const days = Math.floor(minutes / 1440);
  const hours = Math.floor((minutes % 1440) / 60);
  if (days > 0) return `${days} d ${hours} h`;
  if (hours > 0) return `${hours} h ${minutes % 60} min`;
  return `${Math.max(1, minutes)} min`;
}
