import type { EntityManager } from 'typeorm';
import type { LoanDocumentKind } from '@evalon/contracts';

/** A row of `loan_documents` with the uploader's name. */
export interface LoanDocumentRow {
  id: number;
  loanId: number;
  kind: LoanDocumentKind;
  storageKey: string;
  originalName: string;
  contentType: string;
  sizeBytes: number;
  sha256: string;
  uploadedByUserId: number;
  uploadedBy: string;
  uploadedAt: Date;
}

interface DocumentSql {
  id: number;
  loan_id: number;
  kind: LoanDocumentKind;
  storage_key: string;
  original_name: string;
  content_type: string;
  size_bytes: number;
  sha256: string;
  uploaded_by_user_id: number;
  uploaded_by: string;
  uploaded_at: Date;
}

const select = `SELECT d.id, d.loan_id, d.kind, d.storage_key, d.original_name, d.content_type,
         d.size_bytes, d.sha256, d.uploaded_by_user_id, u.name AS uploaded_by, d.uploaded_at
    FROM loan_documents d JOIN users u ON u.id = d.uploaded_by_user_id`;

function toRow(r: DocumentSql): LoanDocumentRow {
  return {
    id: Number(r.id),
    loanId: Number(r.loan_id),
    kind: r.kind,
    storageKey: r.storage_key,
    originalName: r.original_name,
    contentType: r.content_type,
    sizeBytes: Number(r.size_bytes),
    sha256: r.sha256,
    uploadedByUserId: Number(r.uploaded_by_user_id),
    uploadedBy: r.uploaded_by,
    uploadedAt: new Date(r.uploaded_at),
  };
}

/** Inserts a document row; returns its id. */
export async function insertLoanDocument(
  m: EntityManager,
  d: Omit<LoanDocumentRow, 'id' | 'uploadedBy' | 'uploadedAt'>,
  now: Date,
): Promise<number> {
  const result: { insertId: number } = await m.query(
    `INSERT INTO loan_documents (loan_id, kind, storage_key, original_name, content_type,
        size_bytes, sha256, uploaded_by_user_id, uploaded_at)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    [
      d.loanId,
      d.kind,
      d.storageKey,
      d.originalName,
      d.contentType,
      d.sizeBytes,
      d.sha256,
      d.uploadedByUserId,
      now,
    ],
  );
  return Number(result.insertId);
}

/** A loan's documents, newest first. */
export async function findLoanDocuments(
  m: EntityManager,
  loanId: number,
): Promise<LoanDocumentRow[]> {
  const rows: DocumentSql[] = await m.query(`${select} WHERE d.loan_id = ? ORDER BY d.id DESC`, [
    loanId,
  ]);
  return rows.map(toRow);
}

/** One document of a loan, or null (a document of another loan is not found). */
export async function findLoanDocument(
  m: EntityManager,
  loanId: number,
  docId: number,
): Promise<LoanDocumentRow | null> {
  const rows: DocumentSql[] = await m.query(`${select} WHERE d.loan_id = ? AND d.id = ?`, [
    loanId,
    docId,
  ]);
  return rows[0] ? toRow(rows[0]) : null;
}
