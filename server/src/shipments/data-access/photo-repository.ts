import type { EntityManager } from 'typeorm';

/** A row of `shipment_photos` as the use cases read it. */
export interface PhotoRow {
  id: number;
  shipmentId: number;
  kind: 'receipt' | 'finding';
  findingId: number | null;
  storageKey: string;
  contentType: 'image/jpeg' | 'image/png' | 'image/webp';
  sizeBytes: number;
  createdAt: Date;
  createdByUserId: number | null;
  /** Display name of the person who added it. */
  by: string | null;
  /** The finding's category and note, once tied to one. */
  caption: string | null;
}

type Sql = Record<string, unknown>;

const toPhotoRow = (r: Sql): PhotoRow => ({
  id: Number(r.id),
  shipmentId: Number(r.shipment_id),
  kind: r.kind as PhotoRow['kind'],
  findingId: r.finding_id === null ? null : Number(r.finding_id),
  storageKey: String(r.storage_key),
  contentType: r.content_type as PhotoRow['contentType'],
  sizeBytes: Number(r.size_bytes),
  createdAt: r.created_at as Date,
  createdByUserId: r.created_by_user_id === null ? null : Number(r.created_by_user_id),
  by: (r.actor_name as string | null) ?? null,
  caption:
    r.finding_category === null || r.finding_category === undefined
      ? null
      : `${String(r.finding_category)}: ${String(r.finding_note)}`,
});

const select = `SELECT p.*, u.name AS actor_name, f.category AS finding_category,
    f.note AS finding_note
  FROM shipment_photos p
  LEFT JOIN users u ON u.id = p.created_by_user_id
  LEFT JOIN inspection_findings f ON f.id = p.finding_id`;

/** A shipment's photos, oldest first. */
export async function findPhotos(m: EntityManager, shipmentId: number): Promise<PhotoRow[]> {
  const rows: Sql[] = await m.query(`${select} WHERE p.shipment_id = ? ORDER BY p.id`, [
    shipmentId,
  ]);
  return rows.map(toPhotoRow);
}

/** One photo of one shipment, or null. */
export async function findPhoto(
  m: EntityManager,
  shipmentId: number,
  photoId: number,
): Promise<PhotoRow | null> {
  const [r]: Sql[] = await m.query(`${select} WHERE p.id = ? AND p.shipment_id = ?`, [
    photoId,
    shipmentId,
  ]);
  return r ? toPhotoRow(r) : null;
}

/** How many photos of `kind` the shipment has, and how many of them wait for a finding. */
export async function countPhotos(
  m: EntityManager,
  shipmentId: number,
  kind: PhotoRow['kind'],
): Promise<{ all: number; pending: number }> {
  const [r]: Sql[] = await m.query(
    `SELECT COUNT(*) AS n, COALESCE(SUM(finding_id IS NULL), 0) AS pending
       FROM shipment_photos WHERE shipment_id = ? AND kind = ?`,
    [shipmentId, kind],
  );
  return { all: Number(r.n), pending: Number(r.pending) };
}

export async function insertPhoto(
  m: EntityManager,
  p: Omit<PhotoRow, 'id' | 'by' | 'caption' | 'findingId'>,
): Promise<number> {
  const result: { insertId: number } = await m.query(
    `INSERT INTO shipment_photos (shipment_id, kind, finding_id, storage_key, content_type,
        size_bytes, created_by_user_id, created_at) VALUES (?, ?, NULL, ?, ?, ?, ?, ?)`,
    [
      p.shipmentId,
      p.kind,
      p.storageKey,
      p.contentType,
      p.sizeBytes,
      p.createdByUserId,
      p.createdAt,
    ],
  );
  return Number(result.insertId);
}

/**
 * Ties waiting finding photos of the given return legs to a finding; answers how many were
 * tied (fewer than asked means some ids were not waiting photos of these legs).
 */
export async function claimFindingPhotos(
  m: EntityManager,
  shipmentIds: readonly number[],
  photoIds: readonly number[],
  findingId: number,
): Promise<number> {
  if (photoIds.length === 0 || shipmentIds.length === 0) return 0;
  const result: { affectedRows?: number } = await m.query(
    `UPDATE shipment_photos SET finding_id = ?
      WHERE id IN (?) AND shipment_id IN (?) AND kind = 'finding' AND finding_id IS NULL`,
    [findingId, photoIds, shipmentIds],
  );
  return result.affectedRows ?? 0;
}
