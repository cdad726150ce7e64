import { loan as loanSchema, type Loan } from '@evalon/contracts';
import { formatMoney } from '@evalon/deposits';

import { assertHttpUrl } from './escape';
import {
  formatCalendarDate,
  formatInstant,
  type Instant,
  normaliseRecipient,
  type Recipient,
} from './format';
import { buildLoanInvite, type InviteMethod, type LoanInviteInput } from './ics';
import { type Block, type Fact, type MessageContent, render, type RenderedMessage } from './layout';
import {
  CLINICAL_CAUTIONS,
  DEPOT_MILESTONES,
  loanUrl,
  MILESTONE_LABELS,
  SITE_MILESTONES,
  unitLine,
} from './wording';

/** A file attached to a message, in the shape nodemailer takes. */
export interface EmailAttachment {
  /** File name shown to the reader, e.g. `evalon-loan-EV-2027-000042.ics`. */
  filename: string;
  /** MIME type with parameters, e.g. `text/calendar; charset=utf-8; method=REQUEST`. */
  contentType: string;
  /** The file's text. */
  content: string;
}

/** A rendered loan e-mail: subject, HTML and text parts, and any attachments. */
export interface LoanEmail extends RenderedMessage {
  /** Attached files (the calendar invite on confirmations and cancellations). */
  attachments?: EmailAttachment[];
}

/** What every loan message is built from. */
export interface LoanMessageData {
  /** The loan (validated with the `loan` contract). */
  loan: Loan;
  /** Public base URL of the Evalon web app, e.g. `https://evalon.example`. */
  publicUrl: string;
}

/** Data of {@link loanApproved}. */
export interface LoanApprovedData extends LoanMessageData {
  /** Deadline to secure the deposit (or, when none is due, to confirm): an instant. */
  depositDueBy: Instant;
  /** Where the buyer pays or confirms; the loan's page when omitted. */
  actionUrl?: string;
}

/** Invite details for messages that carry an `.ics`: everything but the loan, link and method. */
export type LoanInviteDetails = Omit<LoanInviteInput, 'loan' | 'publicUrl' | 'method'>;

/** Data of {@link loanConfirmed}. */
export interface LoanConfirmedData extends LoanMessageData {
  /** Organizer, attendees, SEQUENCE and site address of the attached invite. */
  invite: LoanInviteDetails;
}

/** Data of {@link loanDeclined}. */
export interface LoanDeclinedData extends LoanMessageData {
  /** The lender's reason, as written. */
  reason: string;
}

/** Data of {@link loanCancelled}. */
export interface LoanCancelledData extends LoanMessageData {
  /** Why the loan was cancelled, as written. */
  reason: string;
  /** Who cancelled (a name or an organisation), when known. */
  cancelledBy?: string;
  /**
   * When the loan had been confirmed (an invite went out): the details for the METHOD:CANCEL
   * invite that removes the events from calendars. Its `sequence` must be above the last sent.
   */
  invite?: LoanInviteDetails;
}

/** Data of {@link loanExpired}. */
export interface LoanExpiredData extends LoanMessageData {
  /** When the loan expired: an instant. */
  expiredAt: Instant;
  /** The state the loan expired from: the lender did not answer, or the deposit was not secured. */
  expiredFrom: 'requested' | 'approved';
}

/** Everything a template needs, checked once. */
interface Context {
  loan: Loan;
  to: Required<Recipient>;
  link: string;
  publicUrl: string;
}

function context(data: LoanMessageData, recipient: Recipient): Context {
  const loan = loanSchema.parse(data.loan);
  const publicUrl = assertHttpUrl(data.publicUrl, 'publicUrl');
  return { loan, to: normaliseRecipient(recipient), link: loanUrl(publicUrl, loan.id), publicUrl };
}

/** An instant (deadline, expiry, request time) in the RECIPIENT's zone and locale. */
function when(ctx: Context, instant: Instant, style: 'long' | 'short' = 'long'): string {
  return formatInstant(instant, ctx.to.timeZone, ctx.to.locale, style);
}

function money(ctx: Context): string {
  return formatMoney(ctx.loan.deposit.amount, ctx.loan.deposit.currency, ctx.to.locale);
}

function unitsBlock(loan: Loan): Block {
  return {
    kind: 'list',
    title: loan.units.length === 1 ? 'Unit' : `Units (${loan.units.length})`,
    items: loan.units.map(unitLine),
  };
}

