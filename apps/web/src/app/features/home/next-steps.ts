import type {
  Loan,
  LoanState,
  OutboxMessage,
  Role,
  ShipmentSummary,
  Visit,
} from '@evalon/contracts';
import { addDays, formatDay, formatWindowCompact } from '../../shared/iso-date';

/**
 * Where a card's live content comes from: the buyer's loans, the fleet manager's waiting
 * requests, the coordinator's confirmed loans to ship and returns coming back, the clinician's
 * upcoming loans, the hospital's proctoring visits, the proctor's offers, the admin's parked
 * e-mails. Cards without a source show their fixed text with a link.
 */
export type LiveSource =
  | 'buyer-loans'
  | 'approvals'
  | 'shipping'
  | 'returns'
  | 'arrivals'
  | 'buyer-visits'
  | 'proctor-offers'
  | 'outbox';

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
  /** Where the card's content comes from, when it has live content. */
  readonly live?: LiveSource;
}

/** One line in a card: something to do or to know, with where to do it. */
export interface StepItem {
  readonly key: string;
  readonly icon: string;
  readonly text: string;
  readonly detail: string;
  readonly link: string;
  /** `action`: the person must act; `waiting`: someone else must; `info`: coming up. */
  readonly tone: 'action' | 'waiting' | 'info';
}

/** What a live card shows: a headline (a count), a few items, and how many more there are. */
export interface StepSummary {
  readonly headline: string;
  readonly items: readonly StepItem[];
  /** Items left out of the card (shown on the feature's page). */
  readonly more: number;
  /** Said when there is nothing to do right now but the headline still counts something. */
  readonly quiet?: string;
}

/** How many items a card lists before "and N more". */
export const itemsPerCard = 3;

/** States of a loan that is under way (not finished, not stopped). */
export const activeLoanStates: readonly LoanState[] = [
  'requested',
  'approved',
  'confirmed',
  'shipped',
  'delivered',
  'returning',
  'returned',
];

const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

function limited(items: StepItem[]): { items: StepItem[]; more: number } {
  return { items: items.slice(0, itemsPerCard), more: Math.max(0, items.length - itemsPerCard) };
}

const byShipBy = (a: Loan, b: Loan) =>
  a.milestones.shipBy.localeCompare(b.milestones.shipBy) || a.id - b.id;

/**
 * A buyer's loans: how many are under way, the approved ones first ("Secure the deposit for
 * EV-…", soonest shipping first), then the requests waiting for the lender. Null without any
 * loan under way (the card shows its empty state).
 */
export function buyerLoansSummary(loans: readonly Loan[], locale = 'en-US'): StepSummary | null {
  const active = loans.filter((l) => activeLoanStates.includes(l.state));
  if (!active.length) return null;
  const approved = active.filter((l) => l.state === 'approved').sort(byShipBy);
  const requested = active
    .filter((l) => l.state === 'requested')
    .sort((a, b) => a.createdAt.localeCompare(b.createdAt) || a.id - b.id);
  const items: StepItem[] = [
    ...approved.map((l) => ({
      key: `loan-${l.id}`,
      icon: 'payments',
      text: `Secure the deposit for ${l.reference}`,
      detail: `${l.lenderName} approved · cases ${formatWindowCompact(l.useFrom, l.useTo, locale)}`,
      link: `/loans/${l.id}`,
      tone: 'action' as const,
    })),
    ...requested.map((l) => ({
      key: `loan-${l.id}`,
      icon: 'hourglass_top',
      text: `Waiting for the lender: ${l.reference}`,
      detail: `${l.lenderName} · cases ${formatWindowCompact(l.useFrom, l.useTo, locale)}`,
      link: `/loans/${l.id}`,
      tone: 'waiting' as const,
    })),
  ];
  const needDeposit = approved.length
    ? ` · ${approved.length} ${approved.length === 1 ? 'needs' : 'need'} a deposit`
    : '';
  return {
    headline: `${plural(active.length, 'active loan', 'active loans')}${needDeposit}`,
    ...limited(items),
    quiet: 'Nothing needs you right now: your lenders are preparing the rest.',
  };
}

