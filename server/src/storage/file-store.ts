import { randomBytes } from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';

/**
 * Where uploaded files live (model photos, loan documents, and the credential uploads to come).
 * The local folder is the default; an S3-compatible object store can replace it by implementing
 * these three calls (keys are opaque, random and flat).
 */
export interface FileStore {
  /** Stores the bytes under `key` (a name from {@link newStorageKey}). */
  put(key: string, data: Buffer, contentType: string): Promise<void>;
  /** The bytes stored under `key`, or null when there are none. */
  get(key: string): Promise<Buffer | null>;
  /** Removes `key`; removing a missing key is not an error. */
  remove(key: string): Promise<void>;
}

/** A fresh random storage key: 128 random bits plus the extension, never a person's file name. */
export function newStorageKey(extension: string): string {
  return `${randomBytes(16).toString('hex')}.${extension}`;
}

/**
 * Files in one folder outside the web root. Keys are checked against the store's random-name
 * pattern before touching the disk, so no request can steer a path elsewhere.
 */
export class LocalFileStore implements FileStore {
  constructor(
    /** Absolute folder; created on the first write. */
    readonly dir: string,
    /** The keys this store accepts, e.g. 32 hex digits and `.pdf`. */
    private readonly keyPattern: RegExp,
    /** What the files are, for the error about a bad key (e.g. `photo`). */
    private readonly what: string,
  ) {}

  private file(key: string): string {
    if (!this.keyPattern.test(key)) throw new Error(`not a ${this.what} storage key: ${key}`);
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
