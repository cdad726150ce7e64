// Loan documents (purchase order, signed loan agreement): PDF only, recognised from the bytes
// (the PDF header `%PDF-`, ISO 32000-1 §7.5.2, as the `file-type` package reads it), at most
// 10 MB, stored outside the web root under random names, downloadable by the two parties only.
import { createHash } from 'node:crypto';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { startTestApp, type TestApp } from './helpers/app';
import {
  countRows,
  makeHospital,
  makeLender,
  type TestHospital,
  type TestLender,
} from './helpers/catalog';
import { signedInClient, type Client } from './helpers/http';
import { tinyPng } from './helpers/images';
import { insertApprovedLoan, minimalPdf } from './helpers/payments';

let t: TestApp;
let dir: string;

beforeAll(async () => {
  dir = await fs.mkdtemp(path.join(os.tmpdir(), 'evalon-documents-'));
  process.env.EVALON_DOCUMENT_DIR = dir;
  t = await startTestApp({}, { outboxWorker: false });
});
afterAll(async () => {
  await t?.close();
  delete process.env.EVALON_DOCUMENT_DIR;
  await fs.rm(dir, { recursive: true, force: true });
});

const sign = (person: { email: string; password: string }) =>
  signedInClient(t.app, person.email, person.password);

interface Parties {
  lender: TestLender;
  hospital: TestHospital;
  loanId: number;
  buyer: Client;
}

async function parties(): Promise<Parties> {
  const lender = await makeLender(t.dataSource);
  const hospital = await makeHospital(t.dataSource);
  const loan = await insertApprovedLoan(t.dataSource, lender, hospital);
  return { lender, hospital, loanId: loan.id, buyer: await sign(hospital.buyer) };
}

function upload(client: Client, loanId: number, kind: string | null, data: Buffer, name: string) {
  const req = client.agent
    .post(`/api/loans/${loanId}/documents`)
    .set('X-XSRF-TOKEN', client.csrf)
    .attach('file', data, { filename: name, contentType: 'application/pdf' });
  return kind === null ? req : req.field('kind', kind);
}

const storedFiles = async () =>
  (await fs.readdir(dir).catch(() => [])).filter((f) => f.endsWith('.pdf'));

describe('loan documents', () => {
  it('files a PDF and lets both parties, and only them, download it', async () => {
    const p = await parties();
    const pdf = minimalPdf('PO 2027-0042');
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const res = await upload(
      p.buyer,
      p.loanId,
      'purchase_order',
      pdf,
      '../../etc/PO 42.pdf',
    ).expect(201);
    const doc = res.body.document;
    expect(doc).toMatchObject({
      loanId: p.loanId,
      kind: 'purchase_order',
      // The path the browser sent is dropped; only the base name is kept for the download.
      originalName: 'PO 42.pdf',
      sizeBytes: pdf.length,
      sha256: createHash('sha256').update(pdf).digest('hex'),
      uploadedBy: p.hospital.buyer.name,
      downloadUrl: `/api/loans/${p.loanId}/documents/${doc.id}`,
    });
    const [row] = await t.dataSource.query('SELECT storage_key FROM loan_documents WHERE id = ?', [
      doc.id,
    ]);
    expect(row.storage_key).toMatch(/^[a-f0-9]{32}\.pdf$/);
    expect(await fs.readFile(path.join(dir, row.storage_key))).toEqual(pdf);

    const coordinator = await sign(p.lender.coordinator);
    for (const client of [p.buyer, coordinator]) {
      const list = await client.agent.get(`/api/loans/${p.loanId}/documents`).expect(200);
      expect(list.body.items.map((d: { id: number }) => d.id)).toEqual([doc.id]);
      const file = await client.agent
        .get(doc.downloadUrl)
        .buffer(true)
        .parse((r, cb) => {
          const chunks: Buffer[] = [];
          r.on('data', (c: Buffer) => chunks.push(c));
          r.on('end', () => cb(null, Buffer.concat(chunks)));
        })
        .expect(200);
      expect(file.headers['content-type']).toBe('application/pdf');
      expect(file.headers['content-disposition']).toBe('attachment; filename="PO 42.pdf"');
      expect(file.headers['x-content-type-options']).toBe('nosniff');
      expect(Buffer.compare(file.body as Buffer, pdf)).toBe(0);
    }

    // Another hospital and another lender see nothing (404, as for the loan itself).
    const strangers = await parties();
    const otherLender = await makeLender(t.dataSource);
    for (const client of [strangers.buyer, await sign(otherLender.fleet)]) {
      await client.agent.get(doc.downloadUrl).expect(404);
      await client.agent.get(`/api/loans/${p.loanId}/documents`).expect(404);
    }
    // A document id of another loan is not found under this loan.
    await p.buyer.agent.get(`/api/loans/${strangers.loanId}/documents/${doc.id}`).expect(404);

    expect(
      await countRows(
        t.dataSource,
        'audit_events',
        "action = 'loan.document_uploaded' AND subject = ?",
        [`loan:${p.loanId}`],
      ),
    ).toBe(1);
    expect(
      await countRows(
        t.dataSource,
        'audit_events',
        "action = 'loan.document_downloaded' AND subject = ?",
        [`loan:${p.loanId}`],
      ),
    ).toBe(2);
  });

  it('refuses a PNG renamed .pdf, a file over 10 MB, a missing kind and other roles', async () => {
    const p = await parties();
    const before = (await storedFiles()).length;
    const png = await upload(
      p.buyer,
      p.loanId,
      'loan_agreement',
      tinyPng(),
      'agreement.pdf',
    ).expect(415);
    expect(png.body.error.code).toBe('unsupported_document_type');

    // A real PDF padded past 10 MB (10 × 1024 × 1024 bytes is the limit).
    const big = Buffer.concat([minimalPdf(), Buffer.alloc(10 * 1024 * 1024, 0x20)]);
    const tooBig = await upload(p.buyer, p.loanId, 'loan_agreement', big, 'big.pdf').expect(413);
    expect(tooBig.body.error.code).toBe('document_too_large');

    const noKind = await upload(p.buyer, p.loanId, null, minimalPdf(), 'x.pdf').expect(422);
    expect(noKind.body.error.details.fieldErrors.kind).toBeDefined();
    await upload(p.buyer, p.loanId, 'invoice', minimalPdf(), 'x.pdf').expect(422);

    const clinician = await sign(p.hospital.clinician);
    await upload(clinician, p.loanId, 'purchase_order', minimalPdf(), 'x.pdf').expect(403);
    const fleet = await sign(p.lender.fleet);
    await upload(fleet, p.loanId, 'purchase_order', minimalPdf(), 'x.pdf').expect(403);

    expect(await countRows(t.dataSource, 'loan_documents', 'loan_id = ?', [p.loanId])).toBe(0);
    expect((await storedFiles()).length).toBe(before);

    await t.dataSource.query("UPDATE loans SET state = 'cancelled' WHERE id = ?", [p.loanId]);
    const late = await upload(p.buyer, p.loanId, 'purchase_order', minimalPdf(), 'x.pdf').expect(
      409,
    );
    expect(late.body.error.code).toBe('loan_not_active');
  });
});
