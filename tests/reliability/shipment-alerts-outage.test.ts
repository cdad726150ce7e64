import mysql from 'mysql2/promise';
import { loadConfig, type Config } from '../../server/src/config';
import { startTestApp, type TestApp } from '../../server/test/helpers/app';
import {
  carrierWebhookSecret,
  startCarrier,
  type RunningCarrier,
} from '../../server/test/helpers/carrier';
import { makeUnit } from '../../server/test/helpers/catalog';
import {
  listen,
  registerWebhook,
  startPaymentsFake,
  type RunningFake,
} from '../../server/test/helpers/payments';
import { freePort, startNode, type Started } from '../../server/test/helpers/processes';
import { shipmentKit } from '../../server/test/helpers/shipments';

// Reliability: the mail server is down while the shipment alerts job fires. Real parts only: a
// maildev catcher on free ports (not running at first), two Evalon server processes (`node
// --import tsx server/src/main.ts`) each running the alerts job every 300 ms and an outbox
// worker against real SMTP, the payments fake and the carrier stand-in for the legs, and a
// database of this suite's own. Legs are put in the three alerting conditions (at risk, overdue,
// return reminder); once the alerts are claimed and their e-mails have failed at least twice,
// maildev comes back on the same port and every alert e-mail must arrive exactly once, counted
// by Message-ID through maildev's HTTP API (GET /api/email).

jest.setTimeout(300_000);

const database = 'evalon_test_alerts_outage';
/** Legs per condition. */
const perCondition = 2;

let config: Config;
let t: TestApp;
let fake: RunningFake;
let carrier: RunningCarrier;
let app: { url: string; close(): Promise<void> };
let smtpPort: number;
let webPort: number;
let maildev: Started | undefined;
const servers: Started[] = [];
const kit = shipmentKit(
  () => t,
  () => fake,
);

