import type { Role } from '@evalon/contracts';

/** A card on the home page: what to look at next, and what it looks like when there is nothing. */
export interface NextStep {
  readonly key: string;
  readonly icon: string;
  readonly title: string;
  /** The empty state, in one line. */
  readonly emptyHeading: string;
  /** What will appear here, or what to do first. */
  readonly emptyMessage: string;
  readonly action: { readonly label: string; readonly link: string };
}

/**
 * Home cards per role. The features behind them are not built yet, so every card shows its
 * empty state; each card will read its feature's data when that feature lands.
 */
export const nextStepsByRole: Readonly<Record<Role, readonly NextStep[]>> = {
  buyer: [
    {
      key: 'loans',
      icon: 'inventory_2',
      title: 'Evaluation loans',
      emptyHeading: 'No evaluation loans yet',
      emptyMessage:
        'Find equipment to evaluate and ask for it on the dates your surgeons have cases.',
      action: { label: 'Find equipment', link: '/equipment' },
    },
    {
      key: 'proctoring',
      icon: 'supervisor_account',
      title: 'Proctoring visits',
      emptyHeading: 'No proctoring visits booked',
      emptyMessage: 'Once a loan is approved, ask for a proctor to supervise the first cases.',
      action: { label: 'Open proctoring', link: '/proctoring' },
    },
  ],
  clinician: [
    {
      key: 'schedule',
      icon: 'event',
      title: 'Arrivals and visits',
      emptyHeading: 'Nothing on its way to your campus',
      emptyMessage:
        'When a loan is confirmed you’ll see here when the kit arrives and when the proctor comes.',
      action: { label: 'Open schedule', link: '/schedule' },
    },
    {
      key: 'case-log',
      icon: 'clinical_notes',
      title: 'Case log',
      emptyHeading: 'No cases to log yet',
      emptyMessage:
        'Log each evaluation case once the kit has arrived — de-identified, no patient details.',
      action: { label: 'Open case log', link: '/case-log' },
    },
  ],
  proctor: [
    {
      key: 'visit-offers',
      icon: 'mark_email_unread',
      title: 'Visit offers',
      emptyHeading: 'No visit offers waiting',
      emptyMessage: 'Hospitals’ requests for you to supervise first cases will appear here.',
      action: { label: 'Open visit offers', link: '/visit-offers' },
    },
    {
      key: 'credentials',
      icon: 'badge',
      title: 'Credentials',
      emptyHeading: 'Keep your credentials current',
      emptyMessage:
        'Hospitals can only ask you for visits where your credentials are recorded and still valid.',
      action: { label: 'Review credentials', link: '/credentials' },
    },
  ],
  coordinator: [
    {
      key: 'outbound',
      icon: 'local_shipping',
      title: 'Shipments',
      emptyHeading: 'No shipments to pack today',
      emptyMessage: 'Approved loans show up here as their ship-by date comes close.',
      action: { label: 'Open shipments', link: '/shipments' },
    },
    {
      key: 'returns',
      icon: 'move_to_inbox',
      title: 'Returns',
      emptyHeading: 'No returns waiting for inspection',
      emptyMessage: 'Units coming back from hospitals are listed here for receipt and inspection.',
      action: { label: 'Open shipments', link: '/shipments' },
    },
  ],
  fleet_manager: [
    {
      key: 'approvals',
      icon: 'fact_check',
      title: 'Loan requests',
      emptyHeading: 'No loan requests waiting for approval',
      emptyMessage: 'Hospitals’ requests for your units wait here for your decision.',
      action: { label: 'Open approvals', link: '/approvals' },
    },
    {
      key: 'catalog',
      icon: 'category',
      title: 'Catalog',
      emptyHeading: 'Make your models easy to find',
      emptyMessage: 'List models with their units, compatibility, deposit rules and lead times.',
      action: { label: 'Open catalog', link: '/catalog' },
    },
  ],
  admin: [
    {
      key: 'organisations',
      icon: 'apartment',
      title: 'Organisations',
      emptyHeading: 'No organisations waiting for you',
      emptyMessage: 'Hospitals, lenders and proctor practices joining the marketplace appear here.',
      action: { label: 'Open organisations', link: '/organisations' },
    },
    {
      key: 'audit',
      icon: 'history',
      title: 'Audit',
      emptyHeading: 'Nothing to review right now',
      emptyMessage: 'Every change of role, access and loan is recorded for you to look back on.',
      action: { label: 'Open audit', link: '/audit' },
    },
  ],
};

/** Cards for everyone holding `roles`, in role order, without repeating a card. */
export function nextStepsFor(roles: readonly Role[]): NextStep[] {
  const seen = new Set<string>();
  const steps: NextStep[] = [];
  for (const role of roles) {
    for (const step of nextStepsByRole[role]) {
      if (!seen.has(step.key)) {
        seen.add(step.key);
        steps.push(step);
      }
    }
  }
  return steps;
}
