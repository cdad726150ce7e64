import mysql from 'mysql2/promise';
import type { DataSource } from 'typeorm';
import { loadConfig, type Config } from '../../server/src/config';
import { createDataSource } from '../../server/src/database/data-source';
import { toAuthContext } from '../../server/src/identity/domain/auth-context';
import { createLogger } from '../../server/src/logger';
import { createPaymentsDeps } from '../../server/src/payments';
import { startDeposit } from '../../server/src/payments/domain/deposit';
import { makeHospital, makeLender } from '../../server/test/helpers/catalog';
import {
  fakeState,
  flushWebhooks,
  insertApprovedLoan,
  payOnHostedPage,
  registerWebhook,
  startPaymentsFake,
  type RunningFake,
} from '../../server/test/helpers/payments';
import { freePort, startNode, type Started } from '../../server/test/helpers/processes';

// Reliability: the server is killed (SIGKILL, no chance to clean up) while the payment provider
// is delivering the webhooks of 20 paid deposits. Real parts only: the Evalon server as a child
// process (`node --import tsx server/src/main.ts`, outbox worker on, real SMTP to a maildev
// catcher), the payments fake as a child process re-delivering what was not acknowledged, and a
// database of this suite's own. After the restart on the same port the fake's re-deliveries go
// through. Invariants, checked right after the kill and at the end: no loan confirmed without
// its payment row and either its outbox e-mails or the notice job the outbox worker renders them
// from (the job commits with the confirmation or not at all); one confirmation per loan; in the
// end every loan confirmed, no job left and the outbox drained (every e-mail sent once).

jest.setTimeout(300_000);

const database = 'evalon_test_payments_crash';
const loanCount = 20;

let config: Config;
let dataSource: DataSource;
let fake: RunningFake;
let maildev: Started | undefined;
let server: Started | undefined;
let appPort: number;
let smtpPort: number;
let webPort: number;

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

function startServer(): Promise<Started> {
  return startNode(
    ['--import', 'tsx', 'server/src/main.ts'],
    {
      NODE_ENV: 'test',
      EVALON_PORT: String(appPort),
      EVALON_DB_NAME: database,
      EVALON_LOG_LEVEL: 'info',
      EVALON_SMTP_PORT: String(smtpPort),
      EVALON_OUTBOX_WORKER: 'on',
      EVALON_OUTBOX_POLL_MS: '200',
      // A message the killed worker had claimed is reclaimed when its lease ends (the lease
      // must be at least 4 SMTP timeouts, see config.ts); short here so the test need not wait
      // the default 5 minutes.
      EVALON_SMTP_TIMEOUT_MS: '3000',
      EVALON_OUTBOX_LEASE_MS: '12000',
      EVALON_PAYMENTS_PORT: String(fake.port),
      EVALON_DEPOSIT_EXPIRY_JOB: 'on',
      EVALON_DEPOSIT_EXPIRY_INTERVAL_MS: '2000',
      // Only confirmation e-mails are counted here: no shipment alerts for the short loans.
      EVALON_SHIPMENT_ALERTS_INTERVAL_MS: '0',
    },
    /Evalon server listening/,
    120_000,
  );
}

async function waitUntil(what: string, check: () => Promise<boolean>, timeoutMs: number) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 25));
  }
  throw new Error(`${what} did not happen within ${timeoutMs} ms`);
}

const count = async (sql: string, params: unknown[] = []) =>
  Number((await dataSource.query(sql, params))[0].n);

/**
 * Loans confirmed without their securing payment row, or with neither their confirmation
 * e-mails nor the pending notice job that renders them.
 */
async function brokenConfirmations(loanIds: number[]): Promise<number> {
  return count(
    `SELECT COUNT(*) AS n FROM loans l
      WHERE l.id IN (?) AND l.state = 'confirmed'
        AND (NOT EXISTS (SELECT 1 FROM payments p WHERE p.loan_id = l.id AND p.secures_loan = 1
                           AND p.status IN ('authorised', 'captured'))
             OR ((SELECT COUNT(*) FROM outbox_messages o
                   WHERE o.dedupe_key LIKE CONCAT('loan:', l.id, ':confirmed:user:%')) < 3
                 AND NOT EXISTS (SELECT 1 FROM notice_jobs j
                   WHERE j.dedupe_key = CONCAT('loan:', l.id, ':confirmed')
                     AND j.status = 'pending')))`,
    [loanIds],
  );
}