async function freshDatabase(): Promise<void> {
  const admin = await mysql.createConnection({
    host: config.db.host,
    port: config.db.port,
    user: config.db.user,
    password: config.db.password,
  });
  try {
    await admin.query(`DROP DATABASE IF EXISTS \`${database}\``);
    await admin.query(
      `CREATE DATABASE \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
    );
  } finally {
    await admin.end();
  }
}

function startMaildev(): Promise<Started> {
  return startNode(
    [
      'node_modules/maildev/dist/bin/maildev.js',
      '--smtp',
      String(smtpPort),
      '--web',
      String(webPort),
      '--ip',
      '127.0.0.1',
      '--web-ip',
      '127.0.0.1',
    ],
    {},
    /Press Ctrl\+C to stop/,
    30_000,
  );
}

async function startServer(): Promise<Started> {
  const port = await freePort();
  return startNode(
    ['--import', 'tsx', 'server/src/main.ts'],
    {
      NODE_ENV: 'test',
      EVALON_PORT: String(port),
      EVALON_DB_NAME: database,
      EVALON_LOG_LEVEL: 'info',
      EVALON_SMTP_PORT: String(smtpPort),
      EVALON_PAYMENTS_PORT: String(fake.port),
      EVALON_DEPOSIT_EXPIRY_JOB: 'off',
      EVALON_SHIPMENT_ALERTS_INTERVAL_MS: '300',
      EVALON_OUTBOX_WORKER: 'on',
      EVALON_OUTBOX_POLL_MS: '200',
      EVALON_OUTBOX_BATCH_SIZE: '5',
      // Short backoff and plenty of attempts: the outage must not park anything.
      EVALON_OUTBOX_BACKOFF_BASE_MS: '250',
      EVALON_OUTBOX_BACKOFF_CAP_MS: '2000',
      EVALON_OUTBOX_MAX_ATTEMPTS: '1000',
      EVALON_SMTP_TIMEOUT_MS: '3000',
      EVALON_OUTBOX_LEASE_MS: '60000',
    },
    /Evalon server listening/,
    120_000,
  );
}

async function waitUntil(what: string, check: () => Promise<boolean>, timeoutMs: number) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`${what} did not happen within ${timeoutMs} ms`);
}

interface CaughtMail {
  subject: string;
  headers: Record<string, string | string[]>;
  to: { address: string }[];
}

async function inbox(): Promise<CaughtMail[]> {
  const res = await fetch(`http://127.0.0.1:${webPort}/api/email`);
  return (await res.json()) as CaughtMail[];
}

beforeAll(async () => {
  config = loadConfig({ ...process.env, EVALON_DB_NAME: database, EVALON_LOG_LEVEL: 'silent' });
  await freshDatabase();
  fake = await startPaymentsFake();
  carrier = await startCarrier();
  // The in-process app migrates nothing by itself: run the migrations through its data source.
  t = await startTestApp(
    {
      EVALON_DB_NAME: database,
      EVALON_PAYMENTS_PORT: String(fake.port),
      EVALON_DEPOSIT_EXPIRY_JOB: 'off',
    },
    { outboxWorker: false },
  );
  await t.dataSource.runMigrations({ transaction: 'each' });
  app = await listen(t.app);
  await registerWebhook(fake, `${app.url}/api/webhooks/payments`);
  await carrier.control('POST', '/webhook-endpoint', {
    url: `${app.url}/api/webhooks/carrier`,
    secret: carrierWebhookSecret,
  });
  smtpPort = await freePort();
  webPort = await freePort();
});

afterAll(async () => {
  await Promise.all(servers.map((s) => s.stop()));
  await maildev?.stop();
  await app?.close();
  await t?.close();
  await fake?.stop();
  await carrier?.stop();
});

it('delivers every alert e-mail fired during an SMTP outage exactly once after the mail server returns', async () => {
  // 1. Legs in each condition, made through the real flows (confirmed with the payments fake;
  //    the returns delivered out and back by the carrier stand-in), then dated into the condition.
  const w = await kit.world();
  const { modelId } = await kit.modelWithPackingList(w.lender.id);
  const expected: { shipmentId: number; kind: string }[] = [];
  let weeks = 0;
  const nextLoan = async () => {
    const unit = await makeUnit(t.dataSource, modelId, w.lender.depotId);
    weeks += 2;
    const loan = await kit.confirmedLoan(w, [unit], 60 + weeks * 7);
    return { loan, legs: await kit.legsOf(loan.id) };
  };
  for (let i = 0; i < perCondition; i += 1) {
    const risky = (await nextLoan()).legs[0];
    // The carrier's expected delivery is after the deliver-by day.
    await t.dataSource.query(
      'UPDATE shipments SET eta = DATE_ADD(due_by, INTERVAL 2 DAY), at_risk = TRUE WHERE id = ?',
      [risky.id],
    );
    expected.push({ shipmentId: risky.id, kind: 'at_risk' });

    const late = (await nextLoan()).legs[0];
    // The end of the deliver-by day at the campus has passed.
    await t.dataSource.query(
      'UPDATE shipments SET overdue_at = DATE_SUB(UTC_TIMESTAMP(3), INTERVAL 1 HOUR) WHERE id = ?',
      [late.id],
    );
    expected.push({ shipmentId: late.id, kind: 'overdue' });

    const { loan, legs } = await nextLoan();
    await kit.packed(legs[0].id);
    const handed = await kit
      .post(w.coordinator, `/api/shipments/${legs[0].id}/hand-over`, {})
      .expect(200);
    await carrier.control('POST', `/shipments/${handed.body.shipment.trackingNumber}/advance`, {
      to: 'delivered',
    });
    await carrier.control('POST', '/webhooks/flush', {});
    const ret = (await kit.legsOf(loan.id)).find((l) => l.direction === 'return')!;
    expect(ret.state).toBe('awaiting_return');
    // The ship-back day is today at the campus: inside the two-business-day reminder window,
    // and not yet late (that is the end of the day).
    await t.dataSource.query(
      `UPDATE shipments SET due_by = UTC_DATE(), due_zone = 'UTC', overdue_at = DATE_ADD(UTC_TIMESTAMP(3), INTERVAL 30 DAY) WHERE id = ?`,
      [ret.id],
    );
    expected.push({ shipmentId: ret.id, kind: 'return_reminder' });
  }
  // Nothing was alerted while the data was made (the in-process app runs no jobs).
  const [{ n: before }] = await t.dataSource.query('SELECT COUNT(*) AS n FROM shipment_alerts');
  expect(Number(before)).toBe(0);

  // 2. Two server processes with the alerts job and outbox workers; the mail server is down.
  servers.push(...(await Promise.all([startServer(), startServer()])));

  // 3. Every condition is claimed once and its e-mails (coordinator + buyer) fail repeatedly.
  const emailsExpected = expected.length * 2;
  await waitUntil(
    'alerts claimed and e-mails failing during the outage',
    async () => {
      const [r] = await t.dataSource.query(
        "SELECT COUNT(*) AS n FROM outbox_messages WHERE dedupe_key LIKE 'shipment:%' AND attempts >= 2",
      );
      return Number(r.n) === emailsExpected;
    },
    90_000,
  );
  const alerts: { shipment_id: number; kind: string }[] = await t.dataSource.query(
    'SELECT shipment_id, kind FROM shipment_alerts ORDER BY shipment_id, kind',
  );
  expect(alerts.map((a) => `${a.shipment_id}:${a.kind}`).sort()).toEqual(
    expected.map((e) => `${e.shipmentId}:${e.kind}`).sort(),
  );
  const [during] = await t.dataSource.query(
    `SELECT SUM(status = 'sent') AS sent, SUM(status = 'parked') AS parked, MAX(last_error) AS err,
            MIN(attempts) AS lo, MAX(attempts) AS hi
       FROM outbox_messages WHERE dedupe_key LIKE 'shipment:%'`,
  );
  expect(Number(during.sent)).toBe(0);
  expect(Number(during.parked)).toBe(0);
  expect(String(during.err)).toMatch(/ECONNREFUSED/);

  // 4. The mail server comes back on the same port.
  maildev = await startMaildev();
  await waitUntil(
    'every alert e-mail marked sent',
    async () => {
      const [r] = await t.dataSource.query(
        "SELECT COUNT(*) AS n FROM outbox_messages WHERE dedupe_key LIKE 'shipment:%' AND status = 'sent'",
      );
      return Number(r.n) === emailsExpected;
    },
    120_000,
  );
  // Give a late duplicate (if any) time to arrive, and the job a few more passes.
  await new Promise((r) => setTimeout(r, 3_000));

  // 5. Count what arrived, by Message-ID, against the outbox rows.
  const rows: { message_id: string; subject: string }[] = await t.dataSource.query(
    "SELECT message_id, subject FROM outbox_messages WHERE dedupe_key LIKE 'shipment:%'",
  );
  expect(rows).toHaveLength(emailsExpected);
  const caught = await inbox();
  const counts = new Map<string, number>();
  for (const m of caught) {
    const header = m.headers['message-id'];
    const id = Array.isArray(header) ? header[0] : header;
    if (id) counts.set(id, (counts.get(id) ?? 0) + 1);
  }
  const perMessage = rows.map((r) => counts.get(`<${r.message_id}@evalon.example>`) ?? 0);
  const [after] = await t.dataSource.query(
    "SELECT MIN(attempts) AS lo, MAX(attempts) AS hi FROM outbox_messages WHERE dedupe_key LIKE 'shipment:%'",
  );
  const [{ n: alertsAfter }] = await t.dataSource.query(
    'SELECT COUNT(*) AS n FROM shipment_alerts',
  );
  process.stdout.write(
    `shipment alerts outage: ${expected.length} alerts (${perCondition} each of at risk, overdue, ` +
      `return reminder) → ${emailsExpected} e-mails; attempts during outage ${during.lo}..${during.hi}; ` +
      `final attempts ${after.lo}..${after.hi}; maildev holds ${caught.length} e-mails, ` +
      `${counts.size} distinct Message-IDs; per alert Message-ID: min ${Math.min(...perMessage)}, ` +
      `max ${Math.max(...perMessage)}; alerts claimed ${alertsAfter}\n`,
  );
  expect(perMessage.every((n) => n === 1)).toBe(true);
  // The other e-mails in the catcher are the loans' own (request, approval, confirmation) that
  // waited out the outage too: every outbox row arrived once, and nothing else arrived.
  const all: { message_id: string }[] = await t.dataSource.query(
    "SELECT message_id FROM outbox_messages WHERE status = 'sent'",
  );
  const [{ n: unsent }] = await t.dataSource.query(
    "SELECT COUNT(*) AS n FROM outbox_messages WHERE status <> 'sent'",
  );
  expect(Number(unsent)).toBe(0);
  expect(all.map((r) => counts.get(`<${r.message_id}@evalon.example>`) ?? 0)).toEqual(
    all.map(() => 1),
  );
  expect(caught).toHaveLength(all.length);
  const alertIds = new Set(rows.map((r) => `<${r.message_id}@evalon.example>`));
  const caughtAlerts = caught.filter((m) => {
    const header = m.headers['message-id'];
    return alertIds.has(Array.isArray(header) ? header[0]! : header!);
  });
  expect(caughtAlerts).toHaveLength(emailsExpected);
  expect(Number(alertsAfter)).toBe(expected.length);
  // In-app too: one notice per alert and person (coordinator, buyer), not one per process.
  const [{ n: notices }] = await t.dataSource.query(
    "SELECT COUNT(*) AS n FROM notifications WHERE kind LIKE 'shipment.%'",
  );
  expect(Number(notices)).toBe(emailsExpected);
  // Each reached the coordinator and the buyer, with the condition in the subject.
  const recipients = caughtAlerts.map((m) => m.to[0]?.address).sort();
  expect(new Set(recipients)).toEqual(
    new Set([w.lender.coordinator.email, w.hospital.buyer.email].map((e) => e.toLowerCase())),
  );
  expect(new Set(rows.map((r) => r.subject))).toEqual(new Set(caughtAlerts.map((m) => m.subject)));
});
