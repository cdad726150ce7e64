import { loan as loanSchema, type Loan, type Milestones } from '@evalon/contracts';
import ical, {
  ICalAttendeeRole,
  ICalAttendeeStatus,
  ICalCalendarMethod,
  ICalEventStatus,
  ICalEventTransparency,
} from 'ical-generator';
import { DateTime } from 'luxon';

import { assertHttpUrl, oneLine } from './escape';
import { assertEmail, assertTimeZone, type Instant, toCalendarDate, toInstant } from './format';
import { CAUTIONS_SHORT, loanUrl, MILESTONE_LABELS, unitLine } from './wording';
import { buildVTimezone } from './vtimezone';

/** A person in an invite: the organizer or an attendee. */
export interface InvitePerson {
  /** Display name (the CN parameter). */
  name: string;
  /** E-mail address (the `mailto:` value). */
  email: string;
}

/**
 * How an attendee takes part (RFC 5545 §3.2.16 ROLE): `required` → REQ-PARTICIPANT,
 * `optional` → OPT-PARTICIPANT, `informational` → NON-PARTICIPANT (copied for information).
 */
export type InviteRole = 'required' | 'optional' | 'informational';

/** An attendee of the loan's calendar events. */
export interface InviteAttendee extends InvitePerson {
  /** How the attendee takes part; `required` when omitted. */
  role?: InviteRole;
}

/** The hospital's receiving hours on the arrival day, wall-clock `HH:mm` in the site's zone. */
export interface ReceivingHours {
  /** Opening time, `HH:mm`. */
  from: string;
  /** Closing time, `HH:mm`, after `from`. */
  to: string;
}

/** iTIP method of the invite (RFC 5546 §1.4): a new or changed invite, or a cancellation. */
export type InviteMethod = 'REQUEST' | 'CANCEL';

/** Input of {@link buildLoanInvite}. */
export interface LoanInviteInput {
  /** The loan (validated with the `loan` contract). */
  loan: Loan;
  /** Street address of the hospital site, for LOCATION (lines may be separated by `\n`). */
  siteAddress: string;
  /** Who sends the invite and receives replies (ORGANIZER). */
  organizer: InvitePerson;
  /** Who is invited (ATTENDEE); at least one, as RFC 5546 §3.2.2 requires for REQUEST. */
  attendees: InviteAttendee[];
  /**
   * SEQUENCE of this revision (RFC 5545 §3.8.7.4): 0 for the first invite, raised with
   * {@link nextSequence} when the dates change, and raised once more for a cancellation (a
   * STATUS change is a significant revision too).
   */
  sequence: number;
  /** `REQUEST` for a new or changed invite, `CANCEL` to withdraw it. */
  method: InviteMethod;
  /** Public base URL of the Evalon web app, e.g. `https://evalon.example`. */
  publicUrl: string;
  /**
   * Receiving hours of the site on the arrival day. When given, the arrival event is timed
   * (TZID of the site, with a VTIMEZONE); when omitted it is an all-day event.
   */
  receivingHours?: ReceivingHours;
  /**
   * Domain part of the UIDs; the host of `publicUrl` when omitted. Keep it fixed for a
   * deployment: changing it changes every UID, and calendars would then keep the old events.
   */
  uidDomain?: string;
  /** Creation time of this iTIP message (DTSTAMP); the current time when omitted. */
  now?: Instant;
}

/** PRODID of every calendar Evalon writes (RFC 5545 §3.7.3: text naming the product). */
export const EVALON_PRODID = { company: 'Evalon', product: 'Evalon loan calendar', language: 'EN' };

/** Milestones that the invite shows; a change to any of them changes what calendars display. */
export const INVITE_MILESTONES = ['deliverBy', 'useFrom', 'useTo', 'returnShipBy'] as const;

const HH_MM = /^([01]\d|2[0-3]):([0-5]\d)$/;
const ROLES: Record<InviteRole, ICalAttendeeRole> = {
  required: ICalAttendeeRole.REQ,
  optional: ICalAttendeeRole.OPT,
  informational: ICalAttendeeRole.NON,
};

/**
 * Stable UIDs of the loan's two events. They depend only on the loan id and the domain, so every
 * later REQUEST or CANCEL for the same loan updates the same calendar entries (RFC 5545 §3.8.4.7:
 * the UID identifies the event across revisions; RFC 5546 §2.1.5 pairs it with SEQUENCE).
 *
 * @param loanId The loan's id.
 * @param domain Domain part, e.g. `evalon.example`.
 */
