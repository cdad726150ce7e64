import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { LocalPhotoStore, type PhotoStore } from '../src/catalog/domain/photo-store';
import { startTestApp, type TestApp } from './helpers/app';
import { countRows, makeHospital, makeLender, makeModel, type TestLender } from './helpers/catalog';
import { signedInClient, type Client } from './helpers/http';
import { tinyJpeg, tinyPng } from './helpers/images';

// Photos go to a folder of this test run, never the repository's .data/uploads.
// EVALON_UPLOAD_DIR is read by the app from the environment (Jest gives each file its own copy).
const uploadDir = fs.mkdtempSync(path.join(os.tmpdir(), 'evalon-uploads-'));
process.env.EVALON_UPLOAD_DIR = uploadDir;
let t: TestApp;
let lender: TestLender;
let fleet: Client;
beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
  lender = await makeLender(t.dataSource);
  fleet = await signedInClient(t.app, lender.fleet.email, lender.fleet.password);
});
afterAll(async () => {
  await t.close();
  fs.rmSync(uploadDir, { recursive: true, force: true });
});

function upload(client: Client, modelId: number, data: Buffer, filename: string) {
  return client.agent
    .post(`/api/models/${modelId}/photos`)
    .set('X-XSRF-TOKEN', client.csrf)
    .attach('photo', data, { filename, contentType: 'application/octet-stream' });
}

const storedFiles = () => fs.readdirSync(uploadDir).filter((f) => !f.endsWith('.part'));

describe('model photos', () => {
  it('stores a PNG and a JPEG under random names and serves them with the sniffed type', async () => {
    const modelId = await makeModel(t.dataSource, lender.id);
    const png = tinyPng(3, 2);
    // The file name claims JPEG; the bytes are PNG, and the bytes win.
    const first = await upload(fleet, modelId, png, 'scope.jpg').expect(201);
    expect(first.body.photo).toMatchObject({
      modelId,
      contentType: 'image/png',
      sizeBytes: png.length,
    });
    const jpeg = tinyJpeg();
    const second = await upload(fleet, modelId, jpeg, 'tower.png').expect(201);
    expect(second.body.photo.contentType).toBe('image/jpeg');

    const rows = await t.dataSource.query(
      'SELECT id, storage_key, content_type, size_bytes FROM model_photos WHERE model_id = ? ORDER BY id',
      [modelId],
    );
    expect(rows.map((r: { content_type: string }) => r.content_type)).toEqual([
      'image/png',
      'image/jpeg',
    ]);
    for (const r of rows) {
      expect(r.storage_key).toMatch(/^[a-f0-9]{32}\.(png|jpg)$/);
      expect(r.storage_key).not.toMatch(/scope|tower/);
      expect(fs.existsSync(path.join(uploadDir, r.storage_key))).toBe(true);
    }

    const served = await fleet.agent.get(first.body.photo.url).expect(200);
    expect(served.headers['content-type']).toBe('image/png');
    expect(served.headers['x-content-type-options']).toBe('nosniff');
    expect(Buffer.compare(served.body as Buffer, png)).toBe(0);

    const model = await fleet.agent.get(`/api/models/${modelId}`).expect(200);
    expect(model.body.model.photoIds).toEqual(rows.map((r: { id: number }) => r.id));

    // Any signed-in person may look; nobody else.
    const hospital = await makeHospital(t.dataSource);
    const buyer = await signedInClient(t.app, hospital.buyer.email, hospital.buyer.password);
    await buyer.agent.get(second.body.photo.url).expect(200).expect('Content-Type', 'image/jpeg');
    const anonymous = await request(t.app).get(second.body.photo.url).expect(401);
    expect(anonymous.body.error.code).toBe('not_signed_in');
  });

  it('refuses a text file named .png (415) and writes nothing', async () => {
    const modelId = await makeModel(t.dataSource, lender.id);
    const before = storedFiles().length;
    const res = await upload(
      fleet,
      modelId,
      Buffer.from('hello, this is not an image\n'),
      'photo.png',
    ).expect(415);
    expect(res.body.error.code).toBe('unsupported_photo_type');
    // A PDF is a known type, but not a photo.
    await upload(
      fleet,
      modelId,
      Buffer.from('%PDF-1.4\n%âãÏÓ\n1 0 obj\n<<>>\nendobj\n'),
      'photo.jpg',
    ).expect(415);
    expect(await countRows(t.dataSource, 'model_photos', 'model_id = ?', [modelId])).toBe(0);
    expect(storedFiles().length).toBe(before);
  });

  it('refuses a photo over 5 MB (413) and a request without a file (422)', async () => {
    const modelId = await makeModel(t.dataSource, lender.id);
    const big = Buffer.concat([tinyPng(), Buffer.alloc(5 * 1024 * 1024)]);
    const res = await upload(fleet, modelId, big, 'big.png').expect(413);
    expect(res.body.error.code).toBe('photo_too_large');
    const none = await fleet.agent
      .post(`/api/models/${modelId}/photos`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .field('note', 'no file')
      .expect(422);
    expect(none.body.error.code).toBe('photo_missing');
    expect(await countRows(t.dataSource, 'model_photos', 'model_id = ?', [modelId])).toBe(0);
  });

  it('lets only the owning lender’s fleet manager add and delete; deleting removes the file', async () => {
    const modelId = await makeModel(t.dataSource, lender.id);
    const other = await makeLender(t.dataSource);
    const otherFleet = await signedInClient(t.app, other.fleet.email, other.fleet.password);
    await upload(otherFleet, modelId, tinyPng(), 'x.png').expect(403);
    const added = await upload(fleet, modelId, tinyPng(), 'x.png').expect(201);
    const [row] = await t.dataSource.query('SELECT storage_key FROM model_photos WHERE id = ?', [
      added.body.photo.id,
    ]);
    await otherFleet.agent
      .delete(`/api/models/${modelId}/photos/${added.body.photo.id}`)
      .set('X-XSRF-TOKEN', otherFleet.csrf)
      .expect(403);
    await fleet.agent
      .delete(`/api/models/${modelId}/photos/${added.body.photo.id}`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .expect(204);
    expect(await countRows(t.dataSource, 'model_photos', 'id = ?', [added.body.photo.id])).toBe(0);
    expect(fs.existsSync(path.join(uploadDir, row.storage_key))).toBe(false);
    await fleet.agent.get(added.body.photo.url).expect(404);
  });

  it('the local store refuses keys that are not its own random names', async () => {
    const store: PhotoStore = new LocalPhotoStore(uploadDir);
    await expect(store.get('../../etc/passwd')).rejects.toThrow(/not a photo storage key/);
    await expect(store.put('a.png', Buffer.from('x'), 'image/png')).rejects.toThrow();
  });
});
