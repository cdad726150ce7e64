import type { EntityManager } from 'typeorm';
import type { Config } from '../../config';
import {
  credentialExpiring,
  visitAccepted,
  visitCancelled,
  visitOfferAnswered,
  visitOffered,
  visitSignedOff,
  visitUnfilled,
  visitWithdrawn,
  type InviteAttendee,
  type LoanEmail,
  type Recipient as MessageRecipient,
} from '@evalon/messages';
import type { NotifyCredentialExpiring } from '../../proctors';
import type { NotifyVisitEvent, VisitEventNotice } from '../../visits';
import {
  findPeople,
  loadVisitNotification,
  offerDeadline,
  signOffCount,
  type Person,
  type VisitNotificationData,
} from '../data-access/visit-notification-repository';
import { noticeDay, notifyUsers, recipientsFor } from './in-app';
import { enqueueEmail } from './outbox';
import { messageIdDomain } from './outbox-worker';

/** Settings of {@link createVisitNotifier}. */
export interface VisitNotifierOptions {
  publicUrl: string;
  organizer: { name: string; email: string };
  uidDomain: string;
  now?: () => Date;
}

/** Who hears about each event and what the in-app notice says. */
async function audience(
  m: EntityManager,
  data: VisitNotificationData,
  notice: VisitEventNotice,
): Promise<Person[]> {
  const ids = new Set<number>();
  const buyers = async () =>
    (await recipientsFor(m, { organisationId: data.hospitalId, roles: ['buyer'] })).forEach((r) =>
      ids.add(r.userId),
    );
  switch (notice.event) {
    case 'offered':
      if (notice.proctorUserId) ids.add(notice.proctorUserId);
      break;
    case 'declined':
    case 'expired':
      ids.add(data.requestedByUserId);
      break;
    case 'unfilled':
      ids.add(data.requestedByUserId);
      await buyers();
      break;
    case 'accepted':
      ids.add(data.requestedByUserId);
      if (data.proctorUserId) ids.add(data.proctorUserId);
      break;
    case 'cancelled':
      ids.add(data.requestedByUserId);
      if (notice.proctorUserId) ids.add(notice.proctorUserId);
      break;
    case 'withdrawn':
      ids.add(data.requestedByUserId);
      if (notice.proctorUserId) ids.add(notice.proctorUserId);
      break;
    case 'signed_off':
      await buyers();
      if (notice.signOff) ids.add(notice.signOff.traineeUserId);
      if (data.proctorUserId) ids.add(data.proctorUserId);
      break;
  }
  return findPeople(m, [...ids]);
}

function inAppWords(
  data: VisitNotificationData,
  notice: VisitEventNotice,
  proctorName: string,
): { title: string; body: string } {
  const v = data.visit;
  switch (notice.event) {
    case 'offered':
      return {
        title: `Visit ${v.reference} offered to you`,
        body: `${v.hospitalName} asks for proctoring on ${v.modelName}, ${noticeDay(v.from)} to ${noticeDay(v.to)}. Answer before the deadline.`,
      };
    case 'declined':
      return {
        title: `Visit ${v.reference}: ${proctorName} declined`,
        body: `Reason: ${notice.reason ?? 'none given'}. The next proctor on the list is asked.`.slice(
          0,
          2000,
        ),
      };
    case 'expired':
      return {
        title: `Visit ${v.reference}: offer lapsed`,
        body: `${proctorName} did not answer in time. The next proctor on the list is asked.`,
      };
    case 'unfilled':
      return {
        title: `Visit ${v.reference}: no proctor could take it`,
        body: 'Ask other proctors or choose other days.',
      };
    case 'accepted':
      return {
        title: `Visit ${v.reference} accepted`,
        body: `${v.proctorName ?? proctorName} supervises the cases at ${v.siteName}, ${noticeDay(v.from)} to ${noticeDay(v.to)}.`,
      };
    case 'cancelled':
      return {
        title: `Visit ${v.reference} cancelled`,
        body: `Reason: ${notice.reason ?? 'none given'}.`.slice(0, 2000),
      };
    case 'withdrawn':
      return {
        title: `Visit ${v.reference}: ${proctorName} withdrew`,
        body: `Reason: ${notice.reason ?? 'none given'}. The next proctor on the list is asked.`.slice(
          0,
          2000,
        ),
      };
    case 'signed_off':
      return {
        title: `Visit ${v.reference}: trainee signed off`,
        body: 'The one-page record is on the visit. Privileging remains the hospital’s decision.',
      };
  }
}