/** A fleet manager's waiting requests, longest waiting first. Null when none wait. */
export function approvalsSummary(requested: readonly Loan[], locale = 'en-US'): StepSummary | null {
  const waiting = requested
    .filter((l) => l.state === 'requested')
    .sort((a, b) => a.createdAt.localeCompare(b.createdAt) || a.id - b.id);
  if (!waiting.length) return null;
  return {
    headline: `${plural(waiting.length, 'loan request', 'loan requests')} waiting for approval`,
    ...limited(
      waiting.map((l) => ({
        key: `loan-${l.id}`,
        icon: 'inbox',
        text: `${l.reference} · ${l.hospitalName}`,
        detail: `${l.siteName} · cases ${formatWindowCompact(l.useFrom, l.useTo, locale)}`,
        link: '/approvals',
        tone: 'action' as const,
      })),
    ),
  };
}

/**
 * A coordinator's confirmed loans by ship-by day, soonest first: overdue and due within two
 * days are marked to act on (common practice: pack the day before). Null when none.
 */
export function shippingSummary(
  confirmed: readonly Loan[],
  today: string,
  locale = 'en-US',
): StepSummary | null {
  const toShip = confirmed.filter((l) => l.state === 'confirmed').sort(byShipBy);
  if (!toShip.length) return null;
  const inTwoDays = addDays(today, 2);
  return {
    headline: `${plural(toShip.length, 'confirmed loan', 'confirmed loans')} to ship`,
    ...limited(
      toShip.map((l) => {
        const shipBy = l.milestones.shipBy;
        const late = shipBy < today;
        const depots = [...new Set(l.units.map((u) => u.depotName))].join(', ');
        return {
          key: `loan-${l.id}`,
          icon: late ? 'warning' : 'local_shipping',
          text: `${l.reference} ${late ? 'was due to ship' : 'ships by'} ${formatDay(shipBy, 'medium', locale)}`,
          detail: `${l.hospitalName}, ${l.siteName}${depots ? ` · from ${depots}` : ''}`,
          link: `/loans/${l.id}`,
          tone: late || shipBy <= inTwoDays ? ('action' as const) : ('info' as const),
        };
      }),
    ),
  };
}

/**
 * A clinician's upcoming loans at their hospital (confirmed, on the way, or at the campus, whose
 * last case day has not passed), by first case day. Null when none.
 */
export function arrivalsSummary(
  loans: readonly Loan[],
  today: string,
  locale = 'en-US',
): StepSummary | null {
  const upcoming = loans
    .filter((l) => ['confirmed', 'shipped', 'delivered'].includes(l.state) && l.useTo >= today)
    .sort((a, b) => a.useFrom.localeCompare(b.useFrom) || a.id - b.id);
  if (!upcoming.length) return null;
  return {
    headline: `${plural(upcoming.length, 'loan', 'loans')} coming to your campuses`,
    ...limited(
      upcoming.map((l) => {
        const models = [...new Set(l.units.map((u) => u.modelName))].join(', ');
        const firstCase = formatDay(l.useFrom, 'medium', locale);
        const detail =
          l.state === 'delivered'
            ? `At ${l.siteName} · cases ${formatWindowCompact(l.useFrom, l.useTo, locale)}`
            : `${l.state === 'shipped' ? 'On its way · ' : ''}Arrives by ${formatDay(l.milestones.deliverBy, 'medium', locale)} · first case ${firstCase}`;
        return {
          key: `loan-${l.id}`,
          icon: l.state === 'shipped' ? 'local_shipping' : 'event',
          text: `${models || l.reference} at ${l.siteName}`,
          detail,
          link: `/loans/${l.id}`,
          tone: 'info' as const,
        };
      }),
    ),
  };
}

const byFirstDay = (a: Visit, b: Visit) => a.from.localeCompare(b.from) || a.id - b.id;

/**
 * A hospital's proctoring visits under way: the unfilled ones first (nobody accepted: widen the
 * search or cancel), then those waiting for a proctor's answer, then the booked ones still to
 * come. Null when none is under way.
 */
