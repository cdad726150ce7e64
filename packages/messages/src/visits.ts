import ical, {
  ICalAttendeeRole,
  ICalAttendeeStatus,
  ICalCalendarMethod,
  ICalEventStatus,
  ICalEventTransparency,
} from 'ical-generator';
import { formatMoney } from '@evalon/deposits';

import { assertHttpUrl, oneLine } from './escape';
import {
  assertEmail,
  formatCalendarDate,
  formatInstant,
  type Instant,
  normaliseRecipient,
  type Recipient,
  toCalendarDate,
  toInstant,
} from './format';
import type { InviteAttendee, InviteMethod, InvitePerson } from './ics';
import { EVALON_PRODID } from './ics';
import { type Block, render } from './layout';
import type { EmailAttachment, LoanEmail } from './templates';

/** The facts of a visit that its messages show. Dates are the campus's calendar days. */
export interface VisitSummary {
  id: number;
  reference: string;
  hospitalName: string;
  siteName: string;
  /** Street address of the campus (invite LOCATION). */
  siteAddress: string;
  siteTimeZone: string;
  modelName: string;
  /** First and last visit (case) day. */
  from: string;
  to: string;
  cases: number;
  /** Who supervises (when accepted). */
  proctorName?: string | null;
  /** First and last day including travel days (when accepted). */
  busyFrom?: string | null;
  busyTo?: string | null;
  travelDays?: number | null;
  fee?: { amount: number; currency: string } | null;
  note?: string | null;
}

/** The cautions of a proctoring visit (product brief). */
export const VISIT_CAUTIONS = [
  'Evalon schedules and documents; it does not certify anyone. Credentialing and privileges are granted by the hospital under its own rules.',
  'Case records are de-identified: leave out patient names, record numbers and dates of birth.',
  'Fees are estimates until the proctor and the hospital agree them.',
] as const;

/** The visit's page in the web app. */
export function visitUrl(publicUrl: string, visitId: number): string {
  const base = assertHttpUrl(publicUrl, 'publicUrl').replace(/\/+$/, '');
  return `${base}/visits/${encodeURIComponent(String(visitId))}`;
}

/** Stable UID of the visit's calendar event (every REQUEST and CANCEL updates the same one). */
export function visitEventUid(visitId: number, domain: string): string {
  if (!Number.isSafeInteger(visitId) || visitId <= 0) {
    throw new RangeError(`visit id must be a positive integer, got ${String(visitId)}`);
  }
  if (!/^[A-Za-z0-9.-]+$/.test(domain)) throw new RangeError(`Not a domain: ${domain}`);
  return `visit-${visitId}@${domain}`;
}

/** Input of {@link buildVisitInvite}. */
export interface VisitInviteInput {
  visit: VisitSummary;
  organizer: InvitePerson;
  attendees: InviteAttendee[];
  /** SEQUENCE (RFC 5545 §3.8.7.4): 0 first, one more for a cancellation. */
  sequence: number;
  method: InviteMethod;
  publicUrl: string;
  uidDomain?: string;
  now?: Instant;
}

/**
 * The visit's calendar invite: one all-day event (RFC 5545) in an iTIP REQUEST or CANCEL
 * (RFC 5546 §3.2.2 / §3.2.5) from the first to the last day the proctor is away, travel days
 * included; DTEND is the day after (exclusive for DATE values, RFC 5545 §3.6.1). OPAQUE: the
 * proctor is busy on those days.
 */
