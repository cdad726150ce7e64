// Deposits and confirmations against the real database and the REAL payments fake
// (infra/fakes/payments, a child process on a free port), driven through the provider's
// official SDK by the server. The app listens on a loopback port so that the fake's signed
// webhooks reach it, exactly as in production.
//
// Outside references used below (docs/references.md, "Money and payments", from
// the payment provider's public documentation): webhook header `t=<unix>,v1=<HMAC-SHA256>` with
// a default tolerance of 300 s; amounts in the smallest currency unit; online card
// authorisations valid 7 days.
import { addCalendarDays } from '@evalon/scheduling';
import { startTestApp, type TestApp } from './helpers/app';
import {
  countRows,
  makeHospital,
  makeLender,
  makeModel,
  makeUnit,
  mondayAfter,
  places,
  type TestHospital,
  type TestLender,
} from './helpers/catalog';
import { signedInClient, type Client } from './helpers/http';
import {
  cards,
  deliver,
  fakeState,
  flushWebhooks,
  insertApprovedLoan,
  listen,
  payOnHostedPage,
  registerWebhook,
  signedHeader,
  startPaymentsFake,
  type RunningFake,
} from './helpers/payments';
import { createPaymentsDeps, runDepositExpiry, settleDeposit } from '../src/payments';
import { createLogger } from '../src/logger';
import { loanNotifierFromConfig, renderDueNotices } from '../src/notifications';

jest.setTimeout(60_000);

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

/** The payments use cases on the test app's database and the fake (for the job and settlement). */
const paymentsDeps = () =>
  createPaymentsDeps({
    config: t.config,
    dataSource: t.dataSource,
    logger: createLogger('silent'),
  });

/** What the server's outbox worker does first on each pass: render the deferred notices. */
const renderNotices = () =>
  renderDueNotices(t.dataSource, {
    renderLoan: loanNotifierFromConfig(t.config),
    now: () => new Date(),
    logger: createLogger('silent'),
    batchSize: 100,
    maxAttempts: 3,
    backoff: { baseMs: 1000, capMs: 60_000 },
  });

const sign = (person: { email: string; password: string }) =>
  signedInClient(t.app, person.email, person.password);
const post = (c: Client, path: string, body: object = {}) =>
  c.agent.post(path).set('X-XSRF-TOKEN', c.csrf).send(body);

interface World {
  lender: TestLender;
  hospital: TestHospital;
  buyer: Client;
  fleet: Client;
}

async function world(): Promise<World> {
  const lender = await makeLender(t.dataSource, places.eastDepot);
  const hospital = await makeHospital(t.dataSource, places.bostonCampus);
  return { lender, hospital, buyer: await sign(hospital.buyer), fleet: await sign(lender.fleet) };
}

/** A loan requested through the API and approved by the fleet manager (footprint > 7 days). */
async function approvedLoan(
  w: World,
  daysAhead = 60,
): Promise<{ id: number; reference: string; deposit: number }> {
  const modelId = await makeModel(t.dataSource, w.lender.id);
  const unitId = await makeUnit(t.dataSource, modelId, w.lender.depotId);
  const useFrom = mondayAfter(daysAhead);
  const loan = (
    await post(w.buyer, '/api/loans', {
      siteId: w.hospital.campusId,
      unitIds: [unitId],
      useFrom,
      useTo: addCalendarDays(useFrom, 2),
    }).expect(201)
  ).body.loan;
  await post(w.fleet, `/api/loans/${loan.id}/approve`).expect(200);
  return { id: loan.id, reference: loan.reference, deposit: loan.deposit.amount };
}

const loanState = async (id: number) =>
  (await t.dataSource.query('SELECT state FROM loans WHERE id = ?', [id]))[0].state as string;
const confirmations = (id: number) =>
  countRows(t.dataSource, 'loan_events', "loan_id = ? AND to_state = 'confirmed'", [id]);
const sessionIdOf = (url: string) => new URL(url).pathname.split('/').pop()!;

