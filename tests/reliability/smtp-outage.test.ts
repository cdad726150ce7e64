import mysql from 'mysql2/promise';
import type { DataSource } from 'typeorm';
import type { Loan } from '@evalon/contracts';
import { loanConfirmed } from '@evalon/messages';
import { loadConfig, type Config } from '../../server/src/config';
import { createDataSource } from '../../server/src/database/data-source';
import { enqueueEmail } from '../../server/src/notifications/domain/outbox';
import { freePort, startNode, type Started } from '../../server/test/helpers/processes';

// Reliability: the mail server goes away while loan confirmations are being written. Real parts
// only: a maildev catcher on free ports, two Evalon server processes (`node --import tsx
// server/src/main.ts`) each running its outbox worker against real SMTP, and a database of this
// suite's own. While maildev is down, 30 confirmation e-mails are enqueued in 30 transactions;
// when it is back, every one must arrive exactly once, counted by Message-ID through maildev's
// HTTP API.

jest.setTimeout(240_000);

const database = 'evalon_test_reliability';
const outageMessages = 30;

let config: Config;
let dataSource: DataSource;
let smtpPort: number;
let webPort: number;
let maildev: Started | undefined;
const servers: Started[] = [];

/** Creates this suite's database from scratch and runs every migration. */
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
  dataSource = createDataSource(config.db);
  await dataSource.initialize();
  await dataSource.runMigrations({ transaction: 'each' });
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
      EVALON_OUTBOX_WORKER: 'on',
      EVALON_OUTBOX_POLL_MS: '200',
      EVALON_OUTBOX_BATCH_SIZE: '5',
      // Short backoff and plenty of attempts: the outage must not park anything.
      EVALON_OUTBOX_BACKOFF_BASE_MS: '250',
      EVALON_OUTBOX_BACKOFF_CAP_MS: '2000',
      EVALON_OUTBOX_MAX_ATTEMPTS: '1000',
      EVALON_SMTP_TIMEOUT_MS: '3000',
      EVALON_OUTBOX_LEASE_MS: '60000',
      // Only the enqueued messages are counted here: no shipment alerts.
      EVALON_SHIPMENT_ALERTS_INTERVAL_MS: '0',
    },
    /outbox worker started/,
    120_000,
  );
}

interface CaughtMail {
  subject: string;
  headers: Record<string, string | string[]>;
  to: { address: string }[];
  attachments?: { contentType: string }[];
}

async function inbox(): Promise<CaughtMail[]> {
  const res = await fetch(`http://127.0.0.1:${webPort}/api/email`);
  return (await res.json()) as CaughtMail[];
}

async function statusCounts(ids: string[]): Promise<Record<string, number>> {
  const rows: { status: string; n: number | string }[] = await dataSource.query(
    'SELECT status, COUNT(*) AS n FROM outbox_messages WHERE message_id IN (?) GROUP BY status',
    [ids],
  );
  return Object.fromEntries(rows.map((r) => [r.status, Number(r.n)]));
}

async function waitUntil(what: string, check: () => Promise<boolean>, timeoutMs: number) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`${what} did not happen within ${timeoutMs} ms`);
}

/** An invented confirmed loan (demo-data style); only the recipient changes between e-mails. */
function loan(n: number): Loan {
  const milestones = {
    shipBy: '2027-03-08',
    deliverBy: '2027-03-11',
    useFrom: '2027-03-15',
    useTo: '2027-03-19',
    returnShipBy: '2027-03-22',
    backAtDepot: '2027-03-25',
    readyAgain: '2027-03-29',
  };
  return {
    id: 1000 + n,
    reference: `EV-2027-${String(1000 + n).padStart(4, '0')}`,
    state: 'confirmed',
    hospitalId: 11,
    hospitalName: 'Quillfield Teaching Hospital',
    siteId: 31,
    siteName: 'East Campus',
    siteTimeZone: 'America/New_York',
    lenderId: 21,
    lenderName: 'Brightlathe Loaner Program',
    useFrom: milestones.useFrom,
    useTo: milestones.useTo,
    milestones,
    units: [
      {
        unitId: 7,
        modelId: 3,
        modelName: 'Calder arm robotic platform',
        serialNumber: 'CA-0007',
        depotId: 5,
        depotName: 'Lakeside depot',
        milestones,
      },
    ],
    deposit: { amount: 250_000, currency: 'USD' },
    note: null,
    requestedBy: 'Dana Orrin',
    createdAt: '2027-02-01T14:00:00Z',
  };
}