/**
 * Milestones are CALENDAR DATES, not instants: "first case day 2027-03-15" is a day on the
 * hospital site's calendar (and "ship by" a day on the depot's). Converting them to the reader's
 * zone would be wrong twice over: a date has no time of day to convert, and shifting it by a
 * zone difference would move the OR's case day for a reader abroad. So they are shown as the
 * site's own days, labelled with the site and its zone, while true instants (deadlines, expiry)
 * are converted to the reader's zone by {@link when}.
 */
function siteDatesBlock(ctx: Context): Block {
  const { loan } = ctx;
  return {
    kind: 'facts',
    title: `Dates at ${loan.siteName}`,
    rows: SITE_MILESTONES.map((key) => ({
      label: MILESTONE_LABELS[key],
      value: formatCalendarDate(loan.milestones[key], ctx.to.locale),
    })),
    note: `Calendar days at ${loan.siteName}, site time zone ${loan.siteTimeZone}.`,
  };
}

function depotDatesBlock(ctx: Context): Block {
  const depots = [...new Set(ctx.loan.units.map((u) => u.depotName))];
  return {
    kind: 'facts',
    title: 'Dates at the lender’s depot',
    rows: DEPOT_MILESTONES.map((key) => ({
      label: MILESTONE_LABELS[key],
      value: formatCalendarDate(ctx.loan.milestones[key], ctx.to.locale),
    })),
    note:
      depots.length === 1
        ? `Calendar days at ${depots[0]}, in the depot’s own time zone.`
        : `Calendar days at ${depots.join(', ')}, each in its depot’s own time zone.`,
  };
}

function overview(ctx: Context, extra: Fact[] = []): Block {
  const { loan } = ctx;
  return {
    kind: 'facts',
    title: 'Loan',
    rows: [
      { label: 'Reference', value: loan.reference },
      { label: 'Hospital', value: `${loan.hospitalName}, ${loan.siteName}` },
      { label: 'Lender', value: loan.lenderName },
      ...extra,
    ],
  };
}

function participationReason(loan: Loan): string {
  return `You receive this e-mail because you take part in Evalon loan ${loan.reference}.`;
}

function calendarAttachment(
  ctx: Context,
  details: LoanInviteDetails,
  method: InviteMethod,
): EmailAttachment {
  const content = buildLoanInvite({ ...details, loan: ctx.loan, publicUrl: ctx.publicUrl, method });
  return {
    filename: `evalon-loan-${ctx.loan.reference.replace(/[^A-Za-z0-9_-]+/g, '-')}.ics`,
    // RFC 6047 §2.4: the MIME `method` parameter must equal the METHOD inside; the charset is
    // given because names may be non-ASCII and text/* defaults to US-ASCII (RFC 2046 §4.1.2).
    contentType: `text/calendar; charset=utf-8; method=${method}`,
    content,
  };
}

function finish(content: MessageContent, attachments?: EmailAttachment[]): LoanEmail {
  const rendered = render(content);
  return attachments && attachments.length > 0 ? { ...rendered, attachments } : rendered;
}

/**
 * "New loan request", to the lender's fleet managers: who asks for which units and dates, the
 * deposit the rules compute, the requester's note, and a link to review the request.
 *
 * @param data The loan and the public URL.
 * @param recipient The fleet manager; the request time is shown in their zone.
 */
export function loanRequested(data: LoanMessageData, recipient: Recipient): LoanEmail {
  const ctx = context(data, recipient);
  const { loan } = ctx;
  const blocks: Block[] = [
    {
      kind: 'paragraph',
      text: `${loan.hospitalName} asks to borrow equipment for an evaluation at ${loan.siteName}, from ${formatCalendarDate(loan.milestones.useFrom, ctx.to.locale)} to ${formatCalendarDate(loan.milestones.useTo, ctx.to.locale)} (site calendar days).`,
    },
    overview(ctx, [
      { label: 'Requested by', value: loan.requestedBy },
      { label: 'Requested on', value: when(ctx, loan.createdAt) },
      { label: 'Deposit (computed)', value: money(ctx) },
    ]),
    unitsBlock(loan),
    siteDatesBlock(ctx),
    depotDatesBlock(ctx),
    ...(loan.note
      ? [{ kind: 'quote', title: 'Note from the hospital', text: loan.note } as const]
      : []),
    { kind: 'action', label: 'Review the request', url: ctx.link },
  ];
  return finish({
    subject: `New loan request ${loan.reference} from ${loan.hospitalName}`,
    preheader: `${loan.hospitalName} asks for ${loan.units.length} unit(s), first case day ${formatCalendarDate(loan.milestones.useFrom, ctx.to.locale)}.`,
    heading: 'New loan request',
    recipientName: ctx.to.name,
    blocks,
    reason: `You receive this e-mail because you approve loans for ${loan.lenderName} on Evalon.`,
  });
}

