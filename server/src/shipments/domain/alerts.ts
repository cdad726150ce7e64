import type { ShipmentAlertKind } from '@evalon/messages';
import {
  calendarDaysBetween,
  returnReminderDue,
  subtractBusinessDays,
  toSiteDate,
} from '@evalon/scheduling';
import type { Logger } from '../../logger';
import { claimAlert, insertEvent } from '../data-access/shipment-repository';
import { ensureOutboundShipments } from './creation';
import type { ShipmentsDeps } from './deps';

/** Hospital business days before `returnShipBy` that the return reminder goes out (issue rule). */
export const RETURN_REMINDER_BUSINESS_DAYS = 2;

const alertWords: Record<ShipmentAlertKind, string> = {
  at_risk: 'Alert sent: expected delivery is after the deliver-by day.',
  overdue: 'Alert sent: not delivered by the end of the deliver-by day.',
  return_reminder: 'Reminder sent: the return is due to ship soon.',
  return_late: 'Alert sent: the return was due to ship and has not.',
  return_at_risk: 'Alert sent: expected back at the depot after the back-at-depot day.',
  return_overdue: 'Alert sent: not received at the depot by the end of the back-at-depot day.',
};

/** Return states on the way back to the depot (the deadline is then the depot's). */
const returnUnderway = ['handed_over', 'in_transit', 'exception'];

interface Candidate {
  id: number;
  direction: 'outbound' | 'return';
  state: string;
  at_risk: number;
  overdue_at: Date;
  due_by: string;
  due_zone: string;
  origin_country: string;
}

/**
 * The conditions that hold for a leg now (each alert goes out once per leg: the
 * `shipment_alerts` key decides). Return reminder: from {@link RETURN_REMINDER_BUSINESS_DAYS}
 * campus business days before `returnShipBy` through that day.
 */
export function dueAlerts(c: Candidate, now: Date): ShipmentAlertKind[] {
  const out: ShipmentAlertKind[] = [];
  const late = now.getTime() >= new Date(c.overdue_at).getTime();
  if (c.direction === 'outbound') {
    if (Number(c.at_risk) === 1) out.push('at_risk');
    if (late) out.push('overdue');
    return out;
  }
  if (returnUnderway.includes(c.state)) {
    if (Number(c.at_risk) === 1) out.push('return_at_risk');
    if (late) out.push('return_overdue');
    return out;
  }
  if (c.state !== 'awaiting_return') return out;
  const today = toSiteDate(now, c.due_zone);
  // Two campus business days back, counted as calendar days for the scheduling package's rule.
  const from = subtractBusinessDays(c.due_by, RETURN_REMINDER_BUSINESS_DAYS, c.origin_country);
  if (returnReminderDue(c.due_by, today, calendarDaysBetween(from, c.due_by))) {
    out.push('return_reminder');
  }
  if (late) out.push('return_late');
  return out;
}

/**
 * One pass of the alerts job: legs with a condition not yet alerted are locked with
 * `FOR UPDATE SKIP LOCKED` (so several processes share the work without waiting on each other),
 * each new condition is claimed once, and its e-mails and in-app notices are written through
 * the notifications component in the same transaction. Also creates the outbound legs of
 * confirmed loans that have none (a loan confirmed before this component existed, or by a path
 * that did not create them). Returns the number of alerts sent.
 */
export async function runShipmentAlerts(deps: ShipmentsDeps, batch = 200): Promise<number> {
  const now = deps.now();
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const loans: { id: number }[] = await m.query(
      `SELECT l.id FROM loans l WHERE l.state = 'confirmed'
          AND NOT EXISTS (SELECT 1 FROM shipments s WHERE s.loan_id = l.id)
        ORDER BY l.id LIMIT 50 FOR UPDATE SKIP LOCKED`,
    );
    for (const l of loans) await ensureOutboundShipments(m, Number(l.id), now);
  });
  return deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const alerted = (kind: ShipmentAlertKind) =>
      `NOT EXISTS (SELECT 1 FROM shipment_alerts a WHERE a.shipment_id = s.id AND a.kind = '${kind}')`;
    const rows: Candidate[] = await m.query(
      `SELECT s.id, s.direction, s.state, s.at_risk, s.overdue_at, CAST(s.due_by AS CHAR) AS due_by,
              s.due_zone, s.origin_country
         FROM shipments s
        WHERE (s.direction = 'outbound'
                AND s.state IN ('to_pack', 'packed', 'handed_over', 'in_transit', 'exception')
                AND ((s.at_risk = 1 AND ${alerted('at_risk')})
                  OR (s.overdue_at <= ? AND ${alerted('overdue')})))
           OR (s.direction = 'return' AND s.state = 'awaiting_return'
                AND ((s.due_by <= DATE_ADD(?, INTERVAL 7 DAY) AND ${alerted('return_reminder')})
                  OR (s.overdue_at <= ? AND ${alerted('return_late')})))
           OR (s.direction = 'return' AND s.state IN ('handed_over', 'in_transit', 'exception')
                AND ((s.at_risk = 1 AND ${alerted('return_at_risk')})
                  OR (s.overdue_at <= ? AND ${alerted('return_overdue')})))
        ORDER BY s.id LIMIT ? FOR UPDATE SKIP LOCKED`,
      [now, now, now, now, batch],
    );
    let sent = 0;
    for (const c of rows) {
      for (const kind of dueAlerts(c, now)) {
        if (!(await claimAlert(m, c.id, kind, now))) continue;
        await deps.notify(m, { event: 'alert', kind, shipmentId: c.id });
        await insertEvent(
          m,
          {
            shipmentId: c.id,
            kind: 'alert',
            fromState: null,
            toState: null,
            carrierEventId: null,
            carrierStatus: null,
            message: alertWords[kind],
            ignored: false,
            occurredAt: now,
            actorUserId: null,
          },
          now,
        );
        sent += 1;
      }
    }
    return sent;
  });
}

/** A running alerts job. */
export interface ShipmentAlertsJob {
  stop(): Promise<void>;
}

/** Runs {@link runShipmentAlerts} every `intervalMs`, one pass at a time. */
export function startShipmentAlertsJob(
  deps: ShipmentsDeps,
  intervalMs: number,
  logger: Logger = deps.logger,
): ShipmentAlertsJob {
  let running: Promise<unknown> = Promise.resolve();
  let stopped = false;
  const tick = () => {
    if (stopped) return;
    running = runShipmentAlerts(deps)
      .then((n) => {
        if (n > 0) logger.info({ alerts: n }, 'shipment alerts sent');
      })
      .catch((err: unknown) => logger.error({ err }, 'shipment alerts pass failed'));
  };
  const timer = setInterval(tick, intervalMs);
  timer.unref();
  tick();
  return {
    async stop() {
      stopped = true;
      clearInterval(timer);
      await running;
    },
  };
}
