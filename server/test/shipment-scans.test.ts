// Packing by scans against the real database and the payments fake (for the confirmed loan).
// Outside references (docs/references.md, "GS1 barcodes and UDI"): the barcode
// writer's wiki example element string and its fields; the GS1 mod-10 check digit; the SSCC
// structure (GS1 General Specifications, AI 00) with the derived example 106141411234567897.
import { buildElementString, parseElementString } from '@evalon/gs1';
import { BarcodeFormat } from '@zxing/library';
import { addCalendarDays } from '@evalon/scheduling';
import { startTestApp, type TestApp } from './helpers/app';
import { countRows, makeUnit } from './helpers/catalog';
import { listen, registerWebhook, startPaymentsFake, type RunningFake } from './helpers/payments';
import { pdfImages, readBarcode } from './helpers/pdf-images';
import { shipmentKit } from './helpers/shipments';

jest.setTimeout(90_000);

let t: TestApp;
let fake: RunningFake;
let server: { url: string; close(): Promise<void> };
const kit = shipmentKit(
  () => t,
  () => fake,
);
const GS = '\u001d';

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

describe('POST /api/gs1/parse', () => {
  it('reads the published example in raw, symbology-identifier and bracketed forms', async () => {
    const w = await kit.world();
    // Barcode writer's wiki example: GTIN 09521234543213, expiry 2010-01-01, lot 123ABC,
    // serial 1234567890; a scanner sends it with GS after the variable-length lot.
    const forms = [
      `01095212345432131710010110123ABC${GS}211234567890`,
      `]d201095212345432131710010110123ABC${GS}211234567890`,
      '(01)09521234543213(17)100101(10)123ABC(21)1234567890',
    ];
    for (const raw of forms) {
      const res = await kit.post(w.coordinator, '/api/gs1/parse', { raw }).expect(200);
      expect(res.body).toMatchObject({
        gtin: '09521234543213',
        expiry: '2010-01-01',
        lot: '123ABC',
        serial: '1234567890',
      });
      expect(res.body.elements.map((e: { ai: string }) => e.ai)).toEqual(['01', '17', '10', '21']);
    }
    // Day 00 is the month's last day (GS1 General Specifications): 17 280200 → 2028-02-29.
    const day00 = await kit
      .post(w.coordinator, '/api/gs1/parse', { raw: '(01)09521234543213(17)280200' })
      .expect(200);
    expect(day00.body.expiry).toBe('2028-02-29');
    // One digit off: the check digit no longer holds.
    const wrong = await kit
      .post(w.coordinator, '/api/gs1/parse', { raw: '(01)09521234543214' })
      .expect(422);
    expect(wrong.body.error.code).toBe('check_digit');
  });
});