beforeAll(async () => {
  config = loadConfig({ ...process.env, EVALON_DB_NAME: database, EVALON_LOG_LEVEL: 'silent' });
  await freshDatabase();
  // Slower provider answers widen the window in which the kill lands mid-way.
  fake = await startPaymentsFake({
    EVALON_PAYMENTS_WEBHOOK_RETRY_BASE_MS: '200',
    EVALON_PAYMENTS_WEBHOOK_MAX_ATTEMPTS: '200',
  });
  [appPort, smtpPort, webPort] = [await freePort(), await freePort(), await freePort()];
  maildev = await startNode(
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
  server = await startServer();
  await registerWebhook(fake, `http://127.0.0.1:${appPort}/api/webhooks/payments`);
});

afterAll(async () => {
  await server?.stop();
  await maildev?.stop();
  await fake?.stop();
  if (dataSource?.isInitialized) await dataSource.destroy();
});

it('loses no confirmation and no e-mail when the server is killed mid-way through the webhooks', async () => {
  const lender = await makeLender(dataSource);
  const hospital = await makeHospital(dataSource);
  const buyer = toAuthContext({
    id: hospital.buyer.userId,
    email: hospital.buyer.email,
    name: hospital.buyer.name,
    memberships: [
      {
        organisationId: hospital.id,
        organisationName: hospital.name,
        organisationKind: 'hospital',
        role: 'buyer',
      },
    ],
  });
  const deps = createPaymentsDeps({
    config: loadConfig({
      ...process.env,
      EVALON_DB_NAME: database,
      EVALON_PAYMENTS_PORT: String(fake.port),
    }),
    dataSource,
    logger: createLogger('silent'),
  });

  // 20 approved loans, each with its payment page (our own deposit use case, through the SDK).
  const loanIds: number[] = [];
  const pages: string[] = [];
  for (let i = 0; i < loanCount; i++) {
    const loan = await insertApprovedLoan(dataSource, lender, hospital, {
      footprintDays: i % 2 === 0 ? 4 : 20,
    });
    loanIds.push(loan.id);
    const answer = await startDeposit(deps, buyer, loan.id, { method: 'card' });
    pages.push(answer.checkoutUrl!);
  }

  // Slow the provider's API (the webhook handler reads the intent through it), then pay all.
  await fake.control('POST', '/faults', { latencyMs: 150 });
  for (const page of pages) expect((await payOnHostedPage(page)).status).toBe(303);

  // Kill the server once some, not all, loans are confirmed.
  await waitUntil(
    'a few confirmations',
    async () =>
      (await count("SELECT COUNT(*) AS n FROM loans WHERE id IN (?) AND state = 'confirmed'", [
        loanIds,
      ])) >= 6,
    60_000,
  );
  server!.child.kill('SIGKILL');
  await new Promise<void>((resolve) => server!.child.once('exit', () => resolve()));
  server = undefined;
  const confirmedAtKill = await count(
    "SELECT COUNT(*) AS n FROM loans WHERE id IN (?) AND state = 'confirmed'",
    [loanIds],
  );
  const brokenAtKill = await brokenConfirmations(loanIds);
  // While the server is down the provider's deliveries fail and are scheduled again.
  await new Promise((r) => setTimeout(r, 1_500));
  const down = await fakeState(fake);
  const refusedWhileDown = down.deliveries.reduce(
    (n, d) => n + d.attempts.filter((a) => a.status === null).length,
    0,
  );

  await fake.control('POST', '/faults', { latencyMs: 0 });
  server = await startServer();
  await flushWebhooks(fake, 120_000);
  await waitUntil(
    'the outbox drained',
    async () =>
      (await count('SELECT COUNT(*) AS n FROM notice_jobs')) === 0 &&
      (await count(
        `SELECT COUNT(*) AS n FROM outbox_messages WHERE status <> 'sent' AND dedupe_key LIKE 'loan:%:confirmed:%'`,
      )) === 0,
    120_000,
  );

  const confirmedAtEnd = await count(
    "SELECT COUNT(*) AS n FROM loans WHERE id IN (?) AND state = 'confirmed'",
    [loanIds],
  );
  const confirmationEvents = await count(
    "SELECT COUNT(*) AS n FROM loan_events WHERE loan_id IN (?) AND to_state = 'confirmed'",
    [loanIds],
  );
  const securing = await count(
    'SELECT COUNT(*) AS n FROM payments WHERE loan_id IN (?) AND secures_loan = 1',
    [loanIds],
  );
  const emails = await count(
    "SELECT COUNT(*) AS n FROM outbox_messages WHERE dedupe_key LIKE 'loan:%:confirmed:user:%'",
  );
  const duplicates = await count(
    "SELECT COUNT(*) AS n FROM payment_events WHERE loan_id IN (?) AND outcome = 'recorded'",
    [loanIds],
  );
  const caught = (await (await fetch(`http://127.0.0.1:${webPort}/api/email`)).json()) as {
    headers: Record<string, string | string[]>;
  }[];
  const messageIds = new Set(
    caught.map((m) => [m.headers['message-id']].flat()[0]).filter((id) => id !== undefined),
  );
  const end = await fakeState(fake);
  const paidIntents = end.paymentIntents.filter(
    (pi) => pi.status === 'succeeded' || pi.status === 'requires_capture',
  ).length;
  process.stdout.write(
    `payments crash: ${confirmedAtKill}/${loanCount} confirmed when SIGKILL landed ` +
      `(${brokenAtKill} confirmed without payment row or e-mails or notice job); ${refusedWhileDown} delivery ` +
      `attempts refused while down; after restart ${confirmedAtEnd}/${loanCount} confirmed, ` +
      `${confirmationEvents} confirmation events, ${securing} securing payment rows, ` +
      `${paidIntents} paid intents at the provider, ${duplicates} later events found the loan ` +
      `done; ${emails} confirmation e-mails in the outbox, all sent; maildev caught ` +
      `${caught.length} (${messageIds.size} distinct Message-IDs)\n`,
  );
  expect(confirmedAtKill).toBeGreaterThan(0);
  expect(confirmedAtKill).toBeLessThan(loanCount);
  expect(brokenAtKill).toBe(0);
  expect(confirmedAtEnd).toBe(loanCount);
  expect(confirmationEvents).toBe(loanCount);
  expect(securing).toBe(loanCount);
  expect(paidIntents).toBe(loanCount);
  expect(await brokenConfirmations(loanIds)).toBe(0);
  // Buyer, clinician and coordinator for each loan; every e-mail arrived. A message the killed
  // worker was handing to SMTP at the kill may arrive twice (the outbox is at-least-once across
  // a crash), with the same Message-ID, so the distinct Message-IDs are counted.
  expect(emails).toBe(loanCount * 3);
  expect(messageIds.size).toBe(emails);
  expect(caught.length).toBeLessThanOrEqual(emails + 1);
});
