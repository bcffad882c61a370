import type { Readable } from 'node:stream';

/**
 * Where Gatepost keeps bytes it must never lose: raw uploaded files and the channel files derived from them.
 * Keys are POSIX-like paths (`labs/<labId>/captures/<captureId>/ch0/samples.f32`); see assertBlobKey.
 * Writes replace the whole blob at once: a reader sees the old bytes or the new ones, never a mix.
 */
export interface BlobStore {
  /** Stores the file at `localPath` under `key`, streaming it (never held in memory whole). Replaces any blob there. */
  putFile(key: string, localPath: string): Promise<void>;
  /** Stores `bytes` under `key`, replacing any blob there (durably, unless `options.sync` is false). */
  putBytes(key: string, bytes: Uint8Array, options?: PutOptions): Promise<void>;
  /** A byte stream of the blob; a missing key makes the stream fail with BlobNotFoundError. */
  openRead(key: string): Readable;
  /**
   * `length` bytes from `offset`: random access for trace windows. Throws BlobNotFoundError for a missing key and
   * RangeError when the range reaches past the end of the blob.
   */
  readRange(key: string, offset: number, length: number): Promise<Uint8Array>;
  /** Size of the blob, or null when there is none. */
  stat(key: string): Promise<{ size: number } | null>;
  exists(key: string): Promise<boolean>;
  /** Removes the blob; removing a missing key is not an error. */
  delete(key: string): Promise<void>;
  /** Path of the blob on this machine's disk, for stores that have one (local disk only). */
  localPathOf?(key: string): string;
  /** A fresh path on the store's own disk where a file being received can be written (local disk only). */
  stagingPath?(): Promise<string>;
  /**
   * Makes the complete file at `localPath` (from stagingPath) the blob under `key` without copying it: synced,
   * then renamed into place (local disk only). The file is gone from `localPath` afterwards.
   */
  adoptFile?(key: string, localPath: string): Promise<void>;
  /**
   * Makes blobs stored with `sync: false` durable: on local disk each file and its folder are synced. Stores whose
   * writes are durable once acknowledged (S3) have no such step and leave it out. Throws BlobNotFoundError for a key
   * with no blob.
   */
  sync?(keys: string[]): Promise<void>;
}

export interface PutOptions {
  /**
   * false: the bytes are in place (readable under the key at once, whole: never a half-written file) but may not
   * have reached the disk yet; call `sync(keys)` before relying on them surviving a power cut. For files that can
   * be made again from a blob that is durable (the channel files of a stored upload). @default true
   */
  sync?: boolean;
}

/** The key names no blob. `code` lets callers tell it apart without instanceof across module copies. */
export class BlobNotFoundError extends Error {
  readonly code = 'blob_not_found';
  constructor(public readonly key: string, options?: { cause?: unknown }) {
    super(`No stored blob at key "${key}".`, options);
    this.name = 'BlobNotFoundError';
  }
}

const SEGMENT = /^[A-Za-z0-9_-][A-Za-z0-9._-]*$/;

/**
 * Keys are `/`-separated segments of letters, digits, `.`, `_` and `-`, none starting with `.` (so no `..`, no
 * hidden or temporary names), no leading or trailing `/`, at most 512 characters. The same key is then a safe
 * relative path on disk and a plain S3 object key.
 */
export function assertBlobKey(key: string): void {
  if (typeof key !== 'string' || key.length === 0 || key.length > 512) {
    throw new TypeError(`Blob key must be a string of 1 to 512 characters, got ${JSON.stringify(key)}`);
  }
  for (const segment of key.split('/')) {
    if (!SEGMENT.test(segment)) {
      throw new TypeError(
        `Blob key "${key}" has a bad segment "${segment}": use letters, digits, ".", "_" and "-", not starting with "." and no empty segments`,
      );
    }
  }
}

/** Checks a byte range before any I/O. */
export function assertRange(offset: number, length: number): void {
  if (!Number.isSafeInteger(offset) || offset < 0) throw new RangeError(`offset must be an integer ≥ 0, got ${offset}`);
  if (!Number.isSafeInteger(length) || length < 0) throw new RangeError(`length must be an integer ≥ 0, got ${length}`);
}

export function rangePastEnd(key: string, offset: number, length: number, size: number): RangeError {
  return new RangeError(`Bytes ${offset}..${offset + length - 1} reach past the end of blob "${key}" (${size} bytes).`);
}