export function buildVisitInvite(input: VisitInviteInput): string {
  const v = input.visit;
  if (input.attendees.length === 0) throw new RangeError('An invite needs at least one attendee');
  if (!Number.isSafeInteger(input.sequence) || input.sequence < 0) {
    throw new RangeError(`sequence must be a non-negative integer, got ${input.sequence}`);
  }
  assertEmail(input.organizer.email, 'organizer.email');
  input.attendees.forEach((a, i) => assertEmail(a.email, `attendees[${i}].email`));
  const publicUrl = assertHttpUrl(input.publicUrl, 'publicUrl');
  const link = visitUrl(publicUrl, v.id);
  const cancelling = input.method === 'CANCEL';
  const first = v.busyFrom ?? v.from;
  const last = v.busyTo ?? v.to;
  const calendar = ical({
    prodId: EVALON_PRODID,
    method: cancelling ? ICalCalendarMethod.CANCEL : ICalCalendarMethod.REQUEST,
  });
  const travel = v.travelDays ? ` (with ${v.travelDays} travel days)` : '';
  calendar.createEvent({
    id: visitEventUid(v.id, input.uidDomain ?? new URL(publicUrl).hostname),
    sequence: input.sequence,
    stamp: toInstant(input.now ?? new Date()).toJSDate(),
    summary: oneLine(`Proctoring visit ${v.reference}: ${v.modelName} at ${v.siteName}${travel}`),
    description: [
      `Evalon proctoring visit ${v.reference} at ${v.hospitalName}, ${v.siteName}.`,
      `Case days: ${v.from} to ${v.to} (${v.siteTimeZone}); ${v.cases} case(s) planned.`,
      ...(v.proctorName ? [`Proctor: ${v.proctorName}`] : []),
      `Details: ${link}`,
      '',
      ...VISIT_CAUTIONS,
    ].join('\n'),
    location: { title: v.siteName, address: v.siteAddress },
    url: link,
    organizer: { name: input.organizer.name, email: input.organizer.email },
    attendees: input.attendees.map((a) => ({
      name: a.name,
      email: a.email,
      role: a.role === 'optional' ? ICalAttendeeRole.OPT : ICalAttendeeRole.REQ,
      status: ICalAttendeeStatus.NEEDSACTION,
      rsvp: !cancelling,
    })),
    status: cancelling ? ICalEventStatus.CANCELLED : ICalEventStatus.CONFIRMED,
    transparency: ICalEventTransparency.OPAQUE,
    allDay: true,
    start: toCalendarDate(first),
    end: toCalendarDate(last).plus({ days: 1 }),
  });
  return calendar.toString();
}

/** Data every visit message is built from. */
export interface VisitMessageData {
  visit: VisitSummary;
  publicUrl: string;
}

function facts(data: VisitMessageData, locale: string): Block {
  const v = data.visit;
  const rows = [
    { label: 'Reference', value: v.reference },
    { label: 'Hospital', value: `${v.hospitalName}, ${v.siteName}` },
    { label: 'Platform model', value: v.modelName },
    { label: 'First case day', value: formatCalendarDate(v.from, locale) },
    { label: 'Last case day', value: formatCalendarDate(v.to, locale) },
    { label: 'Cases planned', value: String(v.cases) },
  ];
  if (v.proctorName) rows.push({ label: 'Proctor', value: v.proctorName });
  if (v.travelDays)
    rows.push({ label: 'Travel days', value: `${v.travelDays} (one before, one after)` });
  if (v.fee)
    rows.push({ label: 'Fee estimate', value: formatMoney(v.fee.amount, v.fee.currency, locale) });
  return {
    kind: 'facts',
    title: 'Visit',
    rows,
    note: `Calendar days at ${v.siteName}, time zone ${v.siteTimeZone}.`,
  };
}

function finish(
  subject: string,
  heading: string,
  to: Required<Recipient>,
  blocks: Block[],
  data: VisitMessageData,
  attachments?: EmailAttachment[],
): LoanEmail {
  const rendered = render({
    subject,
    preheader: `${data.visit.reference}: ${data.visit.modelName} at ${data.visit.siteName}`,
    heading,
    recipientName: to.name,
    blocks: [
      ...blocks,
      { kind: 'list', title: 'Please note', items: [...VISIT_CAUTIONS] },
      { kind: 'action', label: 'Open the visit', url: visitUrl(data.publicUrl, data.visit.id) },
    ],
    reason: `You receive this e-mail because you take part in Evalon visit ${data.visit.reference}.`,
  });
  return attachments?.length ? { ...rendered, attachments } : rendered;
}

