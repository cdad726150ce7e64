import { startTestApp, type TestApp } from '../../server/test/helpers/app';
import {
  carrierWebhookSecret,
  startCarrier,
  type RunningCarrier,
} from '../../server/test/helpers/carrier';
import { makeUnit } from '../../server/test/helpers/catalog';
import {
  fakeState,
  listen,
  registerWebhook,
  startPaymentsFake,
  type RunningFake,
} from '../../server/test/helpers/payments';
import { shipmentKit } from '../../server/test/helpers/shipments';

// Reliability: duplicate and out-of-order deliveries against real processes. The Evalon app
// listens on a loopback port; the carrier stand-in (child process) sends every tracking event
// twice (duplicateRate 1), lets deliveries overtake each other (up to 300 ms of random wait
// each), and then replays every shipment's events 5 more times in a shuffled order. Invariants:
// each carrier event stored once; each shipment moves through each state once, never back; it
// ends delivered. Then a settlement submitted twice at the same moment refunds once.

jest.setTimeout(180_000);

const shipments = 6;

let t: TestApp;
let fake: RunningFake;
let carrier: RunningCarrier;
let server: { url: string; close(): Promise<void> };
const kit = shipmentKit(
  () => t,
  () => fake,
);

beforeAll(async () => {
  fake = await startPaymentsFake();
  carrier = await startCarrier();
  t = await startTestApp(
    { EVALON_PAYMENTS_PORT: String(fake.port), EVALON_DEPOSIT_EXPIRY_JOB: 'off' },
    { outboxWorker: false },
  );
  server = await listen(t.app);
  await registerWebhook(fake, `${server.url}/api/webhooks/payments`);
  await carrier.control('POST', '/webhook-endpoint', {
    url: `${server.url}/api/webhooks/carrier`,
    secret: carrierWebhookSecret,
  });
});
afterAll(async () => {
  await server?.close();
  await t?.close();
  await fake?.stop();
  await carrier?.stop();
});

describe('carrier webhooks delivered 5 times and out of order', () => {
  it('advance each shipment once, never back, and store each event once', async () => {
    const w = await kit.world();
    const { modelId } = await kit.modelWithPackingList(w.lender.id);
    const legs: { id: number; tn: string }[] = [];
    for (let i = 0; i < shipments; i += 1) {
      const unit = await makeUnit(t.dataSource, modelId, w.lender.depotId);
      const loan = await kit.confirmedLoan(w, [unit], 60 + i * 14);
      const [leg] = await kit.legsOf(loan.id);
      await kit.packed(leg.id);
      const res = await kit
        .post(w.coordinator, `/api/shipments/${leg.id}/hand-over`, {})
        .expect(200);
      legs.push({ id: leg.id, tn: res.body.shipment.trackingNumber });
    }
    await carrier.control('POST', '/faults', { duplicateRate: 1, shuffleMs: 300, rngStart: 11 });
    for (const leg of legs) {
      await carrier.control('POST', `/shipments/${leg.tn}/advance`, { to: 'delivered' });
    }
    for (const leg of legs) {
      await carrier.control('POST', `/shipments/${leg.tn}/replay`, { times: 5 });
    }
    const flushed = await carrier.control<{ settled: boolean; failed: number; delivered: number }>(
      'POST',
      '/webhooks/flush',
      { timeoutMs: 60_000 },
    );
    expect(flushed).toMatchObject({ settled: true, failed: 0 });
    // 4 events per parcel, each sent twice and then 5 more times.
    expect(flushed.delivered).toBeGreaterThanOrEqual(shipments * 4 * 7);

    const ladder = ['handed_over', 'in_transit', 'delivered'];
    for (const leg of legs) {
      const [row] = await t.dataSource.query('SELECT state FROM shipments WHERE id = ?', [leg.id]);
      expect(row.state).toBe('delivered');
      const carrierEvents: { carrier_event_id: string }[] = await t.dataSource.query(
        "SELECT carrier_event_id FROM shipment_events WHERE shipment_id = ? AND kind = 'carrier'",
        [leg.id],
      );
      expect(carrierEvents).toHaveLength(4);
      expect(new Set(carrierEvents.map((e) => e.carrier_event_id)).size).toBe(4);
      const moves: { to_state: string }[] = await t.dataSource.query(
        `SELECT to_state FROM shipment_events
          WHERE shipment_id = ? AND to_state IS NOT NULL AND kind IN ('state', 'carrier')
            AND (from_state IS NULL OR from_state <> to_state)
          ORDER BY id`,
        [leg.id],
      );
      const states = moves.map((m) => m.to_state).filter((s) => ladder.includes(s));
      // Each rung once, in ladder order: never back, never twice.
      expect(states).toEqual([...new Set(states)]);
      expect(states.map((s) => ladder.indexOf(s))).toEqual(
        [...states.map((s) => ladder.indexOf(s))].sort((a, b) => a - b),
      );
      expect(states.at(-1)).toBe('delivered');
    }
  });
});

describe('settlement submitted twice at once', () => {
  it('refunds once', async () => {
    const w = await kit.world();
    const { modelId } = await kit.modelWithPackingList(w.lender.id);
    const unit = await makeUnit(t.dataSource, modelId, w.lender.depotId);
    const loan = await kit.confirmedLoan(w, [unit], 200);
    // Straight to a received, inspected return: the steps before are the API tests' subject.
    const [out] = await kit.legsOf(loan.id);
    await kit.packed(out.id);
    const handed = await kit.post(w.coordinator, `/api/shipments/${out.id}/hand-over`, {});
    await carrier.control('POST', `/shipments/${handed.body.shipment.trackingNumber}/advance`, {
      to: 'delivered',
    });
    await carrier.control('POST', '/webhooks/flush', {});
    await kit.post(w.buyer, `/api/shipments/${out.id}/receipt`, {}).expect(200);
    const [, ret] = await kit.legsOf(loan.id);
    await kit
      .post(w.buyer, `/api/shipments/${ret.id}/decontamination`, {
        method: 'Cleaned and sterilised per the IFU',
        by: 'Sterile processing',
        at: new Date().toISOString(),
      })
      .expect(200);
    await kit.post(w.buyer, `/api/shipments/${ret.id}/hand-over`, {}).expect(200);
    await kit.post(w.coordinator, `/api/shipments/${ret.id}/receive`).expect(200);
    await kit
      .post(w.coordinator, `/api/loans/${loan.id}/inspection`, {
        findings: [{ category: 'wear', note: 'Scuffed case', charge: 10_000 }],
      })
      .expect(204);

    const [a, b] = await Promise.all([
      kit.post(w.coordinator, `/api/loans/${loan.id}/settle`),
      kit.post(w.coordinator, `/api/loans/${loan.id}/settle`),
    ]);
    const statuses = [a.status, b.status].sort();
    // One settles; the other either waits for it and answers the same result, or is told that
    // a settlement is running.
    expect(statuses[0]).toBe(200);
    expect([200, 409]).toContain(statuses[1]);
    const [payment] = await t.dataSource.query(
      'SELECT payment_intent_id, amount_refunded FROM payments WHERE loan_id = ?',
      [loan.id],
    );
    const refunds = (await fakeState(fake)).refunds.filter(
      (r) => r.payment_intent === payment.payment_intent_id,
    );
    expect(refunds.map((r) => r.amount)).toEqual([loan.deposit - 10_000]);
    expect(Number(payment.amount_refunded)).toBe(loan.deposit - 10_000);
    expect(await kit.loanState(loan.id)).toBe('closed');
  });
});
