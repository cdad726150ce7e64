import { shipmentPhotoLimits, type ShipmentPhoto } from '@evalon/contracts';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { newStorageKey } from '../../storage/file-store';
import {
  countPhotos,
  findPhoto,
  insertPhoto,
  type PhotoRow,
} from '../data-access/photo-repository';
import { findShipment, insertEvent } from '../data-access/shipment-repository';
import { requireSide, rolesOn } from './access';
import type { ShipmentsDeps } from './deps';
import { lockForChange } from './handling';

/** The photo types we keep, with the extension the uploads store expects for each. */
const photoExtensions = { 'image/jpeg': 'jpg', 'image/png': 'png', 'image/webp': 'webp' } as const;
type PhotoType = keyof typeof photoExtensions;

/**
 * The image type as the bytes' magic numbers say (file-type), or what else they are. SVG and
 * HTML are text and have no magic number, so they come back as null, like any unknown bytes.
 * file-type is ESM-only: its `core` entry is loaded with a dynamic import (see catalog photos).
 */
async function sniff(
  data: Uint8Array,
): Promise<{ type: PhotoType | null; detected: string | null }> {
  const { fileTypeFromBuffer } = await import('file-type/core');
  const mime = (await fileTypeFromBuffer(data))?.mime ?? null;
  return { type: mime && mime in photoExtensions ? (mime as PhotoType) : null, detected: mime };
}

export const toShipmentPhoto = (p: PhotoRow): ShipmentPhoto => ({
  id: p.id,
  kind: p.kind,
  findingId: p.findingId,
  caption: p.caption,
  contentType: p.contentType,
  sizeBytes: p.sizeBytes,
  createdAt: p.createdAt.toISOString(),
  by: p.by,
});

/**
 * Adds a photo to a shipment. Outbound, delivered, receipt not yet confirmed: the hospital's
 * buyer documents what arrived. Return, received at the depot, not yet inspected: the lender's
 * coordinator documents a finding (the inspection ties it to the finding). The bytes are
 * checked (not empty, JPEG/PNG/WebP by their magic numbers) before anything is stored; the file
 * is stored under a random key first and removed again if the row cannot be written.
 */
export async function addShipmentPhoto(
  deps: ShipmentsDeps,
  auth: AuthContext,
  shipmentId: number,
  data: Buffer,
): Promise<ShipmentPhoto> {
  const probe = await findShipment(deps.dataSource.manager, shipmentId);
  if (!probe) throw AppError.notFound('shipment_not_found', 'There is no such shipment.');
  requireSide(auth, probe, probe.direction === 'outbound' ? 'buyer' : 'lender');
  if (data.length === 0) {
    throw AppError.field('photo_empty', 'photo', 'The file is empty; choose the photo again.');
  }
  if (data.length > shipmentPhotoLimits.maxBytes) throw photoTooLarge();
  const { type, detected } = await sniff(data);
  if (!type) {
    throw new AppError(
      422,
      'unsupported_photo_type',
      'Upload a JPEG, PNG or WebP photo; this file is something else' +
        (detected ? ` (${detected}).` : '.'),
      { detected },
    );
  }

  const storageKey = newStorageKey(photoExtensions[type]);
  await deps.photoStore.put(storageKey, data, type);
  try {
    const id = await deps.dataSource.transaction('READ COMMITTED', async (m) => {
      const now = deps.now();
      const { shipment } = await lockForChange(m, shipmentId);
      const kind = shipment.direction === 'outbound' ? 'receipt' : 'finding';
      if (kind === 'receipt' && (shipment.state !== 'delivered' || shipment.receipt)) {
        throw AppError.conflict(
          'illegal_state',
          'Receipt photos are added to a delivered shipment before its receipt is confirmed.',
          { state: shipment.state },
        );
      }
      if (kind === 'finding' && shipment.state !== 'received') {
        throw AppError.conflict(
          'illegal_state',
          'Inspection photos are added once the return is received and before it is inspected.',
          { state: shipment.state },
        );
      }
      const count = await countPhotos(m, shipmentId, kind);
      if (kind === 'receipt' && count.all >= shipmentPhotoLimits.perReceipt) {
        throw AppError.conflict(
          'too_many_photos',
          `A receipt can carry at most ${shipmentPhotoLimits.perReceipt} photos.`,
          { limit: shipmentPhotoLimits.perReceipt },
        );
      }
      if (kind === 'finding' && count.pending >= shipmentPhotoLimits.pendingPerReturn) {
        throw AppError.conflict(
          'too_many_photos',
          `At most ${shipmentPhotoLimits.pendingPerReturn} photos can wait for the inspection; ` +
            `each finding takes up to ${shipmentPhotoLimits.perFinding}.`,
          { limit: shipmentPhotoLimits.pendingPerReturn },
        );
      }
      const photoId = await insertPhoto(m, {
        shipmentId,
        kind,
        storageKey,
        contentType: type,
        sizeBytes: data.length,
        createdByUserId: auth.user.id,
        createdAt: now,
      });
      // The shipment's history is its audit trail.
      await insertEvent(
        m,
        {
          shipmentId,
          kind: 'note',
          fromState: null,
          toState: null,
          carrierEventId: null,
          carrierStatus: null,
          message:
            kind === 'receipt'
              ? `Receipt photo ${photoId} added.`
              : `Inspection photo ${photoId} added.`,
          ignored: false,
          occurredAt: now,
          actorUserId: auth.user.id,
        },
        now,
      );
      return photoId;
    });
    const row = await findPhoto(deps.dataSource.manager, shipmentId, id);
    return toShipmentPhoto(row!);
  } catch (error) {
    await deps.photoStore.remove(storageKey).catch(() => undefined);
    throw error;
  }
}

/** The refusal for a file over the size limit (422: the person picks a smaller photo). */
export function photoTooLarge(): AppError {
  const mb = shipmentPhotoLimits.maxBytes / (1024 * 1024);
  return AppError.field(
    'photo_too_large',
    'photo',
    `The photo is larger than ${mb} MB; take it at a lower resolution or crop it.`,
  );
}

/** A shipment photo's bytes for anyone who may see the shipment; 404 otherwise. */
export async function readShipmentPhoto(
  deps: ShipmentsDeps,
  auth: AuthContext,
  shipmentId: number,
  photoId: number,
): Promise<{ data: Buffer; contentType: PhotoType; filename: string }> {
  const m = deps.dataSource.manager;
  const shipment = await findShipment(m, shipmentId);
  const photo =
    shipment && rolesOn(auth, shipment).sees ? await findPhoto(m, shipmentId, photoId) : null;
  const data = photo ? await deps.photoStore.get(photo.storageKey) : null;
  if (!photo || !data) throw AppError.notFound('photo_not_found', 'There is no such photo.');
  return {
    data,
    contentType: photo.contentType,
    filename: `${shipment!.reference}-photo-${photo.id}.${photoExtensions[photo.contentType]}`,
  };
}