/**
 * "Loan approved", to the hospital buyer: the deposit due, the deadline in the buyer's own time
 * zone, and a link to pay (or, when no deposit is due, to confirm).
 *
 * @param data The loan, the public URL, the deadline and the pay/confirm link.
 * @param recipient The buyer.
 */
export function loanApproved(data: LoanApprovedData, recipient: Recipient): LoanEmail {
  const ctx = context(data, recipient);
  const { loan } = ctx;
  const deadline = when(ctx, data.depositDueBy);
  const shortDeadline = when(ctx, data.depositDueBy, 'short');
  const actionUrl = data.actionUrl ? assertHttpUrl(data.actionUrl, 'actionUrl') : ctx.link;
  const depositDue = loan.deposit.amount > 0;
  const blocks: Block[] = [
    {
      kind: 'paragraph',
      text: depositDue
        ? `${loan.lenderName} has approved loan ${loan.reference}. To confirm it, secure the deposit of ${money(ctx)} by ${deadline}. If it is not secured by then, the loan expires and the dates are released.`
        : `${loan.lenderName} has approved loan ${loan.reference}. No deposit is due under your payment terms; confirm the loan by ${deadline}, or it expires and the dates are released.`,
    },
    overview(ctx, [
      {
        label: depositDue ? 'Deposit due' : 'Deposit',
        value: depositDue ? money(ctx) : 'None due',
      },
      { label: depositDue ? 'Secure it by' : 'Confirm by', value: deadline },
    ]),
    unitsBlock(loan),
    siteDatesBlock(ctx),
    {
      kind: 'paragraph',
      text: 'The deposit is refundable: it is settled after the unit is back and inspected, less any inspection charges.',
    },
    { kind: 'action', label: depositDue ? 'Pay the deposit' : 'Confirm the loan', url: actionUrl },
  ];
  return finish({
    subject: depositDue
      ? `Loan ${loan.reference} approved: deposit of ${money(ctx)} due by ${shortDeadline}`
      : `Loan ${loan.reference} approved: please confirm by ${shortDeadline}`,
    preheader: depositDue
      ? `Secure the deposit of ${money(ctx)} by ${deadline} to confirm.`
      : `Confirm by ${deadline}.`,
    heading: 'Your loan is approved',
    recipientName: ctx.to.name,
    blocks,
    reason: participationReason(loan),
  });
}

/**
 * "Loan confirmed", to the buyer, the lender's coordinator and the campus's clinicians: dates,
 * units, the clinical cautions, and the calendar invite (METHOD:REQUEST) attached.
 *
 * @param data The loan, the public URL and the invite details (organizer, attendees, SEQUENCE).
 * @param recipient One of the people above.
 */
export function loanConfirmed(data: LoanConfirmedData, recipient: Recipient): LoanEmail {
  const ctx = context(data, recipient);
  const { loan } = ctx;
  const arrives = formatCalendarDate(loan.milestones.deliverBy, ctx.to.locale);
  const attachment = calendarAttachment(ctx, data.invite, 'REQUEST');
  const blocks: Block[] = [
    {
      kind: 'paragraph',
      text: `Loan ${loan.reference} is confirmed. The equipment arrives at ${loan.siteName} by ${arrives} (site calendar day). The attached calendar invite (${attachment.filename}) adds the arrival day and the evaluation days to your calendar.`,
    },
    overview(ctx),
    unitsBlock(loan),
    siteDatesBlock(ctx),
    depotDatesBlock(ctx),
    { kind: 'list', title: 'Before the first case', items: [...CLINICAL_CAUTIONS] },
    { kind: 'action', label: 'Open the loan', url: ctx.link },
  ];
  return finish(
    {
      subject: `Loan ${loan.reference} confirmed: arrives at ${loan.siteName} by ${arrives}`,
      preheader: `Arrives by ${arrives}; first case day ${formatCalendarDate(loan.milestones.useFrom, ctx.to.locale)}.`,
      heading: 'Your loan is confirmed',
      recipientName: ctx.to.name,
      blocks,
      reason: participationReason(loan),
    },
    [attachment],
  );
}