export function loanEventUids(loanId: number, domain: string): { delivery: string; use: string } {
  if (!Number.isSafeInteger(loanId) || loanId <= 0) {
    throw new RangeError(`loan id must be a positive integer, got ${String(loanId)}`);
  }
  if (!/^[A-Za-z0-9.-]+$/.test(domain)) throw new RangeError(`Not a domain: ${domain}`);
  return {
    delivery: `loan-${loanId}-delivery@${domain}`,
    use: `loan-${loanId}-use@${domain}`,
  };
}

/**
 * The SEQUENCE for a loan's next invite: one more than before when a date the invite shows
 * (arrives by, first and last case day, ships back by) has changed, otherwise unchanged.
 *
 * RFC 5545 §3.8.7.4 makes an increment mandatory when DTSTART or DTEND change (here: arrives by,
 * first and last case day) and allows it for other significant changes; "ships back by" is in the
 * description and decides when the hospital must let go of the unit, so it counts too. Depot-only
 * dates (ship by, back at depot, ready again) do not appear in the invite and leave it unchanged.
 *
 * @param previous Milestones the last invite was built from.
 * @param next Milestones of the new invite.
 * @param previousSequence SEQUENCE of the last invite (a non-negative integer).
 * @returns The SEQUENCE to send now.
 */
export function nextSequence(
  previous: Milestones,
  next: Milestones,
  previousSequence: number,
): number {
  assertSequence(previousSequence);
  const changed = INVITE_MILESTONES.some((key) => previous[key] !== next[key]);
  return changed ? previousSequence + 1 : previousSequence;
}

function assertSequence(sequence: number): void {
  if (!Number.isSafeInteger(sequence) || sequence < 0) {
    throw new RangeError(`sequence must be a non-negative integer, got ${String(sequence)}`);
  }
}

function dayAfter(date: string): DateTime {
  return toCalendarDate(date).plus({ days: 1 });
}

/** Description text shared by both events (plain text; ical-generator escapes it). */
function describe(loan: Loan, link: string, receivingHours: ReceivingHours | undefined): string {
  const m = loan.milestones;
  return [
    `Evalon loan ${loan.reference} from ${loan.lenderName} to ${loan.hospitalName}, ${loan.siteName}.`,
    '',
    'Units:',
    ...loan.units.map((unit) => `- ${unitLine(unit)}`),
    '',
    `Calendar dates at ${loan.siteName} (${loan.siteTimeZone}):`,
    ...INVITE_MILESTONES.map((key) => `- ${MILESTONE_LABELS[key]}: ${m[key]}`),
    ...(receivingHours
      ? [`- Receiving hours on the arrival day: ${receivingHours.from}–${receivingHours.to}`]
      : []),
    '',
    `Details: ${link}`,
    '',
    CAUTIONS_SHORT,
  ].join('\n');
}

/**
 * Builds the calendar invite attached to loan e-mails: an iCalendar object (RFC 5545) carrying an
 * iTIP message (RFC 5546) with two events that share the loan's ORGANIZER and ATTENDEEs:
 *
 * 1. **Arrival** (`loan-<id>-delivery@<domain>`): the "arrives by" day at the hospital site. An
 *    all-day event by default; with receiving hours, a timed event in the site's zone (TZID plus
 *    a generated VTIMEZONE, RFC 5545 §3.2.19).
 * 2. **Evaluation cases** (`loan-<id>-use@<domain>`): all-day from the first to the last case
 *    day. All-day DTEND is exclusive (RFC 5545 §3.6.1), so DTEND is the day after the last case.
 *
 * All-day values are DATEs with no zone: they are the site's calendar days and stay on those days
 * for every reader, which is what a date like "first case day" means. Both events are TRANSPARENT
 * (they do not block the reader's own time: they describe the equipment, not a meeting).
 * SEQUENCE is always written (the library always writes it; SEQUENCE:0 is the RFC 5545 default,
 * so writing it is harmless, and RFC 5546 §3.2.2 needs it whenever it is above 0).
 *
 * @param input See {@link LoanInviteInput}.
 * @returns The `.ics` text (CRLF line ends, folded at 75 octets).
 * @throws ZodError for a malformed loan; RangeError/TypeError for other bad input.
 */