function inviteAttachment(
  data: VisitMessageData,
  invite: Omit<VisitInviteInput, 'visit' | 'publicUrl' | 'method'>,
  method: InviteMethod,
): EmailAttachment {
  return {
    filename: `evalon-visit-${data.visit.reference.replace(/[^A-Za-z0-9_-]+/g, '-')}.ics`,
    // RFC 6047 §2.4: the MIME method parameter equals the METHOD inside.
    contentType: `text/calendar; charset=utf-8; method=${method}`,
    content: buildVisitInvite({ ...invite, visit: data.visit, publicUrl: data.publicUrl, method }),
  };
}

/** "A visit is offered to you", to the proctor: the visit and the deadline in their zone. */
export function visitOffered(
  data: VisitMessageData & { deadline: Instant },
  recipient: Recipient,
): LoanEmail {
  const to = normaliseRecipient(recipient);
  const deadline = formatInstant(data.deadline, to.timeZone, to.locale);
  return finish(
    `Proctoring visit ${data.visit.reference} offered to you: answer by ${formatInstant(data.deadline, to.timeZone, to.locale, 'short')}`,
    'A proctoring visit is offered to you',
    to,
    [
      {
        kind: 'paragraph',
        text: `${data.visit.hospitalName} asks you to supervise first cases on ${data.visit.modelName}. Accept or decline by ${deadline}; after that the visit is offered to the next proctor.`,
      },
      facts(data, to.locale),
      ...(data.visit.note
        ? [{ kind: 'quote' as const, title: 'Note from the hospital', text: data.visit.note }]
        : []),
    ],
    data,
  );
}

/** "The proctor declined" (or let the offer lapse), to the requester; who is asked next. */
export function visitOfferAnswered(
  data: VisitMessageData & {
    proctorName: string;
    outcome: 'declined' | 'expired';
    reason?: string | null;
  },
  recipient: Recipient,
): LoanEmail {
  const to = normaliseRecipient(recipient);
  const what =
    data.outcome === 'declined'
      ? `${data.proctorName} declined the visit.`
      : `${data.proctorName} did not answer before the deadline.`;
  return finish(
    `Visit ${data.visit.reference}: ${data.outcome === 'declined' ? 'proctor declined' : 'offer lapsed'}`,
    data.outcome === 'declined' ? 'A proctor declined' : 'An offer lapsed',
    to,
    [
      {
        kind: 'paragraph',
        text: `${what} Evalon offers the visit to the next proctor on your list, if any; you will hear when someone accepts.`,
      },
      ...(data.reason
        ? [{ kind: 'quote' as const, title: 'Reason given', text: data.reason }]
        : []),
      facts(data, to.locale),
    ],
    data,
  );
}

/** "Nobody is left", to the requester: widen the search. */
export function visitUnfilled(data: VisitMessageData, recipient: Recipient): LoanEmail {
  const to = normaliseRecipient(recipient);
  return finish(
    `Visit ${data.visit.reference}: no proctor could take it`,
    'No proctor could take the visit',
    to,
    [
      {
        kind: 'paragraph',
        text: 'Every proctor on the list declined, let the offer lapse or no longer fits. Open the visit to ask other proctors, or cancel it and ask for other days.',
      },
      facts(data, to.locale),
    ],
    data,
  );
}

/** "Visit accepted", to the proctor and the requester, with the calendar REQUEST. */
export function visitAccepted(
  data: VisitMessageData & { invite: Omit<VisitInviteInput, 'visit' | 'publicUrl' | 'method'> },
  recipient: Recipient,
): LoanEmail {
  const to = normaliseRecipient(recipient);
  const attachment = inviteAttachment(data, data.invite, 'REQUEST');
  return finish(
    `Visit ${data.visit.reference} accepted by ${data.visit.proctorName ?? 'the proctor'}`,
    'The proctoring visit is accepted',
    to,
    [
      {
        kind: 'paragraph',
        text: `${data.visit.proctorName ?? 'The proctor'} will supervise the first cases at ${data.visit.siteName}. The attached invite (${attachment.filename}) adds the visit${data.visit.travelDays ? ' and its travel days' : ''} to your calendar.`,
      },
      facts(data, to.locale),
    ],
    data,
    [attachment],
  );
}

