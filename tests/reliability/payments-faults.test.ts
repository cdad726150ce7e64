import { startTestApp, type TestApp } from '../../server/test/helpers/app';
import { makeHospital, makeLender } from '../../server/test/helpers/catalog';
import { signedInClient, type Client } from '../../server/test/helpers/http';
import {
  fakeState,
  flushWebhooks,
  insertApprovedLoan,
  listen,
  payOnHostedPage,
  registerWebhook,
  startPaymentsFake,
  type RunningFake,
} from '../../server/test/helpers/payments';

// Reliability: the payment provider fails 30 % of the API calls while 20 loans go through
// deposit and payment. Real parts only: the payments fake as a child process
// (infra/fakes/payments, its fault switch `POST /__fake/faults {errorRate: 0.3, rngStart}` makes
// the failures repeatable), the app listening on loopback with the real database, the SDK with
// its 2 automatic retries. Buyers retry a failed request as a person would (up to 10 times).
// Two rounds of 10 loans: faults `before` (the call fails before the provider changes anything)
// and `after` (the provider applies the call, then the answer is lost: only the idempotency key
// stops a second session or charge).
//
// Invariants: no loan confirmed without a recorded payment that covers it; no deposit charged
// (or held) twice: at most one paid intent per loan at the provider; one confirmation event per
// loan. Every loan ends confirmed once the provider's re-deliveries have gone through.

jest.setTimeout(240_000);

let t: TestApp;
let fake: RunningFake;
let server: { url: string; close(): Promise<void> };

beforeAll(async () => {
  fake = await startPaymentsFake();
  t = await startTestApp(
    { EVALON_PAYMENTS_PORT: String(fake.port), EVALON_DEPOSIT_EXPIRY_JOB: 'off' },
    { outboxWorker: false },
  );
  server = await listen(t.app);
  await registerWebhook(fake, `${server.url}/api/webhooks/payments`);
});
afterAll(async () => {
  await server?.close();
  await t?.close();
  await fake?.stop();
});

/** Calls `request` until it answers something other than a 5xx, at most `tries` times. */
async function retried(
  tries: number,
  request: () => Promise<{ status: number; body: Record<string, unknown> }>,
  statuses: number[],
) {
  for (let i = 1; ; i++) {
    const res = await request();
    statuses.push(res.status);
    if (res.status < 500 || i >= tries) return res;
    await new Promise((r) => setTimeout(r, 50 * i));
  }
}

async function round(mode: 'before' | 'after', rngStart: number) {
  const lender = await makeLender(t.dataSource);
  const hospital = await makeHospital(t.dataSource);
  const buyer: Client = await signedInClient(t.app, hospital.buyer.email, hospital.buyer.password);
  const loans: number[] = [];
  for (let i = 0; i < 10; i++) {
    // Half fit the 7-day authorisation window (hold), half do not (charge).
    const loan = await insertApprovedLoan(t.dataSource, lender, hospital, {
      footprintDays: i % 2 === 0 ? 4 : 20,
      depositAmount: 150_000 + i * 1_000,
    });
    loans.push(loan.id);
  }
  await fake.control('POST', '/faults', { errorRate: 0.3, errorMode: mode, rngStart });
  const statuses: number[] = [];

  // Every buyer asks for the payment page (retrying 5xx), pays it, and comes back to the
  // success page, which asks the server to reconcile (retrying 5xx too).
  await Promise.all(
    loans.map(async (id) => {
      const deposit = await retried(
        10,
        async () => {
          const r = await buyer.agent
            .post(`/api/loans/${id}/deposit`)
            .set('X-XSRF-TOKEN', buyer.csrf)
            .send({ method: 'card' });
          return { status: r.status, body: r.body };
        },
        statuses,
      );
      expect(deposit.status).toBe(200);
      const paid = await payOnHostedPage(String(deposit.body.checkoutUrl));
      expect(paid.status).toBe(303);
      await retried(
        10,
        async () => {
          const r = await buyer.agent
            .post(`/api/loans/${id}/deposit/refresh`)
            .set('X-XSRF-TOKEN', buyer.csrf)
            .send({});
          return { status: r.status, body: r.body };
        },
        statuses,
      );
    }),
  );
  // The provider keeps re-delivering webhooks that met a 5xx (our SDK read failed) until 2xx.
  await flushWebhooks(fake, 60_000);
  const injected = (await fake.control<{ injected: number }>('GET', '/faults')).injected;
  await fake.control('POST', '/faults', { errorRate: 0, rngStart: null });
  await flushWebhooks(fake, 60_000);
  return { loans, statuses, injected };
}

