// Shipments and returns against the real database, the REAL payments fake and the REAL carrier
// stand-in (both child processes on free ports). The app listens on a loopback port so that
// both stand-ins' signed webhooks reach it.
import crypto from 'node:crypto';
import { shipmentEta, toSiteDate } from '@evalon/scheduling';
import { DateTime } from 'luxon';
import type { TestApp } from './helpers/app';
import { carrierWebhookSecret, type RunningCarrier } from './helpers/carrier';
import { countRows, makePlace, makeUnit, places } from './helpers/catalog';
import { fakeState, type RunningFake } from './helpers/payments';
import { createLogger } from '../src/logger';
import { createPaymentsDeps } from '../src/payments';
import { createShipmentsDeps, runShipmentAlerts } from '../src/shipments';
import { shipmentKit, startShipmentStandIns, type ShipmentStandIns } from './helpers/shipments';

jest.setTimeout(90_000);

let t: TestApp;
let fake: RunningFake;
let carrier: RunningCarrier;
let server: { url: string; close(): Promise<void> };

let standIns: ShipmentStandIns | undefined;

beforeAll(async () => {
  standIns = await startShipmentStandIns();
  ({ t, fake, carrier, server } = standIns);
});
afterAll(async () => {
  await standIns?.close();
});

const kit = shipmentKit(
  () => t,
  () => fake,
);
const { post, world, modelWithPackingList, confirmedLoan, loanState, legsOf, packed } = kit;

describe('legs of a confirmed loan', () => {
  it('one outbound leg per depot with the checklist from the packing lists, visible to both sides only', async () => {
    const w = await world();
    const secondDepot = await makePlace(t.dataSource, w.lender.id, 'depot', places.westDepot);
    const a = await modelWithPackingList(w.lender.id);
    const u1 = await makeUnit(t.dataSource, a.modelId, w.lender.depotId);
    const u2 = await makeUnit(t.dataSource, a.modelId, secondDepot);
    const loan = await confirmedLoan(w, [u1, u2]);

    const legs = await legsOf(loan.id);
    expect(legs.map((l) => [l.direction, l.state])).toEqual([
      ['outbound', 'to_pack'],
      ['outbound', 'to_pack'],
    ]);
    expect(new Set(legs.map((l) => Number(l.depot_id)))).toEqual(
      new Set([w.lender.depotId, secondDepot]),
    );

    const list = await w.coordinator.agent.get('/api/shipments?direction=outbound').expect(200);
    const mine = list.body.shipments.filter((s: { loanId: number }) => s.loanId === loan.id);
    expect(mine).toHaveLength(2);
    const detail = (await w.coordinator.agent.get(`/api/shipments/${legs[0].id}`).expect(200)).body
      .shipment;
    // Unit line + the model's two packing lines.
    expect(detail.checklist.map((i: { name: string }) => i.name)).toEqual([
      expect.stringContaining('(unit)'),
      'Laser fibre 365 µm',
      'Foot switch',
    ]);
    expect(detail.checklist[1]).toMatchObject({
      gtin: a.fibre,
      quantity: 2,
      needsLot: true,
      needsExpiry: true,
    });
    expect(detail.checklist[2]).toMatchObject({
      gtin: a.drape,
      needsSerial: true,
      needsLot: false,
    });
    expect(detail.eta).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    expect(detail.actions).toEqual(expect.arrayContaining(['scan', 'pack']));

    await w.buyer.agent.get(`/api/shipments/${legs[0].id}`).expect(200);
    const stranger = await world();
    await stranger.coordinator.agent.get(`/api/shipments/${legs[0].id}`).expect(404);
    const theirs = await stranger.coordinator.agent.get('/api/shipments').expect(200);
    expect(theirs.body.shipments.some((s: { loanId: number }) => s.loanId === loan.id)).toBe(false);
  });
});

