import { randomBytes } from 'node:crypto';
import { constants } from 'node:fs';
import { copyFile, mkdir, open, rename, rm, stat, unlink } from 'node:fs/promises';
import path from 'node:path';
import { Readable } from 'node:stream';
import { assertBlobKey, assertRange, BlobNotFoundError, rangePastEnd, type BlobStore, type PutOptions } from './blob-store.ts';

function isNotFound(err: unknown): boolean {
  return (err as NodeJS.ErrnoException)?.code === 'ENOENT';
}

/**
 * Blobs as files under one root folder, key segments as sub-folders. Every write goes to a temporary file in the
 * target folder, is fsynced, then renamed over the target and the folder fsynced: after a power cut the key holds
 * the old bytes or the new ones, and a write that was acknowledged is on the disk.
 */
export class LocalDiskStore implements BlobStore {
  readonly rootDir: string;

  constructor(rootDir: string) {
    if (!rootDir) throw new TypeError('LocalDiskStore needs a root folder');
    this.rootDir = path.resolve(rootDir);
  }

  localPathOf(key: string): string {
    assertBlobKey(key);
    return path.join(this.rootDir, ...key.split('/'));
  }

  async putFile(key: string, localPath: string): Promise<void> {
    // copyFile streams inside the kernel (copy_file_range), never through this process's memory.
    await this.writeAtomically(key, (tmp) => copyFile(localPath, tmp, constants.COPYFILE_EXCL));
  }

  async putBytes(key: string, bytes: Uint8Array, options: PutOptions = {}): Promise<void> {
    await this.writeAtomically(key, async (tmp) => {
      const fh = await open(tmp, 'wx');
      try {
        let written = 0;
        while (written < bytes.byteLength) {
          const { bytesWritten } = await fh.write(bytes, written, bytes.byteLength - written);
          written += bytesWritten;
        }
      } finally {
        await fh.close();
      }
    }, options.sync !== false);
  }

  async sync(keys: string[]): Promise<void> {
    const files = [...new Set(keys.map((key) => this.localPathOf(key)))];
    // All at once: the disk then takes the files' pages in one stream of writes rather than one file per round trip.
    await Promise.all(files.map(async (file) => {
      let fh;
      try {
        fh = await open(file, 'r');
      } catch (err) {
        throw isNotFound(err) ? new BlobNotFoundError(keys[files.indexOf(file)], { cause: err }) : err;
      }
      try {
        await fh.sync();
      } finally {
        await fh.close();
      }
    }));
    // Each folder up to the root: folders made by these writes were not synced either.
    const folders = new Set<string>();
    for (const file of files) {
      for (let d = path.dirname(file); d.startsWith(this.rootDir) && !folders.has(d); d = path.dirname(d)) folders.add(d);
    }
    await Promise.all([...folders].map(syncDir));
  }

  /** The blob's file opened for reading; BlobNotFoundError when there is none. */
  private async openBlob(key: string) {
    try {
      return await open(this.localPathOf(key), 'r');
    } catch (err) {
      throw isNotFound(err) ? new BlobNotFoundError(key, { cause: err }) : err;
    }
  }

  openRead(key: string): Readable {
    const openBlob = () => this.openBlob(key);
    async function* chunks() {
      const fh = await openBlob();
      try {
        for await (const chunk of fh.createReadStream({ autoClose: false })) yield chunk as Buffer;
      } finally {
        await fh.close();
      }
    }
    return Readable.from(chunks(), { objectMode: false });
  }

  async readRange(key: string, offset: number, length: number): Promise<Uint8Array> {
    assertRange(offset, length);
    const fh = await this.openBlob(key);
    try {
      // A fresh ArrayBuffer (not Node's shared pool) so callers can view it as Float32Array at offset 0.
      const out = new Uint8Array(length);
      let done = 0;
      while (done < length) {
        const { bytesRead } = await fh.read(out, done, length - done, offset + done);
        if (bytesRead === 0) throw rangePastEnd(key, offset, length, (await fh.stat()).size);
        done += bytesRead;
      }
      return out;
    } finally {
      await fh.close();
    }
  }

  async stat(key: string): Promise<{ size: number } | null> {
    try {
      const s = await stat(this.localPathOf(key));
      return s.isFile() ? { size: s.size } : null;
    } catch (err) {
      if (isNotFound(err)) return null;
      throw err;
    }
  }

  async exists(key: string): Promise<boolean> {
    return (await this.stat(key)) !== null;
  }

  async delete(key: string): Promise<void> {
    try {
      await unlink(this.localPathOf(key));
    } catch (err) {
      if (!isNotFound(err)) throw err;
    }
  }

  /**
   * A fresh path in `<root>/.incoming` (outside the key space), on the same disk as the blobs, for a file that is
   * being received and will become a blob through adoptFile.
   */
  async stagingPath(): Promise<string> {
    const dir = path.join(this.rootDir, '.incoming');
    await mkdir(dir, { recursive: true });
    return path.join(dir, `${process.pid}.${randomBytes(9).toString('hex')}.tmp`);
  }

  async adoptFile(key: string, localPath: string): Promise<void> {
    const target = await this.targetFolder(key, true);
    await placeFile(localPath, target);
  }

  /** The blob's path, with its folder made (and, with `sync`, each new folder's entry synced: a power cut must not lose it). */
  private async targetFolder(key: string, sync: boolean): Promise<string> {
    const target = this.localPathOf(key);
    const dir = path.dirname(target);
    const created = await mkdir(dir, { recursive: true });
    if (created && sync) {
      for (let d = dir; ; d = path.dirname(d)) {
        await syncDir(path.dirname(d));
        if (d === created || d === path.dirname(d)) break;
      }
    }
    return target;
  }

  private async writeAtomically(key: string, fill: (tmp: string) => Promise<void>, sync = true): Promise<void> {
    const target = await this.targetFolder(key, sync);
    // Leading "." keeps temporaries out of the key space (assertBlobKey refuses such names).
    const tmp = path.join(path.dirname(target), `.${path.basename(target)}.${process.pid}.${randomBytes(6).toString('hex')}.tmp`);
    try {
      await fill(tmp);
      if (sync) await placeFile(tmp, target);
      else await rename(tmp, target);
    } catch (err) {
      await rm(tmp, { force: true });
      throw err;
    }
  }
}

/** Syncs a complete file, renames it over `target` (same disk: no copy) and syncs the folder. */
async function placeFile(file: string, target: string): Promise<void> {
  const fh = await open(file, 'r+');
  try {
    await fh.sync();
  } finally {
    await fh.close();
  }
  await rename(file, target);
  await syncDir(path.dirname(target));
}

/** Makes a rename durable: the new directory entry must reach the disk too (POSIX: fsync the directory). */
async function syncDir(dir: string): Promise<void> {
  let fh;
  try {
    fh = await open(dir, 'r');
    await fh.sync();
  } catch (err) {
    // Some platforms (Windows) cannot open or fsync a directory; the file itself is already synced.
    const code = (err as NodeJS.ErrnoException).code;
    if (code !== 'EISDIR' && code !== 'EPERM' && code !== 'EINVAL' && code !== 'EACCES') throw err;
  } finally {
    await fh?.close();
  }
}