it('keeps money and loans consistent while 30 % of provider calls fail', async () => {
  const rounds = [await round('before', 3_030), await round('after', 7_070)];
  const state = await fakeState(fake);
  const lines: string[] = [];
  for (const [i, r] of rounds.entries()) {
    const mode = i === 0 ? 'before' : 'after';
    let confirmed = 0;
    let maxPaidIntents = 0;
    let maxSessions = 0;
    for (const id of r.loans) {
      const [loan] = await t.dataSource.query(
        'SELECT state, deposit_amount FROM loans WHERE id = ?',
        [id],
      );
      const securing = await t.dataSource.query(
        "SELECT status, amount_authorised, amount_captured FROM payments WHERE loan_id = ? AND secures_loan = 1 AND status IN ('authorised', 'captured')",
        [id],
      );
      const events = await t.dataSource.query(
        "SELECT COUNT(*) AS n FROM loan_events WHERE loan_id = ? AND to_state = 'confirmed'",
        [id],
      );
      const paidIntents = state.paymentIntents.filter(
        (pi) =>
          pi.metadata.loanId === String(id) &&
          (pi.status === 'succeeded' || pi.status === 'requires_capture'),
      );
      const sessions = state.checkoutSessions.filter((s) => s.metadata.loanId === String(id));
      maxPaidIntents = Math.max(maxPaidIntents, paidIntents.length);
      maxSessions = Math.max(maxSessions, sessions.length);
      if (loan.state === 'confirmed') {
        confirmed += 1;
        // Never confirmed without a recorded payment that covers the deposit.
        expect(securing).toHaveLength(1);
        const held = Number(securing[0].amount_authorised) + Number(securing[0].amount_captured);
        expect(held).toBeGreaterThanOrEqual(Number(loan.deposit_amount));
        expect(Number(events[0].n)).toBe(1);
      }
      // Never charged or held twice.
      expect(paidIntents.length).toBeLessThanOrEqual(1);
    }
    const fivexx = r.statuses.filter((s) => s >= 500).length;
    lines.push(
      `mode ${mode}: ${r.injected} provider calls failed on purpose; ${r.statuses.length} buyer requests, ` +
        `${fivexx} answered 5xx and were retried; ${confirmed}/${r.loans.length} loans confirmed; ` +
        `max checkout sessions per loan ${maxSessions}; max paid intents per loan ${maxPaidIntents}`,
    );
    expect(r.injected).toBeGreaterThan(0);
    expect(confirmed).toBe(r.loans.length);
    expect(maxPaidIntents).toBe(1);
  }
  const failedDeliveries = state.deliveries.filter((d) =>
    d.attempts.some((a) => a.status === null || a.status >= 500),
  ).length;
  const attempts = state.deliveries.reduce((n, d) => n + d.attempts.length, 0);
  lines.push(
    `webhooks: ${state.deliveries.length} deliveries, ${attempts} attempts, ` +
      `${failedDeliveries} needed a retry; ${state.deliveries.filter((d) => d.status !== 'delivered').length} not delivered`,
  );
  process.stdout.write(`payments under faults:\n  ${lines.join('\n  ')}\n`);
});