describe('carrier webhook', () => {
  it('refuses a bad or stale signature and changes nothing', async () => {
    const body = JSON.stringify({
      id: 'cev_x',
      data: { trackingNumber: 'WP1', status: 'delivered', occurredAt: new Date().toISOString() },
    });
    const at = Math.floor(Date.now() / 1000);
    const good = (ts: number) =>
      `t=${ts},v1=${crypto.createHmac('sha256', carrierWebhookSecret).update(`${ts}.${body}`).digest('hex')}`;
    const send = (sig: string) =>
      fetch(`${server.url}/api/webhooks/carrier`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', 'carrier-signature': sig },
        body,
      });
    expect((await send(`t=${at},v1=${'0'.repeat(64)}`)).status).toBe(400);
    expect((await send(good(at - 3600))).status).toBe(400);
    const ok = await send(good(at));
    expect(ok.status).toBe(200);
    expect(await ok.json()).toEqual({ received: true, outcome: 'unknown_tracking' });
  });
});

describe('the journey after confirmation', () => {
  it('hand-over, tracking (replayed out of order), receipt, decontamination, return, inspection, settlement', async () => {
    const w = await world();
    const a = await modelWithPackingList(w.lender.id);
    const unit = await makeUnit(t.dataSource, a.modelId, w.lender.depotId);
    const loan = await confirmedLoan(w, [unit]);
    const [out] = await legsOf(loan.id);

    // The hospital cannot hand the outbound leg over, nor before it is packed.
    await post(w.buyer, `/api/shipments/${out.id}/hand-over`, {}).expect(403);
    await post(w.coordinator, `/api/shipments/${out.id}/hand-over`, {}).expect(409);
    await packed(out.id);
    const handed = await post(w.coordinator, `/api/shipments/${out.id}/hand-over`, {
      carrier: 'wendrow',
      service: 'standard',
    }).expect(200);
    expect(handed.body.shipment).toMatchObject({ state: 'handed_over', carrier: 'wendrow' });
    const tn = handed.body.shipment.trackingNumber as string;
    expect(tn).toMatch(/^WP\d{10}$/);
    expect(await loanState(loan.id)).toBe('shipped');
    // Handing over again books nothing new.
    await post(w.coordinator, `/api/shipments/${out.id}/hand-over`, {}).expect(200);
    const parcels = (await carrier.control<{ parcels: { reference: string }[] }>('GET', '/state'))
      .parcels;
    expect(parcels.filter((p) => p.reference === handed.body.shipment.reference)).toHaveLength(1);

    await carrier.control('POST', `/shipments/${tn}/advance`, { to: 'delivered' });
    await carrier.control('POST', `/shipments/${tn}/replay`, { times: 5 });
    await carrier.control('POST', '/webhooks/flush', {});
    const [afterTracking] = await legsOf(loan.id);
    expect(afterTracking.state).toBe('delivered');
    // Every carrier event stored once; the state moved through each rung once.
    expect(
      await countRows(t.dataSource, 'shipment_events', "shipment_id = ? AND kind = 'carrier'", [
        out.id,
      ]),
    ).toBe(4);
    const moves: { to_state: string }[] = await t.dataSource.query(
      "SELECT to_state FROM shipment_events WHERE shipment_id = ? AND kind = 'carrier' AND to_state IS NOT NULL ORDER BY id",
      [out.id],
    );
    expect(moves.map((m) => m.to_state)).toEqual(['in_transit', 'delivered']);
    const legs = await legsOf(loan.id);
    expect(legs.map((l) => [l.direction, l.state])).toEqual([
      ['outbound', 'delivered'],
      ['return', 'awaiting_return'],
    ]);
    const ret = legs[1];

    // Receipt by the buyer moves the loan to delivered.
    await post(w.coordinator, `/api/shipments/${out.id}/receipt`, {}).expect(403);
    await post(w.buyer, `/api/shipments/${out.id}/receipt`, {
      notes: 'All present, case intact.',
    }).expect(200);
    expect(await loanState(loan.id)).toBe('delivered');

    // The return needs the decontamination attestation first.
    const refused = await post(w.buyer, `/api/shipments/${ret.id}/hand-over`, {}).expect(409);
    expect(refused.body.error.code).toBe('decontamination_required');
    await post(w.buyer, `/api/shipments/${ret.id}/decontamination`, {
      method: 'Manual clean and low-temperature sterilisation per the IFU',
      by: 'Sterile processing, night shift',
      at: new Date(Date.now() - 3_600_000).toISOString(),
    }).expect(200);
    const back = await post(w.buyer, `/api/shipments/${ret.id}/hand-over`, {}).expect(200);
    expect(await loanState(loan.id)).toBe('returning');
    const rtn = back.body.shipment.trackingNumber as string;
    await carrier.control('POST', `/shipments/${rtn}/advance`, { to: 'delivered' });
    await carrier.control('POST', '/webhooks/flush', {});
    // A delivered return stays in transit until the depot scans it in.
    expect((await legsOf(loan.id))[1].state).toBe('in_transit');

    const received = await post(w.coordinator, `/api/shipments/${ret.id}/receive`).expect(200);
    // Nothing was scanned back in: every required line is listed as missing.
    expect(received.body.missing).toHaveLength(3);
    expect(await loanState(loan.id)).toBe('returned');

    await post(w.coordinator, `/api/loans/${loan.id}/settle`).expect(409);
    await post(w.coordinator, `/api/loans/${loan.id}/inspection`, {
      findings: [
        {
          unitId: unit,
          category: 'damage',
          note: 'Cracked fibre connector',
          charge: 25_000,
          needsRepair: true,
        },
      ],
    }).expect(204);
    await post(w.coordinator, `/api/loans/${loan.id}/inspection`, { findings: [] }).expect(409);
    const holds = await countRows(t.dataSource, 'holds', "unit_id = ? AND kind = 'maintenance'", [
      unit,
    ]);
    expect(holds).toBe(1);

    const settled = await post(w.coordinator, `/api/loans/${loan.id}/settle`).expect(200);
    expect(settled.body).toMatchObject({
      loanState: 'closed',
      settlement: { currency: 'USD', kept: 25_000, returned: loan.deposit - 25_000, uncovered: 0 },
    });
    expect(await loanState(loan.id)).toBe('closed');
    const again = await post(w.coordinator, `/api/loans/${loan.id}/settle`).expect(200);
    expect(again.body.settlement).toEqual(settled.body.settlement);
    const [payment] = await t.dataSource.query(
      'SELECT payment_intent_id FROM payments WHERE loan_id = ?',
      [loan.id],
    );
    const refunds = (await fakeState(fake)).refunds.filter(
      (r) => r.payment_intent === payment.payment_intent_id,
    );
    expect(refunds.map((r) => r.amount)).toEqual([loan.deposit - 25_000]);
    const [statement] = await t.dataSource.query(
      'SELECT subject, text FROM outbox_messages WHERE dedupe_key LIKE ?',
      [`loan:${loan.id}:statement:user:%`],
    );
    expect(statement.subject).toContain('deposit statement');
    expect(statement.text).toContain('Cracked fibre connector');
  });
});