export function buildLoanInvite(input: LoanInviteInput): string {
  const loan = loanSchema.parse(input.loan);
  assertSequence(input.sequence);
  if (input.method !== 'REQUEST' && input.method !== 'CANCEL') {
    throw new RangeError(`method must be REQUEST or CANCEL, got ${String(input.method)}`);
  }
  if (input.attendees.length === 0) {
    // RFC 5546 §3.2.2 (REQUEST) and §3.2.5 (CANCEL of a whole event) need at least one ATTENDEE.
    throw new RangeError('An invite needs at least one attendee');
  }
  assertEmail(input.organizer.email, 'organizer.email');
  input.attendees.forEach((a, i) => assertEmail(a.email, `attendees[${i}].email`));
  const siteZone = assertTimeZone(loan.siteTimeZone, 'loan.siteTimeZone');
  const publicUrl = assertHttpUrl(input.publicUrl, 'publicUrl');
  const link = loanUrl(publicUrl, loan.id);
  const uids = loanEventUids(loan.id, input.uidDomain ?? new URL(publicUrl).hostname);
  const stamp = toInstant(input.now ?? new Date()).toJSDate();
  const cancelling = input.method === 'CANCEL';
  const m = loan.milestones;

  const calendar = ical({
    prodId: EVALON_PRODID,
    method: cancelling ? ICalCalendarMethod.CANCEL : ICalCalendarMethod.REQUEST,
    // No calendar NAME: some clients offer to create a new calendar for a named one on import.
  });

  const common = {
    sequence: input.sequence,
    stamp,
    description: describe(loan, link, input.receivingHours),
    location: { title: loan.siteName, address: input.siteAddress },
    url: link,
    organizer: { name: input.organizer.name, email: input.organizer.email },
    attendees: input.attendees.map((a) => {
      const role = ROLES[a.role ?? 'required'];
      return {
        name: a.name,
        email: a.email,
        role,
        status: ICalAttendeeStatus.NEEDSACTION,
        // A reply is asked only of required attendees of a live invite; nobody answers a cancel.
        rsvp: !cancelling && role === ICalAttendeeRole.REQ,
      };
    }),
    status: cancelling ? ICalEventStatus.CANCELLED : ICalEventStatus.CONFIRMED,
    transparency: ICalEventTransparency.TRANSPARENT,
  };
  const units = [...new Set(loan.units.map((u) => u.modelName))].join(', ');

  const hours = input.receivingHours;
  if (hours) {
    const from = HH_MM.exec(hours.from);
    const to = HH_MM.exec(hours.to);
    if (!from || !to || hours.to <= hours.from) {
      throw new RangeError(
        `Receiving hours must be HH:mm to a later HH:mm, got ${hours.from}–${hours.to}`,
      );
    }
    // Wall-clock times on the arrival day in the site's zone; luxon moves a time that falls into
    // a spring-forward gap forward by the gap, so the window never starts at a missing time.
    const start = DateTime.fromISO(`${m.deliverBy}T${hours.from}`, { zone: siteZone });
    const end = DateTime.fromISO(`${m.deliverBy}T${hours.to}`, { zone: siteZone });
    // The VTIMEZONE covers a day either side of the arrival day: enough for every local time used.
    const windowStart = start.minus({ days: 1 }).startOf('day').toJSDate();
    const windowEnd = end.plus({ days: 1 }).endOf('day').toJSDate();
    calendar.timezone({
      name: null,
      generator: (zone) => buildVTimezone(zone, windowStart, windowEnd),
    });
    calendar.createEvent({
      ...common,
      id: uids.delivery,
      summary: oneLine(`Loan ${loan.reference}: ${units} arrives at ${loan.siteName}`),
      start,
      end,
      timezone: siteZone,
    });
  } else {
    calendar.createEvent({
      ...common,
      id: uids.delivery,
      summary: oneLine(`Loan ${loan.reference}: ${units} arrives by this day at ${loan.siteName}`),
      allDay: true,
      start: toCalendarDate(m.deliverBy),
      end: dayAfter(m.deliverBy),
    });
  }

  calendar.createEvent({
    ...common,
    id: uids.use,
    summary: oneLine(`Loan ${loan.reference}: evaluation cases with ${units}`),
    allDay: true,
    start: toCalendarDate(m.useFrom),
    // RFC 5545 §3.6.1: for a DATE DTSTART, DTEND is exclusive, so the day after the last case.
    end: dayAfter(m.useTo),
  });

  return calendar.toString();
}
