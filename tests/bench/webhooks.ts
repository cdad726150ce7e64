// `npm run bench:webhooks`: latency of the payment webhook under a burst. 50 approved loans each
// wait for their card payment; 50 DISTINCT signed `payment_intent.succeeded` events (as the
// provider sends them, signed with the SDK's own helper) are fired at once at the server (a child
// process, `node --import tsx server/src/main.ts`, on a dedicated database). Each one goes the
// whole way: signature check, event id recorded, loan and payment rows locked, loan confirmed,
// its shipments created, the notice job recorded (the outbox worker renders the e-mails, the
// calendar invite and the in-app notifications after the commit; it is off here), commit. Prints p50, p97.5 (nearest rank) and max, and checks that 50 loans were
// confirmed. A script, not a timed test: it prints what one run measured.
import mysql from 'mysql2/promise';
import PaymentsSdk from 'stripe';
import { loadConfig } from '../../server/src/config';
import { createDataSource } from '../../server/src/database/data-source';
import { insertPayment } from '../../server/src/payments/data-access/payment-repository';
import { makeHospital, makeLender } from '../../server/test/helpers/catalog';
import { insertApprovedLoan, webhookSecret } from '../../server/test/helpers/payments';
import { freePort, startNode } from '../../server/test/helpers/processes';

const DELIVERIES = Number(process.env.BENCH_WEBHOOKS ?? 50);
const database = process.env.EVALON_BENCH_DB_NAME ?? 'evalon_test_bench_webhooks';

const serverNodeArgs = (process.env.BENCH_SERVER_NODE_ARGS ?? '').split(/\s+/).filter(Boolean);

const say = (msg: string) => process.stdout.write(`[bench] ${msg}\n`);

/** Nearest-rank percentile of sorted values. */
function percentile(sorted: number[], p: number): number {
  return sorted[Math.max(0, Math.ceil((p / 100) * sorted.length) - 1)]!;
}

function event(id: string, type: string, object: Record<string, unknown>) {
  return JSON.stringify({
    id,
    object: 'event',
    api_version: PaymentsSdk.API_VERSION,
    created: Math.floor(Date.now() / 1000),
    data: { object },
    livemode: false,
    pending_webhooks: 1,
    request: { id: null, idempotency_key: null },
    type,
  });
}

async function post(url: string, payload: string): Promise<{ status: number; ms: number }> {
  const signature = PaymentsSdk.webhooks.generateTestHeaderString({
    payload,
    secret: webhookSecret,
  });
  const started = performance.now();
  const res = await fetch(url, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'stripe-signature': signature },
    body: payload,
  });
  await res.text();
  return { status: res.status, ms: performance.now() - started };
}

async function main(): Promise<void> {
  const config = loadConfig({
    ...process.env,
    EVALON_DB_NAME: database,
    EVALON_LOG_LEVEL: 'silent',
  });
  const admin = await mysql.createConnection({
    host: config.db.host,
    port: config.db.port,
    user: config.db.user,
    password: config.db.password,
  });
  await admin.query(`DROP DATABASE IF EXISTS \`${database}\``);
  await admin.query(
    `CREATE DATABASE \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
  );
  await admin.end();
  const ds = createDataSource(config.db);
  await ds.initialize();
  await ds.runMigrations({ transaction: 'each' });

  say(`loading ${DELIVERIES} approved loans waiting for their card payment`);
  const lender = await makeLender(ds);
  const hospital = await makeHospital(ds);
  const loans: { loanId: number; paymentId: number; amount: number }[] = [];
  for (let i = 0; i < DELIVERIES; i++) {
    const amount = 100_000 + i;
    const loan = await insertApprovedLoan(ds, lender, hospital, {
      footprintDays: 20,
      depositAmount: amount,
    });
    const paymentId = await insertPayment(
      ds.manager,
      {
        loanId: loan.id,
        provider: 'processor',
        kind: 'charge',
        status: 'pending',
        amount,
        currency: 'USD',
        createdByUserId: hospital.buyer.userId,
      },
      new Date(),
    );
    loans.push({ loanId: loan.id, paymentId, amount });
  }

  const port = await freePort();
  say('starting the server (node --import tsx server/src/main.ts)');
  const server = await startNode(
    // BENCH_SERVER_NODE_ARGS, e.g. `--cpu-prof --cpu-prof-dir=/tmp/prof`, to profile the server.
    [...serverNodeArgs, '--import', 'tsx', 'server/src/main.ts'],
    {
      NODE_ENV: 'test',
      EVALON_PORT: String(port),
      EVALON_DB_NAME: database,
      EVALON_LOG_LEVEL: 'info',
      // Only the webhook is measured: no e-mail sending, no expiry job beside it.
      EVALON_OUTBOX_WORKER: 'off',
      EVALON_DEPOSIT_EXPIRY_JOB: 'off',
    },
    /Evalon server listening/,
    120_000,
  ).catch(async (err: unknown) => {
    await ds.destroy();
    throw err;
  });
  const url = `http://127.0.0.1:${port}/api/webhooks/payments`;
  try {
    // Warm-up: 10 events of a type we only record (connections, JIT, pools).
    await Promise.all(
      Array.from({ length: 10 }, (_, i) =>
        post(
          url,
          event(`evt_bench_warm_${Date.now()}_${i}`, 'customer.created', { id: `cus_${i}` }),
        ),
      ),
    );
    const payloads = loans.map((l, i) =>
      event(`evt_bench_${Date.now()}_${i}`, 'payment_intent.succeeded', {
        id: `pi_bench_${Date.now()}_${i}`,
        object: 'payment_intent',
        amount: l.amount,
        amount_capturable: 0,
        amount_received: l.amount,
        capture_method: 'automatic',
        currency: 'usd',
        last_payment_error: null,
        metadata: { loanId: String(l.loanId), paymentId: String(l.paymentId) },
        status: 'succeeded',
      }),
    );
    const started = performance.now();
    const results = await Promise.all(payloads.map((p) => post(url, p)));
    const wall = performance.now() - started;
    const sorted = results.map((r) => r.ms).sort((a, b) => a - b);
    const ok = results.filter((r) => r.status === 200).length;
    const [row] = await ds.query(
      `SELECT COUNT(*) AS n FROM loans WHERE id IN (?) AND state = 'confirmed'`,
      [loans.map((l) => l.loanId)],
    );
    say(
      `${DELIVERIES} concurrent signed deliveries of distinct events: ${ok} × 200, ` +
        `${Number(row.n)} loans confirmed, wall ${wall.toFixed(0)} ms`,
    );
    say(
      `latency p50 ${percentile(sorted, 50).toFixed(1)} ms, p97.5 ${percentile(sorted, 97.5).toFixed(1)} ms, ` +
        `max ${sorted[sorted.length - 1]!.toFixed(1)} ms`,
    );
    if (ok !== DELIVERIES || Number(row.n) !== DELIVERIES) process.exitCode = 1;
  } finally {
    await server.stop();
    await ds.destroy();
  }
}

main().catch((err: unknown) => {
  process.stderr.write(`[bench] failed: ${(err as Error).stack ?? String(err)}\n`);
  process.exit(1);
});