describe('card deposit, end to end through the SDK and the fake', () => {
  it('checkout → hosted page → webhook → loan confirmed, payment recorded, e-mails with .ics', async () => {
    const w = await world();
    const clinician = w.hospital.clinician;
    const loan = await approvedLoan(w);

    const first = await post(w.buyer, `/api/loans/${loan.id}/deposit`, { method: 'card' }).expect(
      200,
    );
    expect(first.body).toMatchObject({
      outcome: 'checkout',
      waived: false,
      // The footprint (ship-by to ready-again) is longer than the 7-day authorisation window.
      strategy: 'charge_now_refund_later',
      deposit: { amount: loan.deposit, currency: 'USD' },
      loanState: 'approved',
    });
    expect(first.body.checkoutUrl).toMatch(new RegExp(`^${fake.base}/pay/cs_test_`));
    expect(Date.parse(first.body.depositDueAt)).toBeGreaterThan(Date.now());

    // Asking again hands out the same open page, not a second session.
    const again = await post(w.buyer, `/api/loans/${loan.id}/deposit`, { method: 'card' }).expect(
      200,
    );
    expect(again.body.checkoutUrl).toBe(first.body.checkoutUrl);
    const sessions = (await fakeState(fake)).checkoutSessions.filter(
      (s) => s.metadata.loanId === String(loan.id),
    );
    expect(sessions).toHaveLength(1);

    const paid = await payOnHostedPage(first.body.checkoutUrl, cards.success);
    expect(paid.status).toBe(303);
    const sessionId = sessionIdOf(first.body.checkoutUrl);
    expect(paid.location).toBe(
      `${t.config.http.publicUrl}/loans/${loan.id}?deposit=success&session=${sessionId}`,
    );
    await flushWebhooks(fake);

    expect(await loanState(loan.id)).toBe('confirmed');
    expect(await confirmations(loan.id)).toBe(1);
    const [row] = await t.dataSource.query(
      'SELECT kind, status, amount, amount_captured, secures_loan, checkout_session_id, payment_intent_id FROM payments WHERE loan_id = ?',
      [loan.id],
    );
    expect(row).toMatchObject({
      kind: 'charge',
      status: 'captured',
      amount: String(loan.deposit),
      amount_captured: String(loan.deposit),
      secures_loan: 1,
      checkout_session_id: sessionId,
    });
    const [loanRow] = await t.dataSource.query(
      'SELECT deposit_strategy, confirmed_at FROM loans WHERE id = ?',
      [loan.id],
    );
    expect(loanRow.deposit_strategy).toBe('charge_now_refund_later');
    expect(loanRow.confirmed_at).not.toBeNull();

    // The intent at the provider is the one recorded, for the full deposit.
    const intents = (await fakeState(fake)).paymentIntents.filter(
      (pi) => pi.metadata.loanId === String(loan.id),
    );
    expect(intents).toHaveLength(1);
    expect(intents[0]).toMatchObject({
      id: row.payment_intent_id,
      status: 'succeeded',
      amount_received: loan.deposit,
    });

    // A payment's confirmation renders its e-mails after the commit (the outbox worker's job,
    // off in this suite): none yet, one job waiting; rendered here as the worker would.
    expect(
      await countRows(t.dataSource, 'outbox_messages', 'dedupe_key LIKE ?', [
        `loan:${loan.id}:confirmed:user:%`,
      ]),
    ).toBe(0);
    expect(
      await countRows(t.dataSource, 'notice_jobs', 'dedupe_key = ?', [`loan:${loan.id}:confirmed`]),
    ).toBe(1);
    await renderNotices();
    expect(
      await countRows(t.dataSource, 'notice_jobs', 'dedupe_key = ?', [`loan:${loan.id}:confirmed`]),
    ).toBe(0);

    // Confirmation e-mails for buyer, clinician and coordinator, each with the calendar invite.
    const mails: { to: unknown; attachments: unknown }[] = await t.dataSource.query(
      'SELECT to_addresses AS `to`, attachments FROM outbox_messages WHERE dedupe_key LIKE ?',
      [`loan:${loan.id}:confirmed:user:%`],
    );
    const recipients = mails.map((m) => JSON.stringify(m.to));
    for (const person of [w.hospital.buyer, clinician, w.lender.coordinator]) {
      expect(recipients.some((r) => r.includes(person.email))).toBe(true);
    }
    for (const m of mails) {
      const attachments = (
        typeof m.attachments === 'string' ? JSON.parse(m.attachments) : m.attachments
      ) as {
        contentType: string;
        filename: string;
      }[];
      expect(attachments.some((a) => a.contentType.startsWith('text/calendar'))).toBe(true);
    }

    // Both parties see what was charged.
    for (const client of [w.buyer, w.fleet]) {
      const view = await client.agent.get(`/api/loans/${loan.id}/payments`).expect(200);
      expect(view.body).toMatchObject({
        loanState: 'confirmed',
        strategy: 'charge_now_refund_later',
        totals: { held: 0, charged: loan.deposit, refunded: 0 },
      });
      expect(view.body.payments).toHaveLength(1);
    }
    const again2 = await post(w.buyer, `/api/loans/${loan.id}/deposit`, { method: 'card' }).expect(
      200,
    );
    expect(again2.body.outcome).toBe('already_confirmed');
  });

  it('a declined card leaves the loan approved; the same page then takes a good card', async () => {
    const w = await world();
    const loan = await approvedLoan(w, 61);
    const { body } = await post(w.buyer, `/api/loans/${loan.id}/deposit`, {
      method: 'card',
    }).expect(200);
    const declined = await payOnHostedPage(body.checkoutUrl, cards.declined);
    expect(declined.status).toBe(402);
    await flushWebhooks(fake);
    expect(await loanState(loan.id)).toBe('approved');
    const [row] = await t.dataSource.query(
      'SELECT status, failure_code, secures_loan FROM payments WHERE loan_id = ?',
      [loan.id],
    );
    expect(row).toEqual({ status: 'failed', failure_code: 'generic_decline', secures_loan: 0 });
    expect(await confirmations(loan.id)).toBe(0);

    // The page is still open: the buyer gets it again and pays with another card.
    const retry = await post(w.buyer, `/api/loans/${loan.id}/deposit`, { method: 'card' }).expect(
      200,
    );
    expect(retry.body.checkoutUrl).toBe(body.checkoutUrl);
    expect((await payOnHostedPage(retry.body.checkoutUrl, cards.success)).status).toBe(303);
    await flushWebhooks(fake);
    expect(await loanState(loan.id)).toBe('confirmed');
    expect(await countRows(t.dataSource, 'payments', 'loan_id = ?', [loan.id])).toBe(1);
  });

  it('holds the deposit on the card when the whole footprint fits the 7-day window, and settles it', async () => {
    const w = await world();
    // Ships tomorrow, ready again 4 days later: ends well inside 7 days from now.
    const loan = await insertApprovedLoan(t.dataSource, w.lender, w.hospital, {
      shipInDays: 1,
      footprintDays: 4,
      depositAmount: 250_000,
    });
    const { body } = await post(w.buyer, `/api/loans/${loan.id}/deposit`, {
      method: 'card',
    }).expect(200);
    expect(body.strategy).toBe('authorise_hold');
    expect((await payOnHostedPage(body.checkoutUrl)).status).toBe(303);
    await flushWebhooks(fake);
    expect(await loanState(loan.id)).toBe('confirmed');
    const intent = (await fakeState(fake)).paymentIntents.find(
      (pi) => pi.metadata.loanId === String(loan.id),
    )!;
    expect(intent).toMatchObject({
      status: 'requires_capture',
      capture_method: 'manual',
      amount_capturable: 250_000,
    });
    const view = await w.buyer.agent.get(`/api/loans/${loan.id}/payments`).expect(200);
    expect(view.body.totals).toEqual({ held: 250_000, charged: 0, refunded: 0 });
    expect(view.body.strategy).toBe('authorise_hold');

    // Settlement: 600.00 of inspection charges captured, the rest of the hold released.
    const settled = await settleDeposit(paymentsDeps(), loan.id, [
      { reason: 'Scratched housing', amount: 60_000 },
    ]);
    expect(settled).toMatchObject({
      strategy: 'hold',
      kept: 60_000,
      returned: 190_000,
      uncovered: 0,
    });
    const after = (await fakeState(fake)).paymentIntents.find((pi) => pi.id === intent.id)!;
    expect(after).toMatchObject({ status: 'succeeded', amount_received: 60_000 });
    await expect(settleDeposit(paymentsDeps(), loan.id, [])).rejects.toMatchObject({
      code: 'already_settled',
    });
  });

  it('settles a charged deposit: charges deducted, never more than was paid, the rest refunded', async () => {
    const w = await world();
    const loans = [
      await insertApprovedLoan(t.dataSource, w.lender, w.hospital, {
        footprintDays: 20,
        depositAmount: 200_000,
      }),
      await insertApprovedLoan(t.dataSource, w.lender, w.hospital, {
        footprintDays: 20,
        depositAmount: 200_000,
      }),
    ];
    for (const loan of loans) {
      const { body } = await post(w.buyer, `/api/loans/${loan.id}/deposit`, {
        method: 'card',
      }).expect(200);
      expect(body.strategy).toBe('charge_now_refund_later');
      await payOnHostedPage(body.checkoutUrl);
    }
    await flushWebhooks(fake);
    const small = await settleDeposit(paymentsDeps(), loans[0]!.id, [
      { reason: 'Missing cable', amount: 50_000 },
    ]);
    expect(small).toMatchObject({ kept: 50_000, returned: 150_000, uncovered: 0 });
    const large = await settleDeposit(paymentsDeps(), loans[1]!.id, [
      { reason: 'Cracked optics', amount: 180_000 },
      { reason: 'Lost tray', amount: 120_000 },
    ]);
    expect(large).toMatchObject({ kept: 200_000, returned: 0, uncovered: 100_000 });

    const state = await fakeState(fake);
    for (const [loan, refunded] of [
      [loans[0]!, 150_000],
      [loans[1]!, 0],
    ] as const) {
      const pi = state.paymentIntents.find((p) => p.metadata.loanId === String(loan.id))!;
      const charge = state.charges.find((c) => c.payment_intent === pi.id)!;
      expect(charge.amount_refunded).toBe(refunded);
      expect(charge.amount_refunded).toBeLessThanOrEqual(charge.amount);
    }
    const [row] = await t.dataSource.query(
      'SELECT status, amount_captured, amount_refunded FROM payments WHERE loan_id = ? AND secures_loan = 1',
      [loans[0]!.id],
    );
    expect(row).toEqual({
      status: 'partially_refunded',
      amount_captured: '200000',
      amount_refunded: '150000',
    });
    expect(
      await countRows(t.dataSource, 'refunds', "loan_id = ? AND reason = 'settlement'", [
        loans[0]!.id,
      ]),
    ).toBe(1);
  });

  it('confirms a loan with nothing to pay at once', async () => {
    const w = await world();
    const loan = await insertApprovedLoan(t.dataSource, w.lender, w.hospital, { depositAmount: 0 });
    const { body } = await post(w.buyer, `/api/loans/${loan.id}/deposit`, {
      method: 'card',
    }).expect(200);
    expect(body).toMatchObject({
      outcome: 'no_deposit',
      loanState: 'confirmed',
      checkoutUrl: null,
    });
    expect(await confirmations(loan.id)).toBe(1);
  });
});

