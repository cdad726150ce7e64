// Hostile uploads against the loan documents (PDF) and model photos (JPEG/PNG/WebP): each is
// refused with a clear code, or stored under a random name inside its folder and served as an
// attachment with `nosniff`. Nothing lands outside the folders. The attack list follows the
// OWASP File Upload Cheat Sheet (content-type spoofing, extension tricks, path traversal in the
// name, zero-length and oversized files, decompression bombs) — from memory of that page.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { startTestApp, type TestApp } from './helpers/app';
import { countRows, makeHospital, makeLender, makeModel } from './helpers/catalog';
import { signedInClient, type Client } from './helpers/http';
import { insertApprovedLoan, minimalPdf } from './helpers/payments';

// Both folders sit inside one parent of this run, so "nothing outside" can be checked.
const parent = fs.mkdtempSync(path.join(os.tmpdir(), 'evalon-upload-attacks-'));
const documentDir = path.join(parent, 'documents');
const photoDir = path.join(parent, 'photos');
let t: TestApp;
let buyer: Client;
let fleet: Client;
let loanId: number;
let modelId: number;

beforeAll(async () => {
  t = await startTestApp(
    { EVALON_DOCUMENT_DIR: documentDir, EVALON_UPLOAD_DIR: photoDir },
    { outboxWorker: false },
  );
  const lender = await makeLender(t.dataSource);
  const hospital = await makeHospital(t.dataSource);
  loanId = (await insertApprovedLoan(t.dataSource, lender, hospital)).id;
  modelId = await makeModel(t.dataSource, lender.id);
  buyer = await signedInClient(t.app, hospital.buyer.email, hospital.buyer.password);
  fleet = await signedInClient(t.app, lender.fleet.email, lender.fleet.password);
});
afterAll(async () => {
  await t?.close();
  fs.rmSync(parent, { recursive: true, force: true });
});

function document(data: Buffer, filename: string, contentType = 'application/pdf') {
  return buyer.agent
    .post(`/api/loans/${loanId}/documents`)
    .set('X-XSRF-TOKEN', buyer.csrf)
    .field('kind', 'purchase_order')
    .attach('file', data, { filename, contentType });
}

function photo(data: Buffer, filename: string, contentType: string) {
  return fleet.agent
    .post(`/api/models/${modelId}/photos`)
    .set('X-XSRF-TOKEN', fleet.csrf)
    .attach('photo', data, { filename, contentType });
}

const files = (dir: string) => (fs.existsSync(dir) ? fs.readdirSync(dir) : []);
const documentRows = () => countRows(t.dataSource, 'loan_documents', 'loan_id = ?', [loanId]);
const photoRows = () => countRows(t.dataSource, 'model_photos', 'model_id = ?', [modelId]);

/** A PDF whose one stream is `size` zero bytes deflated (ISO 32000-1 §7.4.4 FlateDecode). */
function deflateBombPdf(size: number): Buffer {
  const packed = zlib.deflateSync(Buffer.alloc(size));
  const head = Buffer.from(
    `%PDF-1.7\n1 0 obj\n<< /Length ${packed.length} /Filter /FlateDecode >>\nstream\n`,
    'latin1',
  );
  return Buffer.concat([head, packed, Buffer.from('\nendstream\nendobj\n%%EOF\n', 'latin1')]);
}