/**
 * "Loan request declined", to the buyer: the lender's reason and a link back to the loan.
 *
 * @param data The loan, the public URL and the reason.
 * @param recipient The buyer.
 */
export function loanDeclined(data: LoanDeclinedData, recipient: Recipient): LoanEmail {
  const ctx = context(data, recipient);
  const { loan } = ctx;
  return finish({
    subject: `Loan request ${loan.reference} declined by ${loan.lenderName}`,
    preheader: `${loan.lenderName} cannot lend for these dates.`,
    heading: 'Your loan request was declined',
    recipientName: ctx.to.name,
    blocks: [
      {
        kind: 'paragraph',
        text: `${loan.lenderName} has declined loan request ${loan.reference}. No deposit was taken. You can look for other dates or units on Evalon.`,
      },
      { kind: 'quote', title: 'Reason given', text: data.reason },
      overview(ctx),
      unitsBlock(loan),
      siteDatesBlock(ctx),
      { kind: 'action', label: 'Open the request', url: ctx.link },
    ],
    reason: participationReason(loan),
  });
}

/**
 * "Loan cancelled", to everyone on the loan: the reason, who cancelled, and, when the loan had
 * been confirmed, a METHOD:CANCEL invite that removes the events from calendars.
 *
 * @param data The loan, the public URL, the reason and optionally the cancel invite details.
 * @param recipient Anyone on the loan.
 */
export function loanCancelled(data: LoanCancelledData, recipient: Recipient): LoanEmail {
  const ctx = context(data, recipient);
  const { loan } = ctx;
  const attachment = data.invite ? calendarAttachment(ctx, data.invite, 'CANCEL') : undefined;
  const by = data.cancelledBy ? ` by ${data.cancelledBy}` : '';
  return finish(
    {
      subject: `Loan ${loan.reference} cancelled`,
      preheader: `Loan ${loan.reference} for ${loan.siteName} was cancelled${by}.`,
      heading: 'A loan was cancelled',
      recipientName: ctx.to.name,
      blocks: [
        {
          kind: 'paragraph',
          text:
            `Loan ${loan.reference} was cancelled${by}. The dates are released.` +
            (attachment
              ? ` The attached calendar update (${attachment.filename}) removes its events from your calendar.`
              : ''),
        },
        { kind: 'quote', title: 'Reason given', text: data.reason },
        overview(ctx),
        unitsBlock(loan),
        siteDatesBlock(ctx),
        { kind: 'action', label: 'Open the loan', url: ctx.link },
      ],
      reason: participationReason(loan),
    },
    attachment ? [attachment] : undefined,
  );
}

/**
 * "Loan expired", to the buyer: the request was not answered in time, or the deposit was not
 * secured by the deadline; the expiry instant is shown in the reader's zone.
 *
 * @param data The loan, the public URL, when and from which state it expired.
 * @param recipient The buyer (or the lender's fleet manager).
 */
export function loanExpired(data: LoanExpiredData, recipient: Recipient): LoanEmail {
  const ctx = context(data, recipient);
  const { loan } = ctx;
  const at = when(ctx, data.expiredAt);
  const why =
    data.expiredFrom === 'requested'
      ? `${loan.lenderName} did not answer the request in time.`
      : 'The deposit was not secured by the deadline.';
  return finish({
    subject: `Loan ${loan.reference} expired`,
    preheader: why,
    heading: 'A loan expired',
    recipientName: ctx.to.name,
    blocks: [
      {
        kind: 'paragraph',
        text: `Loan ${loan.reference} expired on ${at}. ${why} The dates are released; you can request the units again if they are still free.`,
      },
      overview(ctx, [{ label: 'Expired', value: at }]),
      unitsBlock(loan),
      siteDatesBlock(ctx),
      { kind: 'action', label: 'Open the loan', url: ctx.link },
    ],
    reason: participationReason(loan),
  });
}