/** "Visit cancelled", with a calendar CANCEL when an invite had gone out. */
export function visitCancelled(
  data: VisitMessageData & {
    reason: string;
    invite?: Omit<VisitInviteInput, 'visit' | 'publicUrl' | 'method'>;
  },
  recipient: Recipient,
): LoanEmail {
  const to = normaliseRecipient(recipient);
  return finish(
    `Visit ${data.visit.reference} cancelled`,
    'The proctoring visit is cancelled',
    to,
    [
      {
        kind: 'paragraph',
        text: `${data.visit.hospitalName} cancelled the visit. The days are free again.`,
      },
      { kind: 'quote', title: 'Reason', text: data.reason },
      facts(data, to.locale),
    ],
    data,
    data.invite ? [inviteAttachment(data, data.invite, 'CANCEL')] : undefined,
  );
}

/**
 * "The proctor withdrew" from an accepted visit before its first day. To the proctor it carries
 * the calendar CANCEL (RFC 5546 §3.2.5: the organizer cancels the event for the attendee who
 * leaves); to the requester it says who is asked next.
 */
export function visitWithdrawn(
  data: VisitMessageData & {
    proctorName: string;
    reason: string;
    audience: 'proctor' | 'hospital';
    invite?: Omit<VisitInviteInput, 'visit' | 'publicUrl' | 'method'>;
  },
  recipient: Recipient,
): LoanEmail {
  const to = normaliseRecipient(recipient);
  const forProctor = data.audience === 'proctor';
  return finish(
    forProctor
      ? `Visit ${data.visit.reference}: you withdrew`
      : `Visit ${data.visit.reference}: ${data.proctorName} withdrew`,
    forProctor ? 'You withdrew from the visit' : 'The proctor withdrew from the visit',
    to,
    [
      {
        kind: 'paragraph',
        text: forProctor
          ? `You are no longer the proctor of this visit; the attached cancellation removes it${data.visit.travelDays ? ' and its travel days' : ''} from your calendar.`
          : `${data.proctorName} can no longer come. Evalon offers the visit to the next proctor on your list, if any; you will hear when someone accepts.`,
      },
      { kind: 'quote', title: 'Reason given', text: data.reason },
      facts(data, to.locale),
    ],
    data,
    forProctor && data.invite ? [inviteAttachment(data, data.invite, 'CANCEL')] : undefined,
  );
}

/** "Trainee signed off", to the hospital's buyers and the trainee (the PDF is attached by the caller). */
export function visitSignedOff(
  data: VisitMessageData & { traineeName: string; proctoredCases: number },
  recipient: Recipient,
): LoanEmail {
  const to = normaliseRecipient(recipient);
  return finish(
    `Visit ${data.visit.reference}: ${data.traineeName} signed off`,
    'Proctored cases signed off',
    to,
    [
      {
        kind: 'paragraph',
        text: `${data.visit.proctorName ?? 'The proctor'} signed off ${data.traineeName} after ${data.proctoredCases} cases performed under supervision. The one-page record is attached. Privileging remains the hospital’s decision under its own rules.`,
      },
      facts(data, to.locale),
    ],
    data,
  );
}

/** "Your credential ends soon", to the proctor, 60 days ahead. */
export function credentialExpiring(
  data: { title: string; jurisdiction: string; validTo: string; publicUrl: string },
  recipient: Recipient,
): LoanEmail {
  const to = normaliseRecipient(recipient);
  const base = assertHttpUrl(data.publicUrl, 'publicUrl').replace(/\/+$/, '');
  return {
    ...render({
      subject: `Your credential ${data.title} (${data.jurisdiction}) ends on ${data.validTo}`,
      preheader: 'Upload the renewed credential so hospitals keep finding you.',
      heading: 'A credential ends soon',
      recipientName: to.name,
      blocks: [
        {
          kind: 'paragraph',
          text: `${data.title} for ${data.jurisdiction} is valid until ${formatCalendarDate(data.validTo, to.locale)}. From the day after, visits in ${data.jurisdiction} are not offered to you. Upload the renewed credential on your profile.`,
        },
        { kind: 'action', label: 'Open your credentials', url: `${base}/proctor/credentials` },
      ],
      reason: 'You receive this e-mail because you keep a proctor profile on Evalon.',
    }),
  };
}
