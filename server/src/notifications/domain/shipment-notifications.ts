import type { EntityManager } from 'typeorm';
import {
  depositStatement,
  shipmentAlert,
  type DepositStatementData,
  type ShipmentAlertKind,
} from '@evalon/messages';
import type { Config } from '../../config';
import { noticeDay, notifyUsers, recipientsFor, type Recipient } from './in-app';
import { enqueueEmail } from './outbox';

/** What the shipments component says happened. */
export type ShipmentNotice =
  | { event: 'alert'; kind: ShipmentAlertKind; shipmentId: number }
  | {
      event: 'statement';
      loanId: number;
      statement: Omit<
        DepositStatementData,
        'url' | 'loanReference' | 'lenderName' | 'hospitalName'
      >;
    };

/** Called inside the shipments transaction; writes e-mails to the outbox and in-app notices. */
export type NotifyShipmentEvent = (m: EntityManager, notice: ShipmentNotice) => Promise<void>;

interface LegFacts {
  shipment_id: number;
  reference: string;
  direction: 'outbound' | 'return';
  due_by: string;
  eta: string | null;
  tracking_number: string | null;
  loan_id: number;
  loan_reference: string;
  lender_id: number;
  hospital_id: number;
  site_id: number;
  site_name: string;
  site_zone: string;
  depot_name: string;
  depot_zone: string;
  hospital_name: string;
  lender_name: string;
}

const alertTitles: Record<ShipmentAlertKind, string> = {
  at_risk: 'Shipment at risk',
  overdue: 'Shipment overdue',
  return_reminder: 'Return due soon',
  return_late: 'Return late',
  return_at_risk: 'Return at risk',
  return_overdue: 'Return overdue at the depot',
};

/** What a leg's deadline is, for the in-app notice: whose calendar day and for what. */
function deadlineWords(direction: string, kind: ShipmentAlertKind, isoDay: string): string {
  const day = noticeDay(isoDay);
  if (direction === 'outbound') return `deliver by ${day} (campus calendar)`;
  return kind === 'return_at_risk' || kind === 'return_overdue'
    ? `back at the depot by ${day} (depot calendar)`
    : `ship back by ${day} (campus calendar)`;
}

/**
 * Builds the shipments notifier: alerts go to the lender's coordinators (link to the
 * shipment) and the hospital's buyers (link to the loan); the deposit statement to the buyers.
 * Each is deduplicated per shipment (or loan), condition and person, so a replay adds nothing.
 */