describe('credit agreement and refusals', () => {
  it('409 without an agreement, 422 without a PO; with one, confirmed at once with a waived row', async () => {
    const w = await world();
    const loan = await approvedLoan(w, 62);
    const none = await post(w.buyer, `/api/loans/${loan.id}/deposit`, {
      method: 'credit_agreement',
      purchaseOrderNumber: 'PO-1001',
    }).expect(409);
    expect(none.body.error.code).toBe('no_credit_agreement');

    // The lender's fleet manager turns the agreement on; a coordinator may read it.
    const put = await w.fleet.agent
      .put(`/api/lenders/${w.lender.id}/credit-agreements/${w.hospital.id}`)
      .set('X-XSRF-TOKEN', w.fleet.csrf)
      .send({ active: true })
      .expect(200);
    expect(put.body.creditAgreement).toMatchObject({
      hospitalId: w.hospital.id,
      active: true,
      approvedBy: w.lender.fleet.name,
    });
    const coordinator = await sign(w.lender.coordinator);
    const list = await coordinator.agent
      .get(`/api/lenders/${w.lender.id}/credit-agreements`)
      .expect(200);
    expect(list.body.items).toHaveLength(1);
    await coordinator.agent
      .put(`/api/lenders/${w.lender.id}/credit-agreements/${w.hospital.id}`)
      .set('X-XSRF-TOKEN', coordinator.csrf)
      .send({ active: false })
      .expect(403);

    const noPo = await post(w.buyer, `/api/loans/${loan.id}/deposit`, {
      method: 'credit_agreement',
      purchaseOrderNumber: '   ',
    }).expect(422);
    expect(noPo.body.error.details.fieldErrors.purchaseOrderNumber).toBeDefined();
    expect(await loanState(loan.id)).toBe('approved');

    const ok = await post(w.buyer, `/api/loans/${loan.id}/deposit`, {
      method: 'credit_agreement',
      purchaseOrderNumber: ' PO-1001 ',
    }).expect(200);
    expect(ok.body).toMatchObject({
      outcome: 'waived',
      waived: true,
      loanState: 'confirmed',
      strategy: 'credit_agreement',
    });
    const [row] = await t.dataSource.query(
      'SELECT l.state, l.purchase_order_number, l.deposit_strategy, p.kind, p.status, p.amount, p.secures_loan FROM loans l JOIN payments p ON p.loan_id = l.id WHERE l.id = ?',
      [loan.id],
    );
    expect(row).toEqual({
      state: 'confirmed',
      purchase_order_number: 'PO-1001',
      deposit_strategy: 'credit_agreement',
      kind: 'waived',
      status: 'waived',
      amount: '0',
      secures_loan: 1,
    });
    const [event] = await t.dataSource.query(
      "SELECT actor_user_id, reason FROM loan_events WHERE loan_id = ? AND to_state = 'confirmed'",
      [loan.id],
    );
    expect(event).toEqual({
      actor_user_id: w.hospital.buyer.userId,
      reason: expect.stringContaining('PO-1001'),
    });
    expect(
      await countRows(t.dataSource, 'outbox_messages', 'dedupe_key LIKE ?', [
        `loan:${loan.id}:confirmed:user:%`,
      ]),
    ).toBeGreaterThanOrEqual(3);
    expect(
      await countRows(
        t.dataSource,
        'audit_events',
        "action = 'loan.deposit_waived' AND subject = ?",
        [`loan:${loan.id}`],
      ),
    ).toBe(1);
  });

  it('refuses: not approved (409), another hospital (404), the lender side (403)', async () => {
    const w = await world();
    const modelId = await makeModel(t.dataSource, w.lender.id);
    const unitId = await makeUnit(t.dataSource, modelId, w.lender.depotId);
    const useFrom = mondayAfter(63);
    const requested = (
      await post(w.buyer, '/api/loans', {
        siteId: w.hospital.campusId,
        unitIds: [unitId],
        useFrom,
        useTo: useFrom,
      }).expect(201)
    ).body.loan;
    const notApproved = await post(w.buyer, `/api/loans/${requested.id}/deposit`, {
      method: 'card',
    }).expect(409);
    expect(notApproved.body.error).toMatchObject({ code: 'illegal_transition' });
    expect(notApproved.body.error.message).toContain('(requested)');

    const other = await world();
    await post(other.buyer, `/api/loans/${requested.id}/deposit`, { method: 'card' }).expect(404);
    await post(w.fleet, `/api/loans/${requested.id}/deposit`, { method: 'card' }).expect(403);
    await other.buyer.agent.get(`/api/loans/${requested.id}/payments`).expect(404);
    await post(w.buyer, `/api/loans/${requested.id}/deposit`, { method: 'cash' }).expect(422);
  });
});

