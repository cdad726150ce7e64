import { formatMoney } from '@evalon/deposits';
import { assertHttpUrl } from './escape';
import { DEFAULT_LOCALE, formatCalendarDate, type Recipient } from './format';
import { render, type Block, type RenderedMessage } from './layout';

/** The shipment conditions that send an alert, each once per shipment. */
export type ShipmentAlertKind =
  'at_risk' | 'overdue' | 'return_reminder' | 'return_late' | 'return_at_risk' | 'return_overdue';

/** Alerts about a return on its way back, whose deadline is the depot's back-at-depot day. */
const depotDeadline: readonly ShipmentAlertKind[] = ['return_at_risk', 'return_overdue'];

/** What an alert e-mail says about one shipment. */
export interface ShipmentAlertData {
  kind: ShipmentAlertKind;
  shipmentReference: string;
  loanReference: string;
  direction: 'outbound' | 'return';
  depotName: string;
  siteName: string;
  hospitalName: string;
  /**
   * The leg's deadline, a site calendar day: outbound, deliver by (campus); return waiting at the
   * campus, ship back by (campus); return on its way, back at the depot by (depot).
   */
  dueBy: string;
  /** Expected delivery (site calendar day), when known. */
  eta: string | null;
  trackingNumber: string | null;
  /** Link to the shipment (lender) or the loan (hospital). */
  url: string;
}

const alertWords: Record<
  ShipmentAlertKind,
  {
    subject: (d: ShipmentAlertData) => string;
    heading: string;
    lead: (d: ShipmentAlertData) => string;
  }
> = {
  at_risk: {
    subject: (d) => `At risk: ${d.shipmentReference} may arrive after ${d.dueBy}`,
    heading: 'A shipment may arrive late',
    lead: (d) =>
      `The expected delivery of ${d.shipmentReference} to ${d.siteName} is after the loan's deliver-by day. Check with the carrier and tell the campus in time for their receiving, inventory and reprocessing.`,
  },
  overdue: {
    subject: (d) => `Overdue: ${d.shipmentReference} was not delivered by ${d.dueBy}`,
    heading: 'A shipment is overdue',
    lead: (d) =>
      `${d.shipmentReference} to ${d.siteName} was not delivered by the end of its deliver-by day (campus time).`,
  },
  return_reminder: {
    subject: (d) => `Return due: ${d.loanReference} ships back by ${d.dueBy}`,
    heading: 'The return is due soon',
    lead: (d) =>
      `Loan ${d.loanReference} is due to ship back to ${d.depotName} by ${d.dueBy}. Before the return ships, record the decontamination (method, by whom, when) on the loan page; then book the return.`,
  },
  return_at_risk: {
    subject: (d) => `Return at risk: ${d.shipmentReference} may reach the depot after ${d.dueBy}`,
    heading: 'A return may reach the depot late',
    lead: (d) =>
      `The expected arrival of ${d.shipmentReference} at ${d.depotName} is after the loan's back-at-depot day. Check with the carrier; the unit's next loan may depend on it.`,
  },
  return_overdue: {
    subject: (d) => `Return overdue: ${d.shipmentReference} was not received by ${d.dueBy}`,
    heading: 'A return is overdue at the depot',
    lead: (d) =>
      `${d.shipmentReference} from ${d.siteName} was not received at ${d.depotName} by the end of its back-at-depot day (depot time).`,
  },
  return_late: {
    subject: (d) => `Return late: ${d.loanReference} was due to ship by ${d.dueBy}`,
    heading: 'A return is late',
    lead: (d) =>
      `The return of loan ${d.loanReference} to ${d.depotName} was due to ship by ${d.dueBy} and has not been handed to the carrier.`,
  },
};

/** Loaned devices come back contaminated until proven otherwise (AORN / AAMI ST79 practice). */
const DECONTAMINATION_CAUTION =
  'Loaned devices are treated as contaminated on arrival and decontaminated before return, following the manufacturer’s instructions for use and local sterile-processing policy.';

/**
 * An alert about one shipment (at risk, overdue, return reminder, return late) for the lender's
 * coordinators and the hospital's buyers.
 */
