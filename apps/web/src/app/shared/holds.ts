import type { Hold } from '@evalon/contracts';

/** Words for a hold in a table cell: the loan and hospital, or the maintenance reason. */
export function describeHold(hold: Hold): string {
  if (hold.kind === 'maintenance') return `Maintenance${hold.reason ? `: ${hold.reason}` : ''}`;
  const parts = [hold.loanReference ? `Loan ${hold.loanReference}` : hold.label];
  if (hold.hospitalName) parts.push(hold.hospitalName);
  return parts.join(' · ');
}