describe('packing by scans', () => {
  it('ticks matching lines, refuses with a reason and ticks nothing, packs with an SSCC', async () => {
    const w = await kit.world();
    const { modelId, fibre, drape } = await kit.modelWithPackingList(w.lender.id);
    const unit = await makeUnit(t.dataSource, modelId, w.lender.depotId);
    const loan = await kit.confirmedLoan(w, [unit]);
    const [leg] = await kit.legsOf(loan.id);
    const [{ use_to: lastCaseDay }] = await t.dataSource.query(
      'SELECT CAST(use_to AS CHAR) AS use_to FROM loans WHERE id = ?',
      [loan.id],
    );
    const later = addCalendarDays(lastCaseDay, 400);
    const scan = (raw: string) =>
      kit.post(w.coordinator, `/api/shipments/${leg.id}/scans`, { raw });
    const refusal = async (raw: string, code: string) => {
      const res = await scan(raw).expect(422);
      expect(res.body.error).toMatchObject({ code, message: expect.any(String) });
      return res.body.error;
    };

    // The hospital does not pack.
    await kit.post(w.buyer, `/api/shipments/${leg.id}/scans`, { raw: fibre }).expect(403);
    // A GTIN that is not on the list (valid check digit: GS1 example 4006381333931).
    await refusal(
      buildElementString({ gtin: '04006381333931', lot: 'L1', expiry: later }),
      'not_on_list',
    );
    // Wrong check digit.
    await refusal(`01${fibre.slice(0, 13)}${(Number(fibre[13]) + 1) % 10}10L1`, 'check_digit');
    // Expires before the last case day.
    const expired = await refusal(
      buildElementString({ gtin: fibre, lot: 'L1', expiry: addCalendarDays(lastCaseDay, -1) }),
      'expires_before_use',
    );
    expect(expired.details).toMatchObject({ lastCaseDay });
    // Lot and expiry must be recorded for the fibres.
    await refusal(buildElementString({ gtin: fibre }), 'lot_missing');

    const ok = await scan(
      `]C1${buildElementString({ gtin: fibre, lot: 'FIB-7', expiry: later })}`,
    ).expect(201);
    expect(ok.body).toMatchObject({
      item: { name: 'Laser fibre 365 µm', scanned: 1, quantity: 2 },
    });
    await scan(
      buildElementString({ gtin: fibre, lot: 'FIB-7', expiry: later }, { form: 'hri' }),
    ).expect(201);
    await refusal(
      buildElementString({ gtin: fibre, lot: 'FIB-7', expiry: later }),
      'quantity_complete',
    );
    // The foot switch is serialised: the same serial twice is refused.
    await refusal(buildElementString({ gtin: drape }), 'serial_missing');
    await scan(buildElementString({ gtin: drape, serial: 'FS-001' })).expect(201);
    await refusal(buildElementString({ gtin: drape, serial: 'FS-001' }), 'serial_already_scanned');

    // Nothing ticked by the refusals; all of them kept in the shipment's history.
    const detail = (await w.coordinator.agent.get(`/api/shipments/${leg.id}`).expect(200)).body
      .shipment;
    expect(detail.checklist.map((i: { scanned: number }) => i.scanned)).toEqual([0, 2, 1]);
    const refused = detail.scans.filter((s: { outcome: string }) => s.outcome === 'refused');
    expect(refused.map((s: { code: string }) => s.code)).toEqual([
      'not_on_list',
      'check_digit',
      'expires_before_use',
      'lot_missing',
      'quantity_complete',
      'serial_missing',
      'serial_already_scanned',
    ]);

    // The unit has no UDI label in this test: ticked by hand, which needs a reason.
    const unitLine = detail.checklist[0].id;
    await kit.post(w.coordinator, `/api/shipments/${leg.id}/pack`).expect(409);
    await kit
      .post(w.coordinator, `/api/shipments/${leg.id}/manual-ticks`, {
        itemId: unitLine,
        reason: '',
      })
      .expect(422);
    await kit
      .post(w.coordinator, `/api/shipments/${leg.id}/manual-ticks`, {
        itemId: unitLine,
        reason: 'Serial plate checked by eye; label worn',
      })
      .expect(200);

    // No GS1 company prefix yet: packing says so.
    const noPrefix = await kit.post(w.coordinator, `/api/shipments/${leg.id}/pack`).expect(409);
    expect(noPrefix.body.error.code).toBe('gs1_prefix_missing');
    await kit.agentPut(w.fleet, `/api/lenders/${w.lender.id}/shipment-settings`, {
      gs1CompanyPrefix: '0614141',
      extensionDigit: 1,
    });
    // Serial reference 123456789 gives the derived example SSCC (GS1 General Specifications,
    // AI 00; body 10614141123456789 → check digit 7).
    await t.dataSource.query(
      'UPDATE shipment_settings SET next_serial = 123456789 WHERE lender_id = ?',
      [w.lender.id],
    );
    // This worker's database keeps earlier runs' rows: free the example SSCC for this run.
    await t.dataSource.query("UPDATE shipments SET sscc = NULL WHERE sscc = '106141411234567897'");
    const packed = await kit.post(w.coordinator, `/api/shipments/${leg.id}/pack`).expect(200);
    expect(packed.body.shipment).toMatchObject({ state: 'packed', sscc: '106141411234567897' });

    const slip = await w.coordinator.agent
      .get(`/api/shipments/${leg.id}/packing-slip.pdf`)
      .expect(200);
    expect(slip.headers['content-type']).toBe('application/pdf');
    const pdf = Buffer.isBuffer(slip.body) ? slip.body : Buffer.from(slip.text ?? '', 'binary');
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    expect(pdf.length).toBeGreaterThan(2_000);

    // The barcodes as the slip carries them: cut out of the PDF and read by ZXing. GS1 General
    // Specifications: AI 00 is the SSCC, 18 digits, first in a GS1-128 behind FNC1 (which a
    // reader reports as the symbology identifier ]C1, ISO/IEC 15424, from memory); GS1
    // DataMatrix starts with FNC1 too, which ZXing writes as GS.
    const images = pdfImages(pdf);
    expect(images).toHaveLength(2);
    const linear = images.map((i) => readBarcode(i, BarcodeFormat.CODE_128)).filter(Boolean);
    const matrix = images.map((i) => readBarcode(i, BarcodeFormat.DATA_MATRIX)).filter(Boolean);
    expect(linear).toEqual([`]C1${buildElementString({ sscc: '106141411234567897' })}`]);
    expect(matrix).toEqual([`\u001d00106141411234567897`]);
    for (const read of [...linear, ...matrix]) {
      expect(parseElementString(read!).sscc).toBe(packed.body.shipment.sscc);
    }
    expect(await countRows(t.dataSource, 'shipment_scans', 'shipment_id = ?', [leg.id])).toBe(11);
  });
});

