import type { Photo } from '@evalon/contracts';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { countPhotos, deletePhoto, findPhoto, insertPhoto } from '../data-access/photo-repository';
import type { CatalogDeps } from './deps';
import { modelForChange, toPhoto } from './models';
import { newPhotoKey, photoExtensions } from './photo-store';

/** Largest photo the server stores (the contract's value, so the form and the server agree). */
export { maxPhotoBytes } from '@evalon/contracts';
/** Most photos one model may have. */
export const maxPhotosPerModel = 12;

/** Types we accept, decided from the bytes, never from the file name or the browser's word. */
export type PhotoType = keyof typeof photoExtensions;

/**
 * The image type of `data` as its magic bytes say (file-type), or null when it is not JPEG, PNG
 * or WebP. file-type is ESM-only, so it is loaded with a dynamic import: native in the bundled
 * server (esbuild keeps `import()`), transpiled by Jest in tests. The `core` entry (buffer
 * detection only) is used because the package's main entry offers only the `import` condition,
 * which Jest's CommonJS resolver does not match.
 */
export async function sniffPhotoType(data: Uint8Array): Promise<PhotoType | null> {
  const { fileTypeFromBuffer } = await import('file-type/core');
  const type = await fileTypeFromBuffer(data);
  const mime = type?.mime;
  return mime && mime in photoExtensions ? (mime as PhotoType) : null;
}

/**
 * Adds a photo to a model (fleet manager of its lender). The file is stored first under a
 * random name, then the row is written; if the row cannot be written the file is removed, so a
 * row never points at a missing file.
 */
export async function addPhoto(
  deps: CatalogDeps,
  auth: AuthContext,
  modelId: number,
  data: Buffer,
): Promise<Photo> {
  // Check the model and the person before reading anything into the store.
  await modelForChange(deps.dataSource.manager, auth, modelId, false);
  const contentType = await sniffPhotoType(data);
  if (!contentType) {
    throw new AppError(
      415,
      'unsupported_photo_type',
      'Upload a JPEG, PNG or WebP photo; this file is something else.',
    );
  }
  const storageKey = newPhotoKey(contentType);
  await deps.photoStore.put(storageKey, data, contentType);
  try {
    const id = await deps.dataSource.transaction(async (m) => {
      await modelForChange(m, auth, modelId);
      if ((await countPhotos(m, modelId)) >= maxPhotosPerModel) {
        throw AppError.conflict(
          'too_many_photos',
          `A model can have at most ${maxPhotosPerModel} photos; delete one first.`,
        );
      }
      return insertPhoto(m, {
        modelId,
        storageKey,
        contentType,
        sizeBytes: data.length,
        createdAt: deps.now(),
        createdByUserId: auth.user.id,
      });
    });
    return toPhoto({
      id,
      modelId,
      storageKey,
      contentType,
      sizeBytes: data.length,
      createdAt: deps.now(),
      createdByUserId: auth.user.id,
    });
  } catch (error) {
    await deps.photoStore.remove(storageKey).catch(() => undefined);
    throw error;
  }
}

/** A photo's bytes and type for any signed-in person; 404 when there is none. */
export async function readPhoto(
  deps: CatalogDeps,
  photoId: number,
): Promise<{ data: Buffer; contentType: PhotoType }> {
  const photo = await findPhoto(deps.dataSource.manager, photoId);
  const data = photo ? await deps.photoStore.get(photo.storageKey) : null;
  if (!photo || !data) throw AppError.notFound('photo_not_found', 'There is no such photo.');
  return { data, contentType: photo.contentType };
}

/** Deletes a photo (fleet manager of the model's lender): the row, then the file. */
export async function removePhoto(
  deps: CatalogDeps,
  auth: AuthContext,
  modelId: number,
  photoId: number,
): Promise<void> {
  const storageKey = await deps.dataSource.transaction(async (m) => {
    await modelForChange(m, auth, modelId);
    const photo = await findPhoto(m, photoId);
    if (!photo || photo.modelId !== modelId) {
      throw AppError.notFound('photo_not_found', 'This model has no such photo.');
    }
    await deletePhoto(m, photoId);
    return photo.storageKey;
  });
  // After the commit: a file left behind by a failure here is garbage, never a broken link.
  await deps.photoStore.remove(storageKey).catch((err: unknown) => {
    deps.logger.warn({ err, storageKey }, 'photo file could not be removed');
  });
}
