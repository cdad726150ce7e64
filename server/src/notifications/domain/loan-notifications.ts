import type { EntityManager } from 'typeorm';
import type { Config } from '../../config';
import type { Role } from '@evalon/contracts';
import { unitDepositDueBy } from '@evalon/deposits';
import type { LoanEventNotice, LoanNotificationEvent, NotifyLoanEvent } from '../../loans';
import {
  loanApproved,
  loanCancelled,
  loanConfirmed,
  loanDeclined,
  loanExpired,
  loanRequested,
  loanUrl,
  type InviteAttendee,
  type LoanEmail,
  type LoanInviteDetails,
  type Recipient as MessageRecipient,
} from '@evalon/messages';
import {
  sqlLoanNotificationLoader,
  type LoanNotificationData,
  type LoanNotificationLoader,
} from '../data-access/loan-notification-repository';
import type { Recipient } from '../data-access/notification-repository';
import { noticeDay, notifyUsers, recipientsFor } from './in-app';
import { enqueueEmail } from './outbox';
import { messageIdDomain } from './outbox-worker';

export {
  parseReceivingHours,
  sqlLoanNotificationLoader,
  type LoanNotificationData,
  type LoanNotificationLoader,
} from '../data-access/loan-notification-repository';

export {
  loanNotificationEvents,
  type LoanEventNotice,
  type LoanNotificationEvent,
  type NotifyLoanEvent,
} from '../../loans';

/**
 * The deadline rule of @evalon/deposits for one unit, kept under its old name for callers here.
 * The notifier uses it only for a loan approved without a stored deadline (rows written before
 * deadlines were stored at approval); every other loan's e-mail shows the stored `deposit_due_at`.
 */
export { defaultDepositWindowMs, unitDepositDueBy as defaultDepositDueBy } from '@evalon/deposits';

/** Settings of {@link createLoanNotifier}. */
export interface LoanNotifierOptions {
  /** Public base URL of the web app (links in e-mails). */
  publicUrl: string;
  /** Sender of the calendar invite (ORGANIZER), e.g. the From address's mailbox. */
  organizer: { name: string; email: string };
  /** Domain of the invite's UIDs; keep it fixed for a deployment. */
  uidDomain: string;
  /** Where the loan data comes from; the SQL loader over the loans tables by default. */
  loader?: LoanNotificationLoader;
  now?: () => Date;
}

type Side = 'hospital' | 'lender';
interface Audience {
  side: Side;
  roles: readonly Role[];
  /** How the person takes part in the invite (confirmations). */
  inviteRole?: InviteAttendee['role'];
}

/** Who hears about each event (product brief; roles as in the contracts). */
const audiences: Record<LoanNotificationEvent, readonly Audience[]> = {
  requested: [{ side: 'lender', roles: ['fleet_manager'] }],
  approved: [{ side: 'hospital', roles: ['buyer'] }],
  confirmed: [
    { side: 'hospital', roles: ['buyer'], inviteRole: 'required' },
    { side: 'hospital', roles: ['clinician'], inviteRole: 'required' },
    { side: 'lender', roles: ['coordinator'], inviteRole: 'optional' },
  ],
  declined: [
    { side: 'hospital', roles: ['buyer'] },
    { side: 'lender', roles: ['fleet_manager'] },
  ],
  cancelled: [
    { side: 'hospital', roles: ['buyer'] },
    { side: 'lender', roles: ['fleet_manager'] },
  ],
  expired: [
    { side: 'hospital', roles: ['buyer'] },
    { side: 'lender', roles: ['fleet_manager'] },
  ],
};

interface Person extends Recipient {
  side: Side;
  inviteRole?: InviteAttendee['role'];
}

async function gather(
  m: EntityManager,
  data: LoanNotificationData,
  list: readonly Audience[],
): Promise<Person[]> {
  const people = new Map<number, Person>();
  for (const a of list) {
    const found = await recipientsFor(m, {
      organisationId: a.side === 'hospital' ? data.loan.hospitalId : data.loan.lenderId,
      roles: a.roles,
      ...(a.side === 'hospital' ? { siteId: data.loan.siteId } : {}),
    });
    for (const r of found) {
      if (!people.has(r.userId))
        people.set(r.userId, { ...r, side: a.side, inviteRole: a.inviteRole });
    }
  }
  return [...people.values()];
}

/** Words for the in-app notification (the same for everyone: no zone-dependent instants). */
function inApp(
  event: LoanNotificationEvent,
  data: LoanNotificationData,
  notice: LoanEventNotice,
): { title: string; body: string } {
  const l = data.loan;
  switch (event) {
    case 'requested':
      return {
        title: `New loan request ${l.reference}`,
        body: `${l.hospitalName} asks for ${l.units.length} unit(s) at ${l.siteName}, first case day ${noticeDay(l.useFrom)}.`,
      };
    case 'approved':
      return {
        title: `Loan ${l.reference} approved`,
        body: `${l.lenderName} approved the loan. Secure the deposit (or confirm) before the deadline in the e-mail, or the loan expires.`,
      };
    case 'confirmed':
      return {
        title: `Loan ${l.reference} confirmed`,
        body: `Arrives at ${l.siteName} by ${noticeDay(l.milestones.deliverBy)}; first case day ${noticeDay(l.useFrom)} (site calendar days).`,
      };
    case 'declined':
      return {
        title: `Loan request ${l.reference} declined`,
        body: `${l.lenderName} declined: ${notice.reason ?? 'no reason given'}`.slice(0, 2000),
      };
    case 'cancelled':
      return {
        title: `Loan ${l.reference} cancelled`,
        body: `Reason: ${notice.reason ?? 'none given'}. The dates are released.`.slice(0, 2000),
      };
    case 'expired':
      return {
        title: `Loan ${l.reference} expired`,
        body:
          data.expiry?.from === 'approved'
            ? 'The deposit was not secured by the deadline. The dates are released.'
            : `${l.lenderName} did not answer in time. The dates are released.`,
      };
  }
}

