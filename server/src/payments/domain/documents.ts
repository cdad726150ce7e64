import { createHash } from 'node:crypto';
import path from 'node:path';
import {
  loanDocumentKindLabels,
  type LoanDocument,
  type LoanDocumentKind,
} from '@evalon/contracts';
import { insertAuditEvent } from '../../audit';
import { isBuyerOf } from '../../catalog';
import { LocalFileStore, newStorageKey } from '../../storage/file-store';
import type { AuthContext } from '../../identity';
import { canSeeLoan } from '../../loans';
import { AppError } from '../../errors';
import { findLoanDeposit } from '../data-access/loan-deposit-repository';
import {
  findLoanDocument,
  findLoanDocuments,
  insertLoanDocument,
  type LoanDocumentRow,
} from '../data-access/document-repository';
import type { PaymentsDeps } from './deps';

const keyPattern = /^[a-f0-9]{32}\.pdf$/;

/** A fresh random storage key (128 random bits); the person's file name is never used. */
export function newDocumentKey(): string {
  return newStorageKey('pdf');
}

/**
 * Loan documents as files in one folder outside the web root (default `.data/uploads/documents`),
 * behind the same file-store interface as model photos, so an S3-compatible object store can
 * replace both.
 */
export class LocalDocumentStore extends LocalFileStore {
  constructor(dir: string) {
    super(dir, keyPattern, 'document');
  }
}

/**
 * Whether the bytes are a PDF, as their magic bytes say (file-type), never the name or the
 * browser's word. file-type is ESM-only: loaded with a dynamic import of its `core` entry
 * (buffer detection), which Jest's CommonJS resolver can also load.
 */
export async function isPdf(data: Uint8Array): Promise<boolean> {
  const { fileTypeFromBuffer } = await import('file-type/core');
  const type = await fileTypeFromBuffer(data);
  return type?.mime === 'application/pdf';
}

/** A file name safe to offer back on download: no path, no control characters, ≤ 200 chars. */
export function cleanFileName(name: string | undefined, kind: LoanDocumentKind): string {
  const base = path.basename(String(name ?? '').replace(/\\/g, '/'));
  // Control characters (C0 and DEL) would break the header; the rest are unsafe on some disks.
  const cleaned = [...base]
    .filter((c) => c.charCodeAt(0) >= 0x20 && c.charCodeAt(0) !== 0x7f && !'"<>|*?:'.includes(c))
    .join('')
    .trim()
    .slice(0, 200);
  if (cleaned && cleaned !== '.' && cleaned !== '..') return cleaned;
  return `${loanDocumentKindLabels[kind].toLowerCase().replace(/\s+/g, '-')}.pdf`;
}

function toDocument(r: LoanDocumentRow): LoanDocument {
  return {
    id: r.id,
    loanId: r.loanId,
    kind: r.kind,
    originalName: r.originalName,
    sizeBytes: r.sizeBytes,
    sha256: r.sha256,
    uploadedBy: r.uploadedBy,
    uploadedAt: r.uploadedAt.toISOString(),
    downloadUrl: `/api/loans/${r.loanId}/documents/${r.id}`,
  };
}

async function loanFor(deps: Pick<PaymentsDeps, 'dataSource'>, auth: AuthContext, loanId: number) {
  const loan = await findLoanDeposit(deps.dataSource.manager, loanId);
  if (!loan || !canSeeLoan(auth, loan)) {
    throw AppError.notFound('loan_not_found', 'There is no such loan.');
  }
  return loan;
}

/**
 * Files a purchase order or signed loan agreement for a loan (a buyer of its hospital), while
 * the loan is live. Only PDFs (sniffed), at most 10 MB (the router refuses more before reading
 * it all). The file is stored first under a random name outside the web root, then the row
 * and an audit event are written; if they cannot be, the file is removed again.
 */
export async function uploadLoanDocument(
  deps: Pick<PaymentsDeps, 'dataSource' | 'documentStore' | 'now'>,
  auth: AuthContext,
  loanId: number,
  kind: LoanDocumentKind,
  file: { buffer: Buffer; originalname?: string },
): Promise<LoanDocument> {
  const loan = await loanFor(deps, auth, loanId);
  if (!isBuyerOf(auth, loan.hospitalId)) {
    throw AppError.forbidden('forbidden', 'Only buyers of the hospital can file loan documents.');
  }
  if (['declined', 'cancelled', 'expired'].includes(loan.state)) {
    throw AppError.conflict(
      'loan_not_active',
      `This loan is ${loan.state}; documents can no longer be filed.`,
      { state: loan.state },
    );
  }
  if (!(await isPdf(file.buffer))) {
    throw new AppError(
      415,
      'unsupported_document_type',
      'Upload a PDF; this file is something else.',
    );
  }
  const storageKey = newDocumentKey();
  const sha256 = createHash('sha256').update(file.buffer).digest('hex');
  const originalName = cleanFileName(file.originalname, kind);
  await deps.documentStore.put(storageKey, file.buffer, 'application/pdf');
  try {
    const id = await deps.dataSource.transaction(async (m) => {
      const now = deps.now();
      const docId = await insertLoanDocument(
        m,
        {
          loanId,
          kind,
          storageKey,
          originalName,
          contentType: 'application/pdf',
          sizeBytes: file.buffer.length,
          sha256,
          uploadedByUserId: auth.user.id,
        },
        now,
      );
      await insertAuditEvent(m, {
        actorUserId: auth.user.id,
        organisationId: loan.hospitalId,
        action: 'loan.document_uploaded',
        subject: `loan:${loanId}`,
        detail: { documentId: docId, kind, sizeBytes: file.buffer.length, sha256 },
        at: now,
      });
      return docId;
    });
    const row = await findLoanDocument(deps.dataSource.manager, loanId, id);
    return toDocument(row!);
  } catch (error) {
    await deps.documentStore.remove(storageKey).catch(() => undefined);
    throw error;
  }
}

/** The documents of a loan, for both parties (404 for anyone else). */
export async function listLoanDocuments(
  deps: Pick<PaymentsDeps, 'dataSource'>,
  auth: AuthContext,
  loanId: number,
): Promise<LoanDocument[]> {
  await loanFor(deps, auth, loanId);
  return (await findLoanDocuments(deps.dataSource.manager, loanId)).map(toDocument);
}

/** A document's bytes for both parties of the loan (404 for anyone else); audited. */
export async function readLoanDocument(
  deps: Pick<PaymentsDeps, 'dataSource' | 'documentStore' | 'now'>,
  auth: AuthContext,
  loanId: number,
  docId: number,
): Promise<{ data: Buffer; document: LoanDocument }> {
  const loan = await loanFor(deps, auth, loanId);
  const row = await findLoanDocument(deps.dataSource.manager, loanId, docId);
  const data = row ? await deps.documentStore.get(row.storageKey) : null;
  if (!row || !data) throw AppError.notFound('document_not_found', 'There is no such document.');
  await insertAuditEvent(deps.dataSource.manager, {
    actorUserId: auth.user.id,
    organisationId: auth.user.memberships.some((mb) => mb.organisationId === loan.hospitalId)
      ? loan.hospitalId
      : loan.lenderId,
    action: 'loan.document_downloaded',
    subject: `loan:${loanId}`,
    detail: { documentId: docId, kind: row.kind },
    at: deps.now(),
  });
  return { data, document: toDocument(row) };
}