describe('hostile uploads', () => {
  it('refuses HTML inside a .pdf, a zero-byte document, and writes nothing', async () => {
    const before = await documentRows();
    const html = Buffer.from('<html><body><script>alert(document.cookie)</script></body></html>');
    const a = await document(html, 'order.pdf').expect(415);
    expect(a.body.error.code).toBe('unsupported_document_type');
    const b = await document(Buffer.alloc(0), 'empty.pdf');
    expect([415, 422]).toContain(b.status);
    expect(typeof b.body.error.message).toBe('string');
    expect(await documentRows()).toBe(before);
    expect(files(documentDir).filter((f) => !f.endsWith('.part'))).toEqual([]);
  });

  it('refuses SVG with script, HTML and zero bytes as a photo (415/422), writing nothing', async () => {
    const svg = Buffer.from(
      '<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>',
    );
    const html = Buffer.from('<!doctype html><script>alert(1)</script>');
    for (const [data, name, type] of [
      [svg, 'unit.svg', 'image/svg+xml'],
      [svg, 'unit.png', 'image/png'],
      [html, 'unit.jpg', 'image/jpeg'],
    ] as const) {
      const res = await photo(data, name, type).expect(415);
      expect(res.body.error.code).toBe('unsupported_photo_type');
    }
    const empty = await photo(Buffer.alloc(0), 'empty.png', 'image/png');
    expect([415, 422]).toContain(empty.status);
    expect(await photoRows()).toBe(0);
    expect(files(photoDir).filter((f) => !f.endsWith('.part'))).toEqual([]);
  });

  it('believes the bytes, not a lying content type or a traversal name, and serves an attachment', async () => {
    const pdf = minimalPdf('Lying type');
    const res = await document(pdf, '..%2F..%2F..\\..\\evil.html', 'text/html').expect(201);
    const doc = res.body.document;
    const [row] = await t.dataSource.query(
      'SELECT storage_key, content_type FROM loan_documents WHERE id = ?',
      [doc.id],
    );
    expect(row.storage_key).toMatch(/^[a-f0-9]{32}\.pdf$/);
    expect(row.content_type).toBe('application/pdf');
    const file = await buyer.agent.get(doc.downloadUrl).buffer(true).expect(200);
    expect(file.headers['content-type']).toBe('application/pdf');
    expect(file.headers['content-disposition']).toMatch(/^attachment;/);
    expect(file.headers['x-content-type-options']).toBe('nosniff');
  });

  it('stores a deflate-bomb-like PDF as sent, never inflating it', async () => {
    // 64 MB of zeros packs to about 64 kB: under the 10 MB limit, so it is a valid upload; the
    // server only reads the header bytes, so the stored file is the small one.
    const bomb = deflateBombPdf(64 * 1024 * 1024);
    expect(bomb.length).toBeLessThan(200_000);
    const started = Date.now();
    const res = await document(bomb, 'bomb.pdf').expect(201);
    expect(Date.now() - started).toBeLessThan(10_000);
    const [row] = await t.dataSource.query('SELECT storage_key FROM loan_documents WHERE id = ?', [
      res.body.document.id,
    ]);
    expect(fs.statSync(path.join(documentDir, row.storage_key)).size).toBe(bomb.length);
  });

  it('takes 12 uploads at once without a 5xx; every stored row has its file', async () => {
    const before = await documentRows();
    const results = await Promise.all(
      Array.from({ length: 12 }, (_, i) => document(minimalPdf(`Burst ${i}`), `burst-${i}.pdf`)),
    );
    const statuses = results.map((r) => r.status);
    expect(statuses.filter((s) => s >= 500)).toEqual([]);
    const stored = statuses.filter((s) => s === 201).length;
    expect(await documentRows()).toBe(before + stored);
    const keys: { storage_key: string }[] = await t.dataSource.query(
      'SELECT storage_key FROM loan_documents WHERE loan_id = ?',
      [loanId],
    );
    for (const k of keys) expect(fs.existsSync(path.join(documentDir, k.storage_key))).toBe(true);
  });

  it('wrote nothing outside the two upload folders', () => {
    expect(fs.readdirSync(parent).sort()).toEqual(
      ['documents', 'photos'].filter((d) => fs.existsSync(path.join(parent, d))),
    );
    for (const dir of [documentDir, photoDir]) {
      for (const f of files(dir)) expect(f).toMatch(/^[a-f0-9]{32}\.[a-z]+(\.part)?$/);
    }
  });
});