describe('who works the lender side', () => {
  it('the fleet manager reads the board and the shipment; only the coordinator packs', async () => {
    const w = await kit.world();
    const { modelId, fibre } = await kit.modelWithPackingList(w.lender.id);
    const unit = await makeUnit(t.dataSource, modelId, w.lender.depotId);
    const loan = await kit.confirmedLoan(w, [unit]);
    const [leg] = await kit.legsOf(loan.id);
    // A year on: the GS1 two-digit year (AI 17 YYMMDD) is read within ±50 years of today.
    const [{ use_to: lastCaseDay }] = await t.dataSource.query(
      'SELECT CAST(use_to AS CHAR) AS use_to FROM loans WHERE id = ?',
      [loan.id],
    );
    const laterThanUse = addCalendarDays(lastCaseDay, 400);

    // Read: both lender roles see the leg on the board and open it.
    for (const person of [w.fleet, w.coordinator]) {
      const list = await person.agent.get(`/api/shipments?loanId=${loan.id}`).expect(200);
      expect(list.body.shipments.map((s: { id: number }) => s.id)).toEqual([leg.id]);
    }
    const asFleet = (await w.fleet.agent.get(`/api/shipments/${leg.id}`).expect(200)).body;
    const asCoordinator = (await w.coordinator.agent.get(`/api/shipments/${leg.id}`).expect(200))
      .body;
    // Work: the page offers the steps to the coordinator only.
    expect(asFleet.shipment.actions).toEqual([]);
    expect(asCoordinator.shipment.actions).toEqual(expect.arrayContaining(['scan', 'pack']));

    const scansBefore = await countRows(t.dataSource, 'shipment_scans', 'shipment_id = ?', [
      leg.id,
    ]);
    const refused = await kit
      .post(w.fleet, `/api/shipments/${leg.id}/scans`, {
        raw: buildElementString({ gtin: fibre, lot: 'L1', expiry: laterThanUse }),
      })
      .expect(403);
    expect(refused.body.error.message).toMatch(/coordinators/);
    await kit
      .post(w.fleet, `/api/shipments/${leg.id}/manual-ticks`, {
        itemId: asFleet.shipment.checklist[0].id,
        reason: 'Label torn',
      })
      .expect(403);
    await kit.post(w.fleet, `/api/shipments/${leg.id}/pack`).expect(403);
    // Nothing was written by the refused steps.
    expect(await countRows(t.dataSource, 'shipment_scans', 'shipment_id = ?', [leg.id])).toBe(
      scansBefore,
    );
    // The same scan from the coordinator ticks the line.
    await kit
      .post(w.coordinator, `/api/shipments/${leg.id}/scans`, {
        raw: buildElementString({ gtin: fibre, lot: 'L1', expiry: laterThanUse }),
      })
      .expect(201);
  });
});