export function buyerVisitsSummary(
  visits: readonly Visit[],
  today: string,
  locale = 'en-US',
): StepSummary | null {
  const unfilled = visits.filter((v) => v.state === 'unfilled' && v.to >= today).sort(byFirstDay);
  const waiting = visits
    .filter((v) => v.state === 'requested' || v.state === 'offered')
    .sort(byFirstDay);
  const booked = visits.filter((v) => v.state === 'accepted' && v.to >= today).sort(byFirstDay);
  const all = unfilled.length + waiting.length + booked.length;
  if (!all) return null;
  const where = (v: Visit) =>
    `${v.modelName} at ${v.siteName} · ${formatWindowCompact(v.from, v.to, locale)}`;
  const items: StepItem[] = [
    ...unfilled.map((v) => ({
      key: `visit-${v.id}`,
      icon: 'person_search',
      text: `No proctor found for ${v.reference}`,
      detail: `${where(v)} · widen the search or cancel`,
      link: `/visits/${v.id}`,
      tone: 'action' as const,
    })),
    ...waiting.map((v) => ({
      key: `visit-${v.id}`,
      icon: 'hourglass_top',
      text: v.currentOffer
        ? `Waiting for ${v.currentOffer.proctorName} to answer`
        : `Finding a proctor for ${v.reference}`,
      detail: where(v),
      link: `/visits/${v.id}`,
      tone: 'waiting' as const,
    })),
    ...booked.map((v) => ({
      key: `visit-${v.id}`,
      icon: 'event_available',
      text: `${v.proctorName ?? 'Proctor'} comes to ${v.siteName}`,
      detail: `${v.modelName} · ${formatWindowCompact(v.from, v.to, locale)}`,
      link: `/visits/${v.id}`,
      tone: 'info' as const,
    })),
  ];
  const needYou = unfilled.length
    ? ` · ${unfilled.length} ${unfilled.length === 1 ? 'needs' : 'need'} you`
    : '';
  return {
    headline: `${plural(all, 'visit under way', 'visits under way')}${needYou}`,
    ...limited(items),
    quiet: 'Nothing needs you right now: proctors are answering or coming as booked.',
  };
}

/**
 * A proctor's offers waiting for their answer (soonest deadline first), then their booked visits
 * still to come. Null when there is neither.
 */
export function proctorOffersSummary(
  visits: readonly Visit[],
  proctorId: number | null,
  today: string,
  locale = 'en-US',
): StepSummary | null {
  if (proctorId === null) return null;
  const offers = visits
    .filter((v) => v.state === 'offered' && v.currentOffer?.proctorId === proctorId)
    .sort(
      (a, b) =>
        (a.currentOffer?.deadlineAt ?? '').localeCompare(b.currentOffer?.deadlineAt ?? '') ||
        a.id - b.id,
    );
  const booked = visits
    .filter((v) => v.state === 'accepted' && v.proctorId === proctorId && v.to >= today)
    .sort(byFirstDay);
  if (!offers.length && !booked.length) return null;
  const items: StepItem[] = [
    ...offers.map((v) => ({
      key: `visit-${v.id}`,
      icon: 'mark_email_unread',
      text: `Answer ${v.hospitalName}`,
      detail: `${v.modelName} at ${v.siteName} · ${formatWindowCompact(v.from, v.to, locale)}`,
      link: '/proctor',
      tone: 'action' as const,
    })),
    ...booked.map((v) => ({
      key: `visit-${v.id}`,
      icon: 'event_available',
      text: `${v.siteName}, ${v.hospitalName}`,
      detail: `${v.modelName} · ${formatWindowCompact(v.from, v.to, locale)}`,
      link: `/visits/${v.id}`,
      tone: 'info' as const,
    })),
  ];
  return {
    headline: offers.length
      ? `${plural(offers.length, 'offer', 'offers')} waiting for your answer`
      : `${plural(booked.length, 'visit', 'visits')} coming up`,
    ...limited(items),
    quiet: 'No offer waits for your answer.',
  };
}

/**
 * A coordinator's returns: received ones to inspect first, then those on their way back by the
 * day they are due. Null when none is open.
 */
export function returnsSummary(
  returns: readonly ShipmentSummary[],
  locale = 'en-US',
): StepSummary | null {
  const open = returns.filter((s) => s.direction === 'return');
  const toInspect = open.filter((s) => s.state === 'received');
  const coming = open
    .filter((s) => s.state === 'handed_over' || s.state === 'in_transit')
    .sort((a, b) => a.dueBy.localeCompare(b.dueBy) || a.id - b.id);
  if (!toInspect.length && !coming.length) return null;
  const items: StepItem[] = [
    ...toInspect.map((s) => ({
      key: `shipment-${s.id}`,
      icon: 'fact_check',
      text: `Inspect ${s.loanReference}`,
      detail: `Back at ${s.depotName} from ${s.hospitalName}`,
      link: `/shipments/${s.id}`,
      tone: 'action' as const,
    })),
    ...coming.map((s) => ({
      key: `shipment-${s.id}`,
      icon: 'local_shipping',
      text: `${s.loanReference} on its way back`,
      detail: `To ${s.depotName}${s.eta ? ` · expected ${formatDay(s.eta, 'medium', locale)}` : ''}`,
      link: `/shipments/${s.id}`,
      tone: 'info' as const,
    })),
  ];
  return {
    headline: toInspect.length
      ? `${plural(toInspect.length, 'return', 'returns')} to inspect`
      : `${plural(coming.length, 'return', 'returns')} on the way back`,
    ...limited(items),
    quiet: 'Nothing to inspect yet.',
  };
}