describe('alerts job', () => {
  it('alerts once per condition, e-mail and in-app, to coordinators and buyers', async () => {
    const w = await world();
    const a = await modelWithPackingList(w.lender.id);
    const unit = await makeUnit(t.dataSource, a.modelId, w.lender.depotId);
    const loan = await confirmedLoan(w, [unit]);
    const [out] = await legsOf(loan.id);
    // The carrier says later than the deliver-by day: at risk.
    await t.dataSource.query(
      'UPDATE shipments SET eta = DATE_ADD(due_by, INTERVAL 2 DAY), at_risk = TRUE WHERE id = ?',
      [out.id],
    );
    const deps = createShipmentsDeps({
      config: t.config,
      dataSource: t.dataSource,
      logger: createLogger('silent'),
      payments: createPaymentsDeps({
        config: t.config,
        dataSource: t.dataSource,
        logger: createLogger('silent'),
      }),
    });
    await runShipmentAlerts(deps);
    await runShipmentAlerts(deps);
    expect(await countRows(t.dataSource, 'shipment_alerts', 'shipment_id = ?', [out.id])).toBe(1);
    const mails = await countRows(t.dataSource, 'outbox_messages', 'dedupe_key LIKE ?', [
      `shipment:${out.id}:at_risk:user:%`,
    ]);
    expect(mails).toBe(2); // the coordinator and the buyer
    const board = await w.coordinator.agent.get('/api/shipments?risk=at_risk').expect(200);
    expect(board.body.shipments.map((s: { id: number }) => s.id)).toContain(out.id);
    const notes = await countRows(
      t.dataSource,
      'notifications',
      "kind = 'shipment.at_risk' AND user_id = ?",
      [w.hospital.buyer.userId],
    );
    expect(notes).toBe(1);
  });
});