describe('webhooks', () => {
  /** Pays a fresh loan while the fake's endpoint wants no events, so the test delivers them. */
  async function paidButUndelivered(w: World, daysAhead: number) {
    const loan = await approvedLoan(w, daysAhead);
    const { body } = await post(w.buyer, `/api/loans/${loan.id}/deposit`, {
      method: 'card',
    }).expect(200);
    await registerWebhook(fake, `${server.url}/api/webhooks/payments`, ['no.such.event']);
    try {
      expect((await payOnHostedPage(body.checkoutUrl)).status).toBe(303);
    } finally {
      await registerWebhook(fake, `${server.url}/api/webhooks/payments`);
    }
    const events = (await fakeState(fake)).events.filter(
      (e) =>
        (e.data.object.metadata as Record<string, string> | undefined)?.loanId === String(loan.id),
    );
    return { loan, events, sessionId: sessionIdOf(body.checkoutUrl) };
  }

  it('the same event delivered 5 times (at once) makes one state change', async () => {
    const w = await world();
    const { loan, events } = await paidButUndelivered(w, 64);
    const completed = events.find((e) => e.type === 'checkout.session.completed')!;
    expect(completed).toBeDefined();
    const payload = JSON.stringify(completed);
    const answers = await Promise.all(
      Array.from({ length: 5 }, () => deliver(server.url, payload, signedHeader(payload))),
    );
    expect(answers.map((a) => a.status)).toEqual([200, 200, 200, 200, 200]);
    const outcomes = answers.map((a) => a.body.outcome).sort();
    expect(outcomes).toEqual(['confirmed', 'duplicate', 'duplicate', 'duplicate', 'duplicate']);
    expect(await confirmations(loan.id)).toBe(1);
    expect(
      await countRows(t.dataSource, 'payment_events', 'provider_event_id = ?', [completed.id]),
    ).toBe(1);
    // The other events of the payment (intent succeeded) find the loan confirmed already.
    for (const e of events.filter((x) => x.id !== completed.id)) {
      const body = JSON.stringify(e);
      expect((await deliver(server.url, body, signedHeader(body))).status).toBe(200);
    }
    expect(await confirmations(loan.id)).toBe(1);
    expect(await countRows(t.dataSource, 'payments', 'loan_id = ?', [loan.id])).toBe(1);
  });

  it('400 for a tampered body, a stale timestamp or no signature; nothing changes', async () => {
    const w = await world();
    const { loan, events } = await paidButUndelivered(w, 65);
    const completed = events.find((e) => e.type === 'payment_intent.succeeded')!;
    const payload = JSON.stringify(completed);
    const tampered = payload.replace(/"amount":(\d+)/, '"amount":1');
    expect(tampered).not.toBe(payload);
    const staleAt = Math.floor(Date.now() / 1000) - 301; // past the 300 s tolerance
    for (const [body, header] of [
      [tampered, signedHeader(payload)],
      [payload, signedHeader(payload, staleAt)],
      [payload, null],
      [payload, signedHeader(payload).replace(/v1=[0-9a-f]+/, `v1=${'0'.repeat(64)}`)],
    ] as const) {
      const answer = await deliver(server.url, body, header);
      expect(answer.status).toBe(400);
      expect(answer.body.error?.code).toBe('invalid_signature');
    }
    expect(await loanState(loan.id)).toBe('approved');
    expect(
      await countRows(t.dataSource, 'payment_events', 'provider_event_id = ?', [completed.id]),
    ).toBe(0);
    const [row] = await t.dataSource.query('SELECT status FROM payments WHERE loan_id = ?', [
      loan.id,
    ]);
    expect(row.status).toBe('pending');
  });

  it('the success redirect reconciles before the webhook; the late webhook changes nothing', async () => {
    const w = await world();
    const { loan, events, sessionId } = await paidButUndelivered(w, 66);
    expect(await loanState(loan.id)).toBe('approved');
    const refreshed = await post(w.buyer, `/api/loans/${loan.id}/deposit/refresh`, {
      sessionId,
    }).expect(200);
    expect(refreshed.body).toMatchObject({
      loanState: 'confirmed',
      totals: { charged: loan.deposit },
    });
    for (const e of events) {
      const body = JSON.stringify(e);
      expect((await deliver(server.url, body, signedHeader(body))).status).toBe(200);
    }
    expect(await confirmations(loan.id)).toBe(1);
    expect(await countRows(t.dataSource, 'payments', 'loan_id = ?', [loan.id])).toBe(1);
  });

  it('money for a loan cancelled before the webhook arrives is refunded, not kept', async () => {
    const w = await world();
    const { loan, events } = await paidButUndelivered(w, 67);
    await post(w.buyer, `/api/loans/${loan.id}/cancel`, {
      reason: 'Cases moved to next quarter',
    }).expect(200);
    for (const e of events) {
      const body = JSON.stringify(e);
      expect((await deliver(server.url, body, signedHeader(body))).status).toBe(200);
    }
    expect(await loanState(loan.id)).toBe('cancelled');
    const [row] = await t.dataSource.query(
      'SELECT status, amount_captured, amount_refunded, secures_loan FROM payments WHERE loan_id = ?',
      [loan.id],
    );
    expect(row).toEqual({
      status: 'refunded',
      amount_captured: String(loan.deposit),
      amount_refunded: String(loan.deposit),
      secures_loan: 0,
    });
    const state = await fakeState(fake);
    const pi = state.paymentIntents.find((p) => p.metadata.loanId === String(loan.id))!;
    expect(state.refunds.filter((r) => r.payment_intent === pi.id).map((r) => r.amount)).toEqual([
      loan.deposit,
    ]);
    expect(
      await countRows(t.dataSource, 'refunds', "loan_id = ? AND reason = 'loan_not_active'", [
        loan.id,
      ]),
    ).toBe(1);
    expect(await confirmations(loan.id)).toBe(0);
  });
});