export function createShipmentNotifier(options: {
  publicUrl: string;
  now?: () => Date;
}): NotifyShipmentEvent {
  const clock = options.now ?? (() => new Date());
  const base = options.publicUrl.replace(/\/$/, '');
  return async (m, notice) => {
    const now = clock();
    if (notice.event === 'alert') {
      const [leg]: LegFacts[] = await m.query(
        `SELECT s.id AS shipment_id, s.reference, s.direction, CAST(s.due_by AS CHAR) AS due_by,
                CAST(s.eta AS CHAR) AS eta, s.tracking_number, l.id AS loan_id,
                l.reference AS loan_reference, l.lender_id, l.hospital_id, l.site_id,
                c.name AS site_name, c.time_zone AS site_zone, d.name AS depot_name,
                d.time_zone AS depot_zone, h.name AS hospital_name, o.name AS lender_name
           FROM shipments s JOIN loans l ON l.id = s.loan_id
           JOIN sites c ON c.id = s.site_id JOIN sites d ON d.id = s.depot_id
           JOIN organisations h ON h.id = l.hospital_id JOIN organisations o ON o.id = l.lender_id
          WHERE s.id = ?`,
        [notice.shipmentId],
      );
      if (!leg)
        throw new Error(`notifyShipmentEvent: shipment ${notice.shipmentId} does not exist`);
      const coordinators = await recipientsFor(m, {
        organisationId: leg.lender_id,
        roles: ['coordinator'],
      });
      const buyers = await recipientsFor(m, {
        organisationId: leg.hospital_id,
        roles: ['buyer'],
        siteId: leg.site_id,
      });
      const send = async (people: Recipient[], zone: string, url: string) => {
        for (const p of people) {
          const mail = shipmentAlert(
            {
              kind: notice.kind,
              shipmentReference: leg.reference,
              loanReference: leg.loan_reference,
              direction: leg.direction,
              depotName: leg.depot_name,
              siteName: leg.site_name,
              hospitalName: leg.hospital_name,
              dueBy: leg.due_by,
              eta: leg.eta,
              trackingNumber: leg.tracking_number,
              url,
            },
            { name: p.name, email: p.email, timeZone: p.timeZone ?? zone },
          );
          await enqueueEmail(
            m,
            {
              to: p.email,
              subject: mail.subject,
              html: mail.html,
              text: mail.text,
              headers: { 'X-Evalon-Loan': leg.loan_reference },
              dedupeKey: `shipment:${leg.shipment_id}:${notice.kind}:user:${p.userId}`,
            },
            now,
          );
        }
        await notifyUsers(
          m,
          people.map((p) => p.userId),
          {
            kind: `shipment.${notice.kind}`,
            title: `${alertTitles[notice.kind]}: ${leg.reference}`,
            body: `Loan ${leg.loan_reference}, ${deadlineWords(leg.direction, notice.kind, leg.due_by)}.`,
            link: url.slice(base.length),
            dedupeKey: `shipment:${leg.shipment_id}:${notice.kind}:${url.slice(base.length)}`,
          },
          now,
        );
      };
      await send(coordinators, leg.depot_zone, `${base}/shipments/${leg.shipment_id}`);
      await send(buyers, leg.site_zone, `${base}/loans/${leg.loan_id}`);
      return;
    }
    const [loan]: {
      reference: string;
      hospital_id: number;
      site_id: number;
      site_zone: string;
      hospital_name: string;
      lender_name: string;
    }[] = await m.query(
      `SELECT l.reference, l.hospital_id, l.site_id, l.site_time_zone AS site_zone,
              h.name AS hospital_name, o.name AS lender_name
         FROM loans l JOIN organisations h ON h.id = l.hospital_id
         JOIN organisations o ON o.id = l.lender_id WHERE l.id = ?`,
      [notice.loanId],
    );
    if (!loan) throw new Error(`notifyShipmentEvent: loan ${notice.loanId} does not exist`);
    const buyers = await recipientsFor(m, {
      organisationId: loan.hospital_id,
      roles: ['buyer'],
      siteId: loan.site_id,
    });
    const url = `${base}/loans/${notice.loanId}`;
    for (const p of buyers) {
      const mail = depositStatement(
        {
          ...notice.statement,
          loanReference: loan.reference,
          lenderName: loan.lender_name,
          hospitalName: loan.hospital_name,
          url,
        },
        { name: p.name, email: p.email, timeZone: p.timeZone ?? loan.site_zone },
      );
      await enqueueEmail(
        m,
        {
          to: p.email,
          subject: mail.subject,
          html: mail.html,
          text: mail.text,
          headers: { 'X-Evalon-Loan': loan.reference },
          dedupeKey: `loan:${notice.loanId}:statement:user:${p.userId}`,
        },
        now,
      );
    }
    await notifyUsers(
      m,
      buyers.map((p) => p.userId),
      {
        kind: 'loan.closed',
        title: `Loan ${loan.reference} closed`,
        body: `Deposit settled: ${notice.statement.kept} deducted, ${notice.statement.returned} returned (minor units of ${notice.statement.currency}).`,
        link: `/loans/${notice.loanId}`,
        dedupeKey: `loan:${notice.loanId}:closed`,
      },
      now,
    );
  };
}

/** The shipments notifier for a server configuration. */
export function shipmentNotifierFromConfig(
  config: Pick<Config, 'http'>,
  overrides: { now?: () => Date } = {},
): NotifyShipmentEvent {
  return createShipmentNotifier({ publicUrl: config.http.publicUrl, ...overrides });
}