/**
 * The visits component's notification hook: in the visit's own transaction it renders the
 * `@evalon/messages` visit e-mails for each person in their zone, enqueues them in the outbox
 * (with the RFC 5546 REQUEST on acceptance, the CANCEL on cancelling an accepted visit, and the
 * sign-off PDF), and writes the in-app notices; deduplicated per visit, event and person.
 */
export function createVisitNotifier(options: VisitNotifierOptions): NotifyVisitEvent {
  const clock = options.now ?? (() => new Date());
  return async (m, notice) => {
    const now = clock();
    const data = await loadVisitNotification(m, notice.visitId);
    if (!data) throw new Error(`notifyVisitEvent: visit ${notice.visitId} does not exist`);
    const people = await audience(m, data, notice);
    const base = { visit: data.visit, publicUrl: options.publicUrl };
    const [proctor] = notice.proctorUserId ? await findPeople(m, [notice.proctorUserId]) : [];
    const proctorName = proctor?.name ?? 'The proctor';
    const attendees: InviteAttendee[] = people.map((p) => ({ name: p.name, email: p.email }));
    const invite = (sequence: number, only?: InviteAttendee[]) => ({
      organizer: options.organizer,
      attendees: only ?? attendees,
      sequence,
      uidDomain: options.uidDomain,
      now,
    });
    const deadline =
      notice.event === 'offered' && notice.proctorUserId
        ? await offerDeadline(m, notice.visitId, notice.proctorUserId)
        : null;
    const cases =
      notice.event === 'signed_off' && notice.signOff
        ? await signOffCount(m, notice.visitId, notice.signOff.traineeUserId)
        : 0;
    const [trainee] = notice.signOff ? await findPeople(m, [notice.signOff.traineeUserId]) : [];

    const render = (to: MessageRecipient): LoanEmail => {
      switch (notice.event) {
        case 'offered':
          return visitOffered({ ...base, deadline: deadline ?? now }, to);
        case 'declined':
        case 'expired':
          return visitOfferAnswered(
            { ...base, proctorName, outcome: notice.event, reason: notice.reason ?? null },
            to,
          );
        case 'unfilled':
          return visitUnfilled(base, to);
        case 'accepted':
          return visitAccepted({ ...base, invite: invite(notice.inviteSequence ?? 0) }, to);
        case 'cancelled':
          return visitCancelled(
            {
              ...base,
              reason: notice.reason ?? 'No reason was given.',
              // The CANCEL is a significant revision: SEQUENCE above the REQUEST's 0.
              ...(notice.wasAccepted ? { invite: invite(notice.inviteSequence ?? 1) } : {}),
            },
            to,
          );
        case 'withdrawn':
          return visitWithdrawn(
            {
              ...base,
              proctorName,
              reason: notice.reason ?? 'No reason was given.',
              audience: to.email === proctor?.email ? 'proctor' : 'hospital',
              // RFC 5546 §3.2.5: the CANCEL names only the attendee who leaves the event.
              ...(proctor
                ? {
                    invite: invite(notice.inviteSequence ?? 1, [
                      { name: proctor.name, email: proctor.email },
                    ]),
                  }
                : {}),
            },
            to,
          );
        case 'signed_off':
          return visitSignedOff(
            { ...base, traineeName: trainee?.name ?? 'the trainee', proctoredCases: cases },
            to,
          );
      }
    };
    // The same event may happen to a visit more than once (two declines by different proctors).
    const occurrence =
      notice.event === 'declined' ||
      notice.event === 'expired' ||
      notice.event === 'offered' ||
      notice.event === 'withdrawn' ||
      notice.event === 'accepted'
        ? `:${notice.proctorUserId ?? 0}`
        : notice.event === 'signed_off'
          ? `:${notice.signOff?.traineeUserId ?? 0}`
          : '';
    for (const p of people) {
      const mail = render({
        name: p.name,
        email: p.email,
        timeZone: p.timeZone ?? data.visit.siteTimeZone,
      });
      const attachments: { filename: string; contentType: string; content: string | Buffer }[] = [
        ...(mail.attachments ?? []),
      ];
      if (notice.signOff) {
        attachments.push({
          filename: notice.signOff.fileName,
          contentType: 'application/pdf',
          content: notice.signOff.pdf,
        });
      }
      await enqueueEmail(
        m,
        {
          to: p.email,
          subject: mail.subject,
          html: mail.html,
          text: mail.text,
          ...(attachments.length ? { attachments } : {}),
          headers: { 'X-Evalon-Visit': data.visit.reference },
          dedupeKey: `visit:${data.visit.id}:${notice.event}${occurrence}:user:${p.userId}`,
        },
        now,
      );
    }
    const words = inAppWords(data, notice, proctorName);
    await notifyUsers(
      m,
      people.map((p) => p.userId),
      {
        kind: `visit.${notice.event}`,
        title: words.title,
        body: words.body,
        link: `/visits/${data.visit.id}`,
        dedupeKey: `visit:${data.visit.id}:${notice.event}${occurrence}`,
      },
      now,
    );
  };
}