export function shipmentAlert(data: ShipmentAlertData, to: Recipient): RenderedMessage {
  assertHttpUrl(data.url);
  const words = alertWords[data.kind];
  const locale = to.locale ?? DEFAULT_LOCALE;
  const rows = [
    { label: 'Shipment', value: `${data.shipmentReference} (${data.direction})` },
    { label: 'Loan', value: data.loanReference },
    { label: 'From', value: data.direction === 'outbound' ? data.depotName : data.siteName },
    { label: 'To', value: data.direction === 'outbound' ? data.siteName : data.depotName },
    {
      label:
        data.direction === 'outbound'
          ? 'Deliver by'
          : depotDeadline.includes(data.kind)
            ? 'Back at depot by'
            : 'Ship back by',
      value: formatCalendarDate(data.dueBy, locale),
    },
  ];
  if (data.eta) {
    rows.push({
      label: data.direction === 'outbound' ? 'Expected delivery' : 'Expected at the depot',
      value: formatCalendarDate(data.eta, locale),
    });
  }
  if (data.trackingNumber) rows.push({ label: 'Tracking number', value: data.trackingNumber });
  const blocks: Block[] = [
    { kind: 'paragraph', text: words.lead(data) },
    {
      kind: 'facts',
      title: 'The shipment',
      note: depotDeadline.includes(data.kind)
        ? 'Dates are the depot’s calendar days.'
        : 'Dates are the campus’s calendar days.',
      rows,
    },
  ];
  if (data.kind.startsWith('return')) {
    blocks.push({ kind: 'paragraph', text: DECONTAMINATION_CAUTION });
  }
  blocks.push({ kind: 'action', label: 'Open', url: data.url });
  return render({
    subject: words.subject(data),
    preheader: words.lead(data).slice(0, 140),
    heading: words.heading,
    recipientName: to.name,
    blocks,
    reason: `You take part in loan ${data.loanReference} (${data.hospitalName}).`,
  });
}

/** What the deposit statement says. */
export interface DepositStatementData {
  loanReference: string;
  lenderName: string;
  hospitalName: string;
  currency: string;
  /** What the deposit was (captured or authorised). */
  deposit: number;
  findings: { category: string; note: string; charge: number }[];
  /** Kept from the deposit for the charges. */
  kept: number;
  /** Given back (refunded or released). */
  returned: number;
  /** Charges the deposit did not cover (invoiced separately, never taken from the card). */
  uncovered: number;
  url: string;
}

/** The buyer's statement after the return inspection: findings, deduction and refund. */
export function depositStatement(data: DepositStatementData, to: Recipient): RenderedMessage {
  assertHttpUrl(data.url);
  const locale = to.locale ?? DEFAULT_LOCALE;
  const money = (n: number) => formatMoney(n, data.currency, locale);
  const blocks: Block[] = [
    {
      kind: 'paragraph',
      text: `${data.lenderName} has inspected the units returned under loan ${data.loanReference} and settled the deposit. The loan is closed.`,
    },
    {
      kind: 'facts',
      title: 'Deposit settlement',
      rows: [
        { label: 'Deposit', value: money(data.deposit) },
        { label: 'Deducted', value: money(data.kept) },
        { label: 'Refunded or released', value: money(data.returned) },
        ...(data.uncovered > 0
          ? [{ label: 'Not covered by the deposit (invoiced)', value: money(data.uncovered) }]
          : []),
      ],
    },
    data.findings.length > 0
      ? {
          kind: 'list',
          title: 'Inspection findings',
          items: data.findings.map(
            (f) => `${f.category}: ${f.note}${f.charge > 0 ? ` — ${money(f.charge)}` : ''}`,
          ),
        }
      : { kind: 'paragraph', text: 'The inspection found nothing to charge.' },
    { kind: 'action', label: 'Open the loan', url: data.url },
  ];
  return render({
    subject: `Loan ${data.loanReference} closed: deposit statement`,
    preheader: `Deducted ${money(data.kept)}, refunded ${money(data.returned)}.`,
    heading: 'Your deposit statement',
    recipientName: to.name,
    blocks,
    reason: `You are a buyer on loan ${data.loanReference} (${data.hospitalName}).`,
  });
}
