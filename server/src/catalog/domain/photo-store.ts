import type { FileStore } from '../../storage/file-store';
import { LocalFileStore, newStorageKey } from '../../storage/file-store';

/** Where model photos live: the uploads file store (see storage/file-store.ts). */
export type PhotoStore = FileStore;

const keyPattern = /^[a-f0-9]{32}\.(jpg|png|webp)$/;

/** File extension we store for each accepted type. */
export const photoExtensions = {
  'image/jpeg': 'jpg',
  'image/png': 'png',
  'image/webp': 'webp',
} as const;

/** A fresh random storage key: 128 random bits plus the sniffed type's extension. */
export function newPhotoKey(contentType: keyof typeof photoExtensions): string {
  return newStorageKey(photoExtensions[contentType]);
}

/** Photos as files in one folder outside the web root (default `.data/uploads/`). */
export class LocalPhotoStore extends LocalFileStore {
  constructor(dir: string) {
    super(dir, keyPattern, 'photo');
  }
}
