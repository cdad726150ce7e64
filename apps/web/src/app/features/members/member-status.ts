import type { Member } from '@evalon/contracts';
import { memberStatusLabels, type MemberStatus } from '@evalon/contracts/values';

export type { MemberStatus } from '@evalon/contracts/values';

/** The status of a member; deactivation wins over a pending invitation. */
export function statusOf(member: Member): MemberStatus {
  if (!member.active) return 'deactivated';
  return member.pending ? 'pending' : 'active';
}

/** Words for each status (the server searches the same words). */
export const statusLabels = memberStatusLabels;

/** Icons beside each status. */
export const statusIcons: Readonly<Record<MemberStatus, string>> = {
  active: 'check_circle',
  pending: 'schedule_send',
  deactivated: 'block',
};
