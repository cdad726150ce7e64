import { toGtin14 } from '@evalon/contracts';
import { addCalendarDays } from '@evalon/scheduling';
import { startTestApp, type TestApp } from './app';
import { carrierWebhookSecret, startCarrier, type RunningCarrier } from './carrier';
import {
  makeHospital,
  makeLender,
  makeModel,
  mondayAfter,
  places,
  type TestHospital,
  type TestLender,
} from './catalog';
import { signedInClient, type Client } from './http';
import {
  flushWebhooks,
  listen,
  payOnHostedPage,
  registerWebhook,
  startPaymentsFake,
  type RunningFake,
} from './payments';

/** A lender (fleet manager, coordinator, depot) and a hospital (buyer, campus), signed in. */
export interface World {
  lender: TestLender;
  hospital: TestHospital;
  buyer: Client;
  fleet: Client;
  coordinator: Client;
}

/**
 * Helpers for shipment tests against a test app and the payments fake: a world of people, a
 * model with a packing list, a loan confirmed through the real card deposit flow, the legs of
 * a loan.
 */
export function shipmentKit(t: () => TestApp, fake: () => RunningFake) {
  const sign = (person: { email: string; password: string }) =>
    signedInClient(t().app, person.email, person.password);
  const post = (c: Client, path: string, body: object = {}) =>
    c.agent.post(path).set('X-XSRF-TOKEN', c.csrf).send(body);

  async function world(): Promise<World> {
    const lender = await makeLender(t().dataSource, places.eastDepot);
    const hospital = await makeHospital(t().dataSource, places.bostonCampus);
    return {
      lender,
      hospital,
      buyer: await sign(hospital.buyer),
      fleet: await sign(lender.fleet),
      coordinator: await sign(lender.coordinator),
    };
  }

  /** A model with a packing list of two lines (GTIN check digits computed by the GS1 rule). */
  async function modelWithPackingList(lenderId: number) {
    const modelId = await makeModel(t().dataSource, lenderId);
    const fibre = toGtin14(`0${String(Math.floor(Math.random() * 1e12)).padStart(12, '0')}`);
    const drape = toGtin14(`0${String(Math.floor(Math.random() * 1e12)).padStart(12, '0')}`);
    await t().dataSource.query(
      `INSERT INTO model_packing_items (model_id, position, name, gtin, quantity, serialised)
       VALUES (?, 1, 'Laser fibre 365 µm', ?, 2, FALSE), (?, 2, 'Foot switch', ?, 1, TRUE)`,
      [modelId, fibre, modelId, drape],
    );
    return { modelId, fibre, drape };
  }

  /** Requests, approves and pays (card, charge now) a loan of `unitIds`; answers when confirmed. */
  async function confirmedLoan(w: World, unitIds: number[], daysAhead = 60) {
    const useFrom = mondayAfter(daysAhead);
    const loan = (
      await post(w.buyer, '/api/loans', {
        siteId: w.hospital.campusId,
        unitIds,
        useFrom,
        useTo: addCalendarDays(useFrom, 2),
      }).expect(201)
    ).body.loan;
    await post(w.fleet, `/api/loans/${loan.id}/approve`).expect(200);
    const checkout = await post(w.buyer, `/api/loans/${loan.id}/deposit`, {
      method: 'card',
    }).expect(200);
    await payOnHostedPage(checkout.body.checkoutUrl);
    await flushWebhooks(fake());
    if ((await loanState(loan.id)) !== 'confirmed')
      throw new Error(`loan ${loan.id} not confirmed`);
    return {
      id: loan.id as number,
      reference: loan.reference as string,
      deposit: loan.deposit.amount as number,
    };
  }

  const loanState = async (id: number) =>
    (await t().dataSource.query('SELECT state FROM loans WHERE id = ?', [id]))[0].state as string;
  const legsOf = async (loanId: number) =>
    t().dataSource.query(
      'SELECT id, direction, state, depot_id, tracking_number FROM shipments WHERE loan_id = ? ORDER BY id',
      [loanId],
    ) as Promise<
      {
        id: number;
        direction: string;
        state: string;
        depot_id: number;
        tracking_number: string | null;
      }[]
    >;

  /**
   * Marks an outbound leg packed the way the pack step leaves it (every line complete). Packing
   * through scans is covered by the scan tests; these tests start after it.
   */
  async function packed(shipmentId: number) {
    await t().dataSource.query(
      'UPDATE shipment_items SET scanned = quantity WHERE shipment_id = ?',
      [shipmentId],
    );
    await t().dataSource.query("UPDATE shipments SET state = 'packed' WHERE id = ?", [shipmentId]);
  }

  const agentPut = async (c: Client, path: string, body: object) =>
    c.agent.put(path).set('X-XSRF-TOKEN', c.csrf).send(body).expect(200);
  return {
    sign,
    post,
    agentPut,
    world,
    modelWithPackingList,
    confirmedLoan,
    loanState,
    legsOf,
    packed,
  };
}

/** The app on a loopback port with the payments fake and the carrier stand-in wired to it. */
export interface ShipmentStandIns {
  t: TestApp;
  fake: RunningFake;
  carrier: RunningCarrier;
  server: { url: string; close(): Promise<void> };
  close(): Promise<void>;
}

/**
 * Starts the payments fake and the carrier stand-in (child processes on free ports) and the app
 * listening on loopback, with both stand-ins' signed webhooks pointed at it.
 */
export async function startShipmentStandIns(): Promise<ShipmentStandIns> {
  const fake = await startPaymentsFake();
  const carrier = await startCarrier();
  const t = await startTestApp(
    { EVALON_PAYMENTS_PORT: String(fake.port), EVALON_DEPOSIT_EXPIRY_JOB: 'off' },
    { outboxWorker: false },
  );
  const server = await listen(t.app);
  await registerWebhook(fake, `${server.url}/api/webhooks/payments`);
  await carrier.control('POST', '/webhook-endpoint', {
    url: `${server.url}/api/webhooks/carrier`,
    secret: carrierWebhookSecret,
  });
  return {
    t,
    fake,
    carrier,
    server,
    async close() {
      await server.close();
      await t.close();
      await fake.stop();
      await carrier.stop();
    },
  };
}
