import type { Member } from '@evalon/contracts';

/** Where a member stands: can sign in, has not accepted yet, or was deactivated. */
export type MemberStatus = 'active' | 'pending' | 'deactivated';

/** The status of a member; deactivation wins over a pending invitation. */
export function statusOf(member: Member): MemberStatus {
  if (!member.active) return 'deactivated';
  return member.pending ? 'pending' : 'active';
}

/** Words for each status. */
export const statusLabels: Readonly<Record<MemberStatus, string>> = {
  active: 'Active',
  pending: 'Invitation sent',
  deactivated: 'Deactivated',
};

/** Icons beside each status. */
export const statusIcons: Readonly<Record<MemberStatus, string>> = {
  active: 'check_circle',
  pending: 'schedule_send',
  deactivated: 'block',
};
