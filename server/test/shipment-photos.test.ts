// Receipt and inspection photos on shipments against the real database, the payments fake and
// the carrier stand-in. Formats are decided from the bytes (magic numbers: PNG signature per
// ISO/IEC 15948, JPEG SOI marker per ITU-T T.81, PDF header per ISO 32000), never the file name.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import type { TestApp } from './helpers/app';
import type { RunningCarrier } from './helpers/carrier';
import { countRows, makeHospital, makeUnit } from './helpers/catalog';
import { signedInClient, type Client } from './helpers/http';
import { tinyJpeg, tinyPng } from './helpers/images';
import type { RunningFake } from './helpers/payments';
import { shipmentKit, startShipmentStandIns, type ShipmentStandIns } from './helpers/shipments';

jest.setTimeout(120_000);

// Photos go to a folder of this test run (the app reads EVALON_UPLOAD_DIR at start).
const uploadDir = fs.mkdtempSync(path.join(os.tmpdir(), 'evalon-shipment-photos-'));
process.env.EVALON_UPLOAD_DIR = uploadDir;

let t: TestApp;
let fake: RunningFake;
let carrier: RunningCarrier;

let standIns: ShipmentStandIns | undefined;

beforeAll(async () => {
  standIns = await startShipmentStandIns();
  ({ t, fake, carrier } = standIns);
});
afterAll(async () => {
  await standIns?.close();
  fs.rmSync(uploadDir, { recursive: true, force: true });
});

const kit = shipmentKit(
  () => t,
  () => fake,
);
const { post, world, modelWithPackingList, confirmedLoan, legsOf, packed } = kit;

const upload = (c: Client, shipmentId: number, data: Buffer, filename: string) =>
  c.agent
    .post(`/api/shipments/${shipmentId}/photos`)
    .set('X-XSRF-TOKEN', c.csrf)
    .attach('photo', data, { filename, contentType: 'application/octet-stream' });
const storedFiles = () => fs.readdirSync(uploadDir).filter((f) => !f.endsWith('.part'));
const photoRows = (shipmentId: number) =>
  countRows(t.dataSource, 'shipment_photos', 'shipment_id = ?', [shipmentId]);

/** Moves a leg on through the carrier stand-in and waits for its webhooks. */
async function deliver(trackingNumber: string) {
  await carrier.control('POST', `/shipments/${trackingNumber}/advance`, { to: 'delivered' });
  await carrier.control('POST', '/webhooks/flush', {});
}