/**
 * Builds the entry point the loans component calls inside its transaction, right after a loan
 * changes state: it loads the loan by id, renders the `@evalon/messages` e-mail for each person
 * in their own zone (their profile's, else the campus's for hospital people and the depot's for
 * lender people), enqueues them in the outbox, and writes the in-app notifications; all in the
 * caller's transaction, deduplicated per loan, event and person, so a replay adds nothing.
 *
 * Who hears what:
 * - requested → the lender's fleet managers;
 * - approved → the hospital's buyers, with the deposit link `${publicUrl}/loans/<id>`;
 * - confirmed → buyers, the campus's clinicians and the lender's coordinators, with the `.ics`;
 * - declined, cancelled, expired → buyers and the lender's fleet managers; a cancelled loan that
 *   had been confirmed also goes to everyone the invite went to, with a METHOD:CANCEL invite that
 *   takes the events out of their calendars.
 */
export function createLoanNotifier(options: LoanNotifierOptions): NotifyLoanEvent {
  const loader = options.loader ?? sqlLoanNotificationLoader;
  const clock = options.now ?? (() => new Date());

  return async (m, notice) => {
    const now = clock();
    const data = await loader.load(m, notice.loanId);
    if (!data) throw new Error(`notifyLoanEvent: loan ${notice.loanId} does not exist`);
    const { loan } = data;
    const event = notice.event;
    const publicUrl = options.publicUrl;

    let audience = audiences[event];
    if (event === 'cancelled' && data.invite.sent) audience = [...audience, ...audiences.confirmed];
    const people = await gather(m, data, audience);

    const attendees: InviteAttendee[] = people
      .filter((p) => p.inviteRole)
      .map((p) => ({ name: p.name, email: p.email, role: p.inviteRole }));
    const invite = (sequence: number): LoanInviteDetails => ({
      siteAddress: data.siteAddress,
      organizer: options.organizer,
      attendees,
      sequence,
      ...(data.receivingHours ? { receivingHours: data.receivingHours } : {}),
      uidDomain: options.uidDomain,
      now,
    });
    let cancelledBy: string | undefined;
    if (event === 'cancelled' && notice.actorUserId !== undefined) {
      const [actor]: { name: string }[] = await m.query('SELECT name FROM users WHERE id = ?', [
        notice.actorUserId,
      ]);
      cancelledBy = actor?.name;
    }
    const depositDueBy =
      data.depositDueBy ??
      unitDepositDueBy(data.approvedAt ?? now, loan.milestones.shipBy, data.lenderTimeZone);

    const render = (to: MessageRecipient): LoanEmail => {
      const base = { loan, publicUrl };
      switch (event) {
        case 'requested':
          return loanRequested(base, to);
        case 'approved':
          return loanApproved(
            { ...base, depositDueBy, actionUrl: loanUrl(publicUrl, loan.id) },
            to,
          );
        case 'confirmed':
          return loanConfirmed({ ...base, invite: invite(data.invite.sequence) }, to);
        case 'declined':
          return loanDeclined({ ...base, reason: notice.reason ?? 'No reason was given.' }, to);
        case 'cancelled':
          return loanCancelled(
            {
              ...base,
              reason: notice.reason ?? 'No reason was given.',
              ...(cancelledBy ? { cancelledBy } : {}),
              // A cancel is a significant revision: its SEQUENCE is above the last REQUEST's.
              ...(data.invite.sent ? { invite: invite(data.invite.sequence + 1) } : {}),
            },
            to,
          );
        case 'expired':
          return loanExpired(
            {
              ...base,
              expiredAt: data.expiry?.at ?? now,
              expiredFrom: data.expiry?.from ?? 'requested',
            },
            to,
          );
      }
    };

    for (const p of people) {
      const timeZone =
        p.timeZone ?? (p.side === 'hospital' ? loan.siteTimeZone : data.lenderTimeZone);
      const mail = render({ name: p.name, email: p.email, timeZone });
      await enqueueEmail(
        m,
        {
          to: p.email,
          subject: mail.subject,
          html: mail.html,
          text: mail.text,
          ...(mail.attachments ? { attachments: mail.attachments } : {}),
          headers: { 'X-Evalon-Loan': loan.reference },
          dedupeKey: `loan:${loan.id}:${event}:user:${p.userId}`,
        },
        now,
      );
    }
    const words = inApp(event, data, notice);
    await notifyUsers(
      m,
      people.map((p) => p.userId),
      {
        kind: `loan.${event}`,
        title: words.title,
        body: words.body,
        link: `/loans/${loan.id}`,
        dedupeKey: `loan:${loan.id}:${event}`,
      },
      now,
    );
  };
}

/** The mailbox of a From value such as `Evalon <no-reply@evalon.example>`. */
function mailbox(from: string): string {
  return /<([^<>\s]+@[^<>\s]+)>/.exec(from)?.[1] ?? from.trim();
}

/**
 * The loan notifier for a server configuration: links to the public URL, invites organised by
 * the From mailbox, invite UIDs under the mail domain (stable across restarts).
 */
export function loanNotifierFromConfig(
  config: Pick<Config, 'http' | 'smtp'>,
  overrides: Pick<LoanNotifierOptions, 'loader' | 'now'> = {},
): NotifyLoanEvent {
  return createLoanNotifier({
    publicUrl: config.http.publicUrl,
    organizer: { name: 'Evalon loans', email: mailbox(config.smtp.from) },
    uidDomain: messageIdDomain(config.smtp.from),
    ...overrides,
  });
}