/** The From mailbox of a config value such as `Evalon <no-reply@evalon.example>`. */
function mailbox(from: string): string {
  return /<([^<>\s]+@[^<>\s]+)>/.exec(from)?.[1] ?? from.trim();
}

/** The visit notifier for a server configuration. */
export function visitNotifierFromConfig(
  config: Pick<Config, 'http' | 'smtp'>,
  overrides: Pick<VisitNotifierOptions, 'now'> = {},
): NotifyVisitEvent {
  return createVisitNotifier({
    publicUrl: config.http.publicUrl,
    organizer: { name: 'Evalon visits', email: mailbox(config.smtp.from) },
    uidDomain: messageIdDomain(config.smtp.from),
    ...overrides,
  });
}

/**
 * The proctors component's credential warning hook: an e-mail (in the proctor's zone) and an
 * in-app notice, once per credential, 60 days before it ends.
 */
export function credentialNotifierFromConfig(
  config: Pick<Config, 'http'>,
  overrides: { now?: () => Date } = {},
): NotifyCredentialExpiring {
  const clock = overrides.now ?? (() => new Date());
  return async (m, c) => {
    const now = clock();
    const [person] = await findPeople(m, [c.proctorUserId]);
    if (!person) return;
    const mail = credentialExpiring(
      {
        title: c.title,
        jurisdiction: c.jurisdiction,
        validTo: c.validTo,
        publicUrl: config.http.publicUrl,
      },
      { name: person.name, email: person.email, timeZone: person.timeZone ?? 'UTC' },
    );
    await enqueueEmail(
      m,
      {
        to: person.email,
        subject: mail.subject,
        html: mail.html,
        text: mail.text,
        dedupeKey: `credential:${c.id}:expiring:user:${person.userId}`,
      },
      now,
    );
    await notifyUsers(
      m,
      [person.userId],
      {
        kind: 'credential.expiring',
        title: `${c.title} ends on ${noticeDay(c.validTo)}`,
        body: `Visits in ${c.jurisdiction} after that day are not offered to you. Upload the renewed credential.`,
        link: '/proctor/credentials',
        dedupeKey: `credential:${c.id}:expiring`,
      },
      now,
    );
  };
}