describe('shipment photos', () => {
  it('receipt photos by the buyer, inspection photos by the coordinator tied to findings', async () => {
    const w = await world();
    const a = await modelWithPackingList(w.lender.id);
    const unit = await makeUnit(t.dataSource, a.modelId, w.lender.depotId);
    const loan = await confirmedLoan(w, [unit]);
    const [out] = await legsOf(loan.id);

    // Not delivered yet: no receipt photos.
    const early = await upload(w.buyer, out.id, tinyPng(), 'box.png').expect(409);
    expect(early.body.error.code).toBe('illegal_state');

    await packed(out.id);
    const handed = await post(w.coordinator, `/api/shipments/${out.id}/hand-over`, {
      carrier: 'wendrow',
      service: 'standard',
    }).expect(200);
    await deliver(handed.body.shipment.trackingNumber);
    expect((await legsOf(loan.id))[0].state).toBe('delivered');

    // The lender does not add receipt photos; the buyer does. The name says JPEG, the bytes PNG.
    await upload(w.coordinator, out.id, tinyPng(), 'box.png').expect(403);
    const png = tinyPng(4, 3);
    const first = await upload(w.buyer, out.id, png, 'dented-case.jpg').expect(201);
    expect(first.body.photo).toMatchObject({
      kind: 'receipt',
      findingId: null,
      contentType: 'image/png',
      sizeBytes: png.length,
    });
    await upload(w.buyer, out.id, tinyJpeg(), 'label.png')
      .expect(201)
      .expect((r) => expect(r.body.photo.contentType).toBe('image/jpeg'));

    // Refused with 422 and nothing stored: things pretending to be photos, empty, too big.
    const rowsBefore = await photoRows(out.id);
    const filesBefore = storedFiles().length;
    const refusals: [Buffer, string, string][] = [
      [
        Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>'),
        'photo.png',
        'unsupported_photo_type',
      ],
      [
        Buffer.from('<!doctype html><html><body>hi</body></html>'),
        'photo.jpg',
        'unsupported_photo_type',
      ],
      [
        Buffer.from('%PDF-1.4\n%\u00e2\u00e3\u00cf\u00d3\n1 0 obj\n<<>>\nendobj\n', 'latin1'),
        'photo.webp',
        'unsupported_photo_type',
      ],
      [Buffer.alloc(0), 'empty.png', 'photo_empty'],
      [Buffer.concat([tinyPng(), Buffer.alloc(5 * 1024 * 1024)]), 'big.png', 'photo_too_large'],
    ];
    for (const [data, name, code] of refusals) {
      const res = await upload(w.buyer, out.id, data, name).expect(422);
      expect(res.body.error).toMatchObject({ code, message: expect.any(String) });
    }
    expect(await photoRows(out.id)).toBe(rowsBefore);
    expect(storedFiles()).toHaveLength(filesBefore);

    // Served to people who may see the shipment: sniffed type, nosniff, the same bytes.
    const url = `/api/shipments/${out.id}/photos/${first.body.photo.id}`;
    const served = await w.buyer.agent.get(url).expect(200);
    expect(served.headers['content-type']).toBe('image/png');
    expect(served.headers['x-content-type-options']).toBe('nosniff');
    expect(served.headers['content-disposition']).toMatch(
      /^inline; filename="[^"/]+-photo-\d+\.png"$/,
    );
    expect(Buffer.compare(served.body as Buffer, png)).toBe(0);
    await w.fleet.agent.get(url).expect(200);
    // Another hospital's buyer, or the photo under another shipment, finds nothing.
    const other = await makeHospital(t.dataSource);
    const stranger = await signedInClient(t.app, other.buyer.email, other.buyer.password);
    await stranger.agent.get(url).expect(404);
    await request(t.app).get(url).expect(401);

    // At most 8 on one receipt (two stored above).
    for (let i = 0; i < 6; i++)
      await upload(w.buyer, out.id, tinyPng(1, i + 1), 'p.png').expect(201);
    const ninth = await upload(w.buyer, out.id, tinyPng(), 'p.png').expect(409);
    expect(ninth.body.error.code).toBe('too_many_photos');
    const detail = (await w.buyer.agent.get(`/api/shipments/${out.id}`).expect(200)).body.shipment;
    expect(detail.photos).toHaveLength(8);
    expect(new Set(detail.photos.map((p: { kind: string }) => p.kind))).toEqual(
      new Set(['receipt']),
    );

    // Once receipt is confirmed, its photos are closed.
    await post(w.buyer, `/api/shipments/${out.id}/receipt`, { notes: 'Case dented' }).expect(200);
    await upload(w.buyer, out.id, tinyPng(), 'late.png').expect(409);

    // The return: attested, handed over, delivered, received at the depot.
    const ret = (await legsOf(loan.id))[1];
    await post(w.buyer, `/api/shipments/${ret.id}/decontamination`, {
      method: 'Manual clean and low-temperature sterilisation per the IFU',
      by: 'Sterile processing',
      at: new Date(Date.now() - 3_600_000).toISOString(),
    }).expect(200);
    const back = await post(w.buyer, `/api/shipments/${ret.id}/hand-over`, {}).expect(200);
    // In transit: too early for inspection photos.
    await upload(w.coordinator, ret.id, tinyPng(), 'x.png').expect(409);
    await deliver(back.body.shipment.trackingNumber);
    await post(w.coordinator, `/api/shipments/${ret.id}/receive`).expect(200);

    await upload(w.buyer, ret.id, tinyPng(), 'x.png').expect(403);
    await upload(w.fleet, ret.id, tinyPng(), 'x.png').expect(403);
    const f1 = (await upload(w.coordinator, ret.id, tinyJpeg(), 'crack.jpg').expect(201)).body
      .photo;
    const f2 = (await upload(w.coordinator, ret.id, tinyPng(5, 5), 'crack2.png').expect(201)).body
      .photo;
    expect(f1).toMatchObject({ kind: 'finding', findingId: null });

    const finding = {
      unitId: unit,
      category: 'damage',
      note: 'Cracked fibre connector',
      charge: 25_000,
      needsRepair: false,
    };
    // A photo of the receipt (another leg) or an unknown one rolls the whole inspection back.
    const bad = await post(w.coordinator, `/api/loans/${loan.id}/inspection`, {
      findings: [{ ...finding, photoIds: [f1.id, first.body.photo.id] }],
    }).expect(422);
    expect(bad.body.error.code).toBe('unknown_photos');
    expect(await countRows(t.dataSource, 'inspection_findings', 'loan_id = ?', [loan.id])).toBe(0);
    expect((await legsOf(loan.id))[1].state).toBe('received');
    // More than four photos on one finding is refused by the contract.
    await post(w.coordinator, `/api/loans/${loan.id}/inspection`, {
      findings: [{ ...finding, photoIds: [1, 2, 3, 4, 5] }],
    }).expect(422);

    await post(w.coordinator, `/api/loans/${loan.id}/inspection`, {
      findings: [{ ...finding, photoIds: [f1.id, f2.id] }],
    }).expect(204);
    const [row] = await t.dataSource.query('SELECT id FROM inspection_findings WHERE loan_id = ?', [
      loan.id,
    ]);
    const inspected = (await w.fleet.agent.get(`/api/shipments/${ret.id}`).expect(200)).body
      .shipment;
    expect(
      inspected.photos.map((p: { id: number; findingId: number; caption: string }) => [
        p.id,
        p.findingId,
        p.caption,
      ]),
    ).toEqual([
      [f1.id, Number(row.id), 'damage: Cracked fibre connector'],
      [f2.id, Number(row.id), 'damage: Cracked fibre connector'],
    ]);
    // The buyer sees the depot's photos of their loan's return too.
    await w.buyer.agent.get(`/api/shipments/${ret.id}/photos/${f1.id}`).expect(200);
    // After the inspection, no more finding photos.
    await upload(w.coordinator, ret.id, tinyPng(), 'late.png').expect(409);
    // The history keeps who added which photo.
    expect(
      await countRows(
        t.dataSource,
        'shipment_events',
        "shipment_id = ? AND kind = 'note' AND message LIKE 'Inspection photo%'",
        [ret.id],
      ),
    ).toBe(2);
  });
});