/**
 * The admin's parked e-mails. `limit` is how many were asked for: a full page means there may be
 * more ("200+"). Null when every e-mail was delivered.
 */
export function outboxSummary(parked: readonly OutboxMessage[], limit: number): StepSummary | null {
  if (!parked.length) return null;
  const count = parked.length >= limit ? `${parked.length}+` : String(parked.length);
  return {
    headline: `${count} ${parked.length === 1 ? 'e-mail' : 'e-mails'} could not be delivered`,
    ...limited(
      parked.map((m) => ({
        key: `mail-${m.id}`,
        icon: 'unsubscribe',
        text: m.subject,
        detail: `To ${m.to.join(', ')} · ${plural(m.attempts, 'attempt', 'attempts')}`,
        link: '/outbox',
        tone: 'action' as const,
      })),
    ),
  };
}

/**
 * Home cards per role. Cards with a `live` source read their data from the API; the others
 * (features not built yet) show their empty state.
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
      live: 'buyer-loans',
    },
    {
      key: 'proctoring',
      icon: 'supervisor_account',
      title: 'Proctoring visits',
      emptyHeading: 'No proctoring visits booked',
      emptyMessage: 'Once a loan is approved, ask for a proctor to supervise the first cases.',
      action: { label: 'Open proctoring', link: '/visits' },
      live: 'buyer-visits',
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
      action: { label: 'Open loans', link: '/loans' },
      live: 'arrivals',
    },
    {
      key: 'case-log',
      icon: 'clinical_notes',
      title: 'Evaluation cases',
      emptyHeading: 'Record each evaluation case',
      emptyMessage:
        'Once the kit has arrived, record each case on the loan’s page — de-identified, no patient details.',
      action: { label: 'Open loans', link: '/loans' },
    },
    {
      key: 'training',
      icon: 'school',
      title: 'My training',
      emptyHeading: 'Your supervised cases',
      emptyMessage: 'Cases a proctor supervised you on and your sign-offs are kept here.',
      action: { label: 'Open my training', link: '/training' },
    },
  ],
  proctor: [
    {
      key: 'visit-offers',
      icon: 'mark_email_unread',
      title: 'Visit offers',
      emptyHeading: 'No visit offers waiting',
      emptyMessage: 'Hospitals’ requests for you to supervise first cases will appear here.',
      action: { label: 'Open visit offers', link: '/proctor' },
      live: 'proctor-offers',
    },
    {
      key: 'credentials',
      icon: 'badge',
      title: 'Credentials',
      emptyHeading: 'Keep your credentials current',
      emptyMessage:
        'Hospitals can only ask you for visits where your credentials are recorded and still valid.',
      action: { label: 'Review credentials', link: '/proctor/credentials' },
    },
  ],
  coordinator: [
    {
      key: 'outbound',
      icon: 'local_shipping',
      title: 'Shipments',
      emptyHeading: 'No shipments to pack today',
      emptyMessage: 'Confirmed loans show up here, by the day they must ship.',
      action: { label: 'Open shipments', link: '/shipments' },
      live: 'shipping',
    },
    {
      key: 'returns',
      icon: 'move_to_inbox',
      title: 'Returns',
      emptyHeading: 'No returns waiting for inspection',
      emptyMessage: 'Units coming back from hospitals are listed here for receipt and inspection.',
      action: { label: 'Open shipments', link: '/shipments' },
      live: 'returns',
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
      live: 'approvals',
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
      key: 'outbox',
      icon: 'outgoing_mail',
      title: 'E-mail outbox',
      emptyHeading: 'Every e-mail was delivered',
      emptyMessage:
        'When the mail server keeps refusing a message, it waits here for you to send it again.',
      action: { label: 'Open outbox', link: '/outbox' },
      live: 'outbox',
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