describe('return legs on their way back', () => {
  it('expect the depot arrival by the transit rule, turn at risk and overdue by the back-at-depot day, alert once each', async () => {
    const w = await world();
    const a = await modelWithPackingList(w.lender.id);
    const unit = await makeUnit(t.dataSource, a.modelId, w.lender.depotId);
    const loan = await confirmedLoan(w, [unit]);
    const [out] = await legsOf(loan.id);
    await packed(out.id);
    const handed = await post(w.coordinator, `/api/shipments/${out.id}/hand-over`, {}).expect(200);
    await carrier.control('POST', `/shipments/${handed.body.shipment.trackingNumber}/advance`, {
      to: 'delivered',
    });
    await carrier.control('POST', '/webhooks/flush', {});
    const ret = (await legsOf(loan.id))[1];
    await post(w.buyer, `/api/shipments/${out.id}/receipt`, {}).expect(200);
    await post(w.buyer, `/api/shipments/${ret.id}/decontamination`, {
      method: 'Manual clean and low-temperature sterilisation per the IFU',
      by: 'Sterile processing',
      at: new Date(Date.now() - 3_600_000).toISOString(),
    }).expect(200);
    const waiting = (await w.coordinator.agent.get(`/api/shipments/${ret.id}`).expect(200)).body
      .shipment;
    const [dates] = await t.dataSource.query(
      `SELECT CAST(l.return_ship_by AS CHAR) AS ship_back, CAST(l.back_at_depot AS CHAR) AS back,
              c.time_zone AS campus_zone, d.time_zone AS depot_zone
         FROM loans l JOIN sites c ON c.id = l.site_id JOIN shipments s ON s.loan_id = l.id
         JOIN sites d ON d.id = s.depot_id WHERE s.id = ?`,
      [ret.id],
    );
    // Waiting at the campus: the hospital's deadline, ship back by.
    expect(waiting).toMatchObject({ dueBy: dates.ship_back, eta: null, risk: 'on_time' });

    const back = await post(w.buyer, `/api/shipments/${ret.id}/hand-over`, {}).expect(200);
    const [leg] = await t.dataSource.query(
      `SELECT transit_days, origin_country, destination_country, due_zone, overdue_at
         FROM shipments WHERE id = ?`,
      [ret.id],
    );
    // On its way: expected at the depot by the scheduling package's transit rule from the
    // hand-over day (campus calendar); the deadline is now the depot's back-at-depot day.
    const expectedEta = shipmentEta(
      toSiteDate(new Date(), dates.campus_zone),
      Number(leg.transit_days),
      leg.origin_country,
      leg.destination_country,
    );
    expect(back.body.shipment).toMatchObject({
      state: 'handed_over',
      eta: expectedEta,
      dueBy: dates.back,
      shipBy: dates.ship_back,
      risk: 'on_time',
    });
    expect(leg.due_zone).toBe(dates.depot_zone);
    // Overdue from the first instant after the back-at-depot day ends at the depot.
    expect(new Date(leg.overdue_at).toISOString()).toBe(
      DateTime.fromISO(dates.back, { zone: dates.depot_zone })
        .plus({ days: 1 })
        .startOf('day')
        .toUTC()
        .toISO(),
    );

    // The carrier reports a delay past the back-at-depot day: at risk, on the board too.
    const tn = back.body.shipment.trackingNumber as string;
    await carrier.control('POST', `/shipments/${tn}/delay`, { days: 59 });
    await carrier.control('POST', `/shipments/${tn}/delay`, { days: 59 });
    await carrier.control('POST', '/webhooks/flush', {});
    const delayed = (await w.coordinator.agent.get(`/api/shipments/${ret.id}`).expect(200)).body
      .shipment;
    expect(delayed.eta > dates.back).toBe(true);
    expect(delayed.risk).toBe('at_risk');
    const risky = await w.coordinator.agent
      .get(`/api/shipments?risk=at_risk&loanId=${loan.id}`)
      .expect(200);
    expect(risky.body.shipments.map((s: { id: number }) => s.id)).toEqual([ret.id]);

    const deps = createShipmentsDeps({
      config: t.config,
      dataSource: t.dataSource,
      logger: createLogger('silent'),
      payments: createPaymentsDeps({
        config: t.config,
        dataSource: t.dataSource,
        logger: createLogger('silent'),
      }),
    });
    const alertsOf = async () =>
      (
        await t.dataSource.query(
          'SELECT kind FROM shipment_alerts WHERE shipment_id = ? ORDER BY kind',
          [ret.id],
        )
      ).map((r: { kind: string }) => r.kind);
    await runShipmentAlerts(deps);
    await runShipmentAlerts(deps);
    expect(await alertsOf()).toEqual(['return_at_risk']);
    expect(
      await countRows(t.dataSource, 'outbox_messages', 'dedupe_key LIKE ?', [
        `shipment:${ret.id}:return_at_risk:user:%`,
      ]),
    ).toBe(2); // the coordinator and the buyer

    // Time passes beyond the back-at-depot day at the depot, still not received: overdue.
    await t.dataSource.query(
      'UPDATE shipments SET overdue_at = DATE_SUB(UTC_TIMESTAMP(3), INTERVAL 1 MINUTE) WHERE id = ?',
      [ret.id],
    );
    const late = await w.coordinator.agent
      .get(`/api/shipments?risk=overdue&loanId=${loan.id}`)
      .expect(200);
    expect(late.body.shipments.map((s: { id: number; risk: string }) => [s.id, s.risk])).toEqual([
      [ret.id, 'overdue'],
    ]);
    await runShipmentAlerts(deps);
    await runShipmentAlerts(deps);
    expect(await alertsOf()).toEqual(['return_at_risk', 'return_overdue']);
    const [overdueMail] = await t.dataSource.query(
      'SELECT subject FROM outbox_messages WHERE dedupe_key LIKE ? LIMIT 1',
      [`shipment:${ret.id}:return_overdue:user:%`],
    );
    expect(overdueMail.subject).toBe(
      `Return overdue: ${back.body.shipment.reference} was not received by ${dates.back}`,
    );

    // Received at the depot: no longer at risk or late.
    await carrier.control('POST', `/shipments/${tn}/advance`, { to: 'delivered' });
    await carrier.control('POST', '/webhooks/flush', {});
    const received = await post(w.coordinator, `/api/shipments/${ret.id}/receive`).expect(200);
    expect(received.body.shipment.risk).toBe('on_time');
    const still = await w.coordinator.agent
      .get(`/api/shipments?risk=late&loanId=${loan.id}`)
      .expect(200);
    expect(still.body.shipments).toEqual([]);
  });
});

