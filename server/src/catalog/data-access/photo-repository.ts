/* The `photos` table: model photos (the files themselves are in the photo store). */
import type { EntityManager } from 'typeorm';
import { PhotoEntity, type PhotoRow } from './entities';

/** Inserts a photo row and returns its id. */
export async function insertPhoto(m: EntityManager, photo: Omit<PhotoRow, 'id'>): Promise<number> {
  const result = await m.insert(PhotoEntity, photo);
  return Number(result.identifiers[0]?.id);
}

/** One photo with its model's lender, or null. */
export async function findPhoto(
  m: EntityManager,
  id: number,
): Promise<(PhotoRow & { lenderId: number }) | null> {
  const rows: {
    id: number;
    model_id: number;
    storage_key: string;
    content_type: PhotoRow['contentType'];
    size_bytes: number;
    created_at: Date;
    created_by_user_id: number | null;
    lender_id: number;
  }[] = await m.query(
    `SELECT ph.*, m.lender_id FROM model_photos ph JOIN models m ON m.id = ph.model_id
      WHERE ph.id = ?`,
    [id],
  );
  const r = rows[0];
  if (!r) return null;
  return {
    id: Number(r.id),
    modelId: Number(r.model_id),
    storageKey: r.storage_key,
    contentType: r.content_type,
    sizeBytes: Number(r.size_bytes),
    createdAt: r.created_at,
    createdByUserId: r.created_by_user_id === null ? null : Number(r.created_by_user_id),
    lenderId: Number(r.lender_id),
  };
}

/** How many photos a model has. */
export async function countPhotos(m: EntityManager, modelId: number): Promise<number> {
  return m.count(PhotoEntity, { where: { modelId } });
}

/** Deletes a photo row. */
export async function deletePhoto(m: EntityManager, id: number): Promise<void> {
  await m.delete(PhotoEntity, { id });
}