beforeAll(async () => {
  config = loadConfig({ ...process.env, EVALON_DB_NAME: database, EVALON_LOG_LEVEL: 'silent' });
  await freshDatabase();
  smtpPort = await freePort();
  webPort = await freePort();
  maildev = await startMaildev();
  // Two processes, two workers: the outbox must not hand one message to both.
  servers.push(...(await Promise.all([startServer(), startServer()])));
});

afterAll(async () => {
  await Promise.all(servers.map((s) => s.stop()));
  await maildev?.stop();
  if (dataSource?.isInitialized) await dataSource.destroy();
});

it('delivers every e-mail enqueued during an SMTP outage exactly once after the mail server returns', async () => {
  // 1. Stop the mail server.
  await maildev!.stop();
  maildev = undefined;

  // 2. Enqueue 30 confirmation e-mails, each in its own transaction, as the loans flow would.
  const ids: string[] = [];
  for (let n = 1; n <= outageMessages; n++) {
    const to = `buyer${n}@quillfield.example`;
    const mail = loanConfirmed(
      {
        loan: loan(n),
        publicUrl: 'http://127.0.0.1:8080',
        invite: {
          siteAddress: '100 Harbor Road\nPortwell, NY 10001',
          organizer: { name: 'Evalon loans', email: 'no-reply@evalon.example' },
          attendees: [{ name: `Buyer ${n}`, email: to }],
          sequence: 0,
          uidDomain: 'evalon.example',
        },
      },
      { name: `Buyer ${n}`, email: to, timeZone: 'America/New_York' },
    );
    ids.push(
      await dataSource.transaction((m) =>
        enqueueEmail(m, {
          to,
          subject: mail.subject,
          html: mail.html,
          text: mail.text,
          attachments: mail.attachments,
          dedupeKey: `loan:${1000 + n}:confirmed:user:${n}`,
        }),
      ),
    );
  }

  // 3. The workers try and fail meanwhile: the rows stay pending with attempts counted.
  await waitUntil(
    'failed attempts during the outage',
    async () => {
      const [r] = await dataSource.query(
        'SELECT COUNT(*) AS n FROM outbox_messages WHERE message_id IN (?) AND attempts >= 2',
        [ids],
      );
      return Number(r.n) === outageMessages;
    },
    60_000,
  );
  const during = await statusCounts(ids);
  const [attemptsDuring] = await dataSource.query(
    'SELECT MIN(attempts) AS lo, MAX(attempts) AS hi, MAX(last_error) AS err FROM outbox_messages WHERE message_id IN (?)',
    [ids],
  );
  expect(during.sent ?? 0).toBe(0);
  expect(during.parked ?? 0).toBe(0);
  expect(String(attemptsDuring.err)).toMatch(/ECONNREFUSED/);

  // 4. The mail server comes back on the same port; the workers' next attempts go through.
  maildev = await startMaildev();
  await waitUntil(
    'every outage e-mail marked sent',
    async () => (await statusCounts(ids)).sent === outageMessages,
    120_000,
  );
  // Give a late duplicate (if any) time to show up before counting.
  await new Promise((r) => setTimeout(r, 3_000));

  // 5. Count what arrived, by Message-ID.
  const caught = await inbox();
  const counts = new Map<string, number>();
  for (const m of caught) {
    const header = m.headers['message-id'];
    const id = Array.isArray(header) ? header[0] : header;
    if (id) counts.set(id, (counts.get(id) ?? 0) + 1);
  }
  const expected = ids.map((id) => `<${id}@evalon.example>`);
  const perMessage = expected.map((id) => counts.get(id) ?? 0);
  const [attemptsAfter] = await dataSource.query(
    'SELECT MIN(attempts) AS lo, MAX(attempts) AS hi FROM outbox_messages WHERE message_id IN (?)',
    [ids],
  );
  process.stdout.write(
    `smtp outage: ${outageMessages} enqueued while down; attempts during outage ` +
      `${attemptsDuring.lo}..${attemptsDuring.hi}; final attempts ${attemptsAfter.lo}..${attemptsAfter.hi}; ` +
      `maildev holds ${caught.length} e-mails, ${counts.size} distinct Message-IDs; ` +
      `per expected Message-ID: min ${Math.min(...perMessage)}, max ${Math.max(...perMessage)}\n`,
  );
  expect(perMessage.every((n) => n === 1)).toBe(true);
  expect(caught).toHaveLength(outageMessages);
  expect(counts.size).toBe(outageMessages);
  // They are the confirmations with their calendar invites.
  expect(caught.every((m) => m.subject.startsWith('Loan EV-2027-'))).toBe(true);
  expect(
    caught.every((m) =>
      (m.attachments ?? []).some((a) => a.contentType.startsWith('text/calendar')),
    ),
  ).toBe(true);
});