describe('deposit expiry job', () => {
  it('expires overdue approved loans once, releases unit holds and closes the page, even with two runners', async () => {
    const w = await world();
    const withPage = await approvedLoan(w, 68);
    const withoutPage = await approvedLoan(w, 69);
    const { body } = await post(w.buyer, `/api/loans/${withPage.id}/deposit`, {
      method: 'card',
    }).expect(200);
    const sessionId = sessionIdOf(body.checkoutUrl);
    expect(
      await countRows(t.dataSource, 'holds', 'loan_id IN (?, ?)', [withPage.id, withoutPage.id]),
    ).toBe(2);
    await t.dataSource.query('UPDATE loans SET deposit_due_at = ? WHERE id IN (?, ?)', [
      new Date(Date.now() - 60_000),
      withPage.id,
      withoutPage.id,
    ]);

    // Two runners at once: a loan one of them holds is skipped by the other (SKIP LOCKED), so
    // between them each loan is expired at most once; a later run picks up what both skipped.
    const runs = await Promise.all([
      runDepositExpiry(paymentsDeps()),
      runDepositExpiry(paymentsDeps()),
    ]);
    runs.push(await runDepositExpiry(paymentsDeps()));
    const expired = runs
      .flatMap((r) => r.expired)
      .filter((id) => id === withPage.id || id === withoutPage.id);
    expect(expired.sort()).toEqual([withPage.id, withoutPage.id].sort());

    for (const loan of [withPage, withoutPage]) {
      expect(await loanState(loan.id)).toBe('expired');
      expect(
        await countRows(t.dataSource, 'loan_events', "loan_id = ? AND to_state = 'expired'", [
          loan.id,
        ]),
      ).toBe(1);
      expect(await countRows(t.dataSource, 'holds', 'loan_id = ?', [loan.id])).toBe(0);
      expect(
        await countRows(t.dataSource, 'outbox_messages', 'dedupe_key LIKE ?', [
          `loan:${loan.id}:expired:user:%`,
        ]),
      ).toBeGreaterThanOrEqual(2);
    }
    const session = (await fakeState(fake)).checkoutSessions.find((s) => s.id === sessionId)!;
    expect(session.status).toBe('expired');
    const [row] = await t.dataSource.query('SELECT status FROM payments WHERE loan_id = ?', [
      withPage.id,
    ]);
    expect(row.status).toBe('cancelled');
    // The hosted page refuses payment now (410 Gone).
    expect((await payOnHostedPage(body.checkoutUrl)).status).toBe(410);
    await post(w.buyer, `/api/loans/${withPage.id}/deposit`, { method: 'card' }).expect(409);
  });

  it('a hold placed for a loan that expired meanwhile is cancelled at the provider', async () => {
    const w = await world();
    const loan = await insertApprovedLoan(t.dataSource, w.lender, w.hospital, { footprintDays: 4 });
    const { body } = await post(w.buyer, `/api/loans/${loan.id}/deposit`, {
      method: 'card',
    }).expect(200);
    expect(body.strategy).toBe('authorise_hold');
    await registerWebhook(fake, `${server.url}/api/webhooks/payments`, ['no.such.event']);
    try {
      await payOnHostedPage(body.checkoutUrl);
    } finally {
      await registerWebhook(fake, `${server.url}/api/webhooks/payments`);
    }
    // The loan dies another way before the webhook (set directly: the race the release covers).
    await t.dataSource.query("UPDATE loans SET state = 'expired' WHERE id = ?", [loan.id]);
    const events = (await fakeState(fake)).events.filter(
      (e) =>
        (e.data.object.metadata as Record<string, string> | undefined)?.loanId === String(loan.id),
    );
    for (const e of events) {
      const payload = JSON.stringify(e);
      expect((await deliver(server.url, payload, signedHeader(payload))).status).toBe(200);
    }
    const pi = (await fakeState(fake)).paymentIntents.find(
      (p) => p.metadata.loanId === String(loan.id),
    )!;
    expect(pi.status).toBe('canceled');
    const [row] = await t.dataSource.query(
      'SELECT status, secures_loan FROM payments WHERE loan_id = ?',
      [loan.id],
    );
    expect(row).toEqual({ status: 'cancelled', secures_loan: 0 });
  });
});