describe('GET /api/shipments/in-transit', () => {
  it('lists the lender’s legs with the carrier, depot to campus, for lender people only', async () => {
    const w = await world();
    const a = await modelWithPackingList(w.lender.id);
    const unit = await makeUnit(t.dataSource, a.modelId, w.lender.depotId);
    const loan = await confirmedLoan(w, [unit]);
    const [out] = await legsOf(loan.id);
    const mine = async (c: typeof w.coordinator) =>
      (await c.agent.get('/api/shipments/in-transit').expect(200)).body.shipments.filter(
        (s: { id: number }) => s.id === out.id,
      );
    // Waiting to be packed: not on the map.
    expect(await mine(w.coordinator)).toEqual([]);
    await packed(out.id);
    await post(w.coordinator, `/api/shipments/${out.id}/hand-over`, {}).expect(200);

    const [entry] = await mine(w.coordinator);
    // The coordinates the test sites were made with (helpers/catalog places).
    expect(entry).toMatchObject({
      direction: 'outbound',
      state: 'handed_over',
      risk: 'on_time',
      from: { lat: places.eastDepot.latitude, lng: places.eastDepot.longitude },
      to: { lat: places.bostonCampus.latitude, lng: places.bostonCampus.longitude },
    });
    expect(await mine(w.fleet)).toHaveLength(1);
    // Hospital people have their loan page; another lender sees nothing of it.
    const refused = await w.buyer.agent.get('/api/shipments/in-transit').expect(403);
    expect(refused.body.error.message).toMatch(/coordinators and fleet managers/);
    const other = await world();
    expect(await mine(other.coordinator)).toEqual([]);
  });
});
