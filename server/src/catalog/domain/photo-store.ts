import { randomBytes } from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';

/**
 * Where model photos live. The local folder is the default; an S3-compatible object store can
 * replace it by implementing these three calls (keys are opaque, random and flat).
 */
export interface PhotoStore {
  /** Stores the bytes under `key` (a name from {@link newPhotoKey}). */
  put(key: string, data: Buffer, contentType: string): Promise<void>;
  /** The bytes stored under `key`, or null when there are none. */
  get(key: string): Promise<Buffer | null>;
  /** Removes `key`; removing a missing key is not an error. */
  remove(key: string): Promise<void>;
}

const keyPattern = /^[a-f0-9]{32}\.(jpg|png|webp)$/;

/** File extension we store for each accepted type. */
export const photoExtensions = {
  'image/jpeg': 'jpg',
  'image/png': 'png',
  'image/webp': 'webp',
} as const;

/** A fresh random storage key: 128 random bits plus the sniffed type's extension. */
export function newPhotoKey(contentType: keyof typeof photoExtensions): string {
  return `${randomBytes(16).toString('hex')}.${photoExtensions[contentType]}`;
}

/**
 * Photos as files in one folder outside the web root (default `.data/uploads/`). Keys are
 * checked against the random-name pattern before touching the disk, so no request can steer a
 * path elsewhere.
 */
export class LocalPhotoStore implements PhotoStore {
  constructor(
    /** Absolute folder; created on the first write. */
    readonly dir: string,
  ) {}

  private file(key: string): string {
    if (!keyPattern.test(key)) throw new Error(`not a photo storage key: ${key}`);
    return path.join(this.dir, key);
  }

  async put(key: string, data: Buffer): Promise<void> {
    const target = this.file(key);
    await fs.mkdir(this.dir, { recursive: true, mode: 0o750 });
    // Write then rename, so a reader never sees half a file.
    const temporary = `${target}.${process.pid}.part`;
    await fs.writeFile(temporary, data, { mode: 0o640 });
    await fs.rename(temporary, target);
  }

  async get(key: string): Promise<Buffer | null> {
    try {
      return await fs.readFile(this.file(key));
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code === 'ENOENT') return null;
      throw error;
    }
  }

  async remove(key: string): Promise<void> {
    await fs.rm(this.file(key), { force: true });
  }
}

/**
 * The photo store the environment asks for: `EVALON_UPLOAD_DIR` (absolute, or relative to
 * `EVALON_ROOT`, else the working directory), default `.data/uploads`.
 */
export function photoStoreFromEnv(env: NodeJS.ProcessEnv = process.env): PhotoStore {
  const root = env.EVALON_ROOT?.trim() || process.cwd();
  const dir = env.EVALON_UPLOAD_DIR?.trim() || '.data/uploads';
  return new LocalPhotoStore(path.resolve(root, dir));
}
