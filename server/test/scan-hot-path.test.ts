// The scan route ticks a line and marks the shipment changed in one statement; this checks
// that the one statement does both, for the matched line only, and that a refusal does neither.
// Barcodes are built with @evalon/gs1 (GS1 General Specifications element strings).
import { buildElementString } from '@evalon/gs1';
import { addCalendarDays } from '@evalon/scheduling';
import { startTestApp, type TestApp } from './helpers/app';
import { makeUnit } from './helpers/catalog';
import { listen, registerWebhook, startPaymentsFake, type RunningFake } from './helpers/payments';
import { shipmentKit } from './helpers/shipments';

jest.setTimeout(90_000);

let t: TestApp;
let fake: RunningFake;
let server: { url: string; close(): Promise<void> };
const kit = shipmentKit(
  () => t,
  () => fake,
);

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

it('a ticking scan counts the matched line once and marks the shipment changed; a refusal neither', async () => {
  const w = await kit.world();
  const { modelId, fibre } = await kit.modelWithPackingList(w.lender.id);
  const unit = await makeUnit(t.dataSource, modelId, w.lender.depotId);
  const loan = await kit.confirmedLoan(w, [unit]);
  const [leg] = await kit.legsOf(loan.id);
  const state = async () => {
    const [s] = await t.dataSource.query('SELECT updated_at FROM shipments WHERE id = ?', [leg.id]);
    const items: { gtin: string | null; scanned: number }[] = await t.dataSource.query(
      'SELECT gtin, scanned FROM shipment_items WHERE shipment_id = ? ORDER BY position, id',
      [leg.id],
    );
    return { updatedAt: new Date(s.updated_at).getTime(), items };
  };
  const [{ use_to: lastCaseDay }] = await t.dataSource.query(
    'SELECT CAST(use_to AS CHAR) AS use_to FROM loans WHERE id = ?',
    [loan.id],
  );
  const before = await state();
  await new Promise((r) => setTimeout(r, 5));
  const raw = buildElementString({
    gtin: fibre,
    lot: 'L-1',
    expiry: addCalendarDays(lastCaseDay, 400),
  });
  await kit.post(w.coordinator, `/api/shipments/${leg.id}/scans`, { raw }).expect(201);
  const after = await state();
  expect(after.updatedAt).toBeGreaterThan(before.updatedAt);
  expect(after.items.map((i) => i.scanned)).toEqual(
    before.items.map((i) => i.scanned + (i.gtin === fibre ? 1 : 0)),
  );

  // A GTIN that is not on the list (GS1 example 4006381333931): nothing ticked, nothing touched.
  await new Promise((r) => setTimeout(r, 5));
  await kit
    .post(w.coordinator, `/api/shipments/${leg.id}/scans`, {
      raw: buildElementString({ gtin: '04006381333931', lot: 'L1' }),
    })
    .expect(422);
  expect(await state()).toEqual(after);
});
