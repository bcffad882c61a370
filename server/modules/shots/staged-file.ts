import { constants } from 'node:fs';
import { open, type FileHandle } from 'node:fs/promises';

/**
 * Alignment of a direct write's memory, file offset and length: the page size, a multiple of the logical block size
 * of every disk Linux takes O_DIRECT writes on.
 */
const DIRECT_ALIGN = 4096;

/**
 * A file being received, written block by block at given offsets from blocks it lends (takeBlock). On Linux, where
 * the file system takes it, the file is opened with O_DIRECT and the blocks are page-aligned memory (a WebAssembly
 * memory: JavaScript has no other way to ask for aligned memory): the bytes go from the block to the disk without
 * a copy into the page cache, and without the kernel finding fresh page-cache pages for the whole file. Elsewhere (or
 * when the file system refuses: older kernels' tmpfs, some network file systems) it is written through the page
 * cache as before.
 *
 * Why: on the lab's 2-core VM (4 December 2026), storing the 330 MB deep capture through the page cache cost the
 * API's I/O threads 0.34 s of processor time in the first upload of a fresh server and 0.9–1.25 s in the ones after
 * it (the VM hands freed memory back to its host, and touching it again is slow), taken from the two cores the
 * upload's reading and hashing need; written directly, 62–68 ms in every round (a loop of 1 MiB writes, 4 at once,
 * 0.26–0.38 s of wall time at the disk's speed, against 0.17–0.64 CPU-s written through the cache).
 */
export class StagedFile {
  /** Blocks written (or never lent) and free to be filled again. */
  private readonly free: Uint8Array[] = [];
  /** The last block was padded to the alignment: the file is cut back to its size at the end. */
  private padded = false;
  /** Every aligned block this file lent (kept for the next files once it is done). */
  private readonly aligned: Uint8Array[] = [];

  private constructor(
    private fh: FileHandle,
    private readonly file: string,
    /** Written with O_DIRECT (until a write is refused: then through the page cache). */
    private direct: boolean,
    private readonly blockBytes: number,
    blocks: Uint8Array[],
  ) {
    this.free.push(...blocks);
    if (direct) this.aligned.push(...blocks);
  }

  /**
   * Creates `file` (it must not exist) for blocks of `blockBytes`, with `blocks` of them to lend (as many as may be
   * written at once, plus the one being filled). Direct writing needs blocks of a multiple of 4 KiB.
   */
  static async create(file: string, blockBytes: number, blocks: number): Promise<StagedFile> {
    const flags = constants.O_WRONLY | constants.O_CREAT | constants.O_EXCL;
    if (constants.O_DIRECT !== undefined && blockBytes % DIRECT_ALIGN === 0) {
      let aligned: Uint8Array[] | null = null;
      try {
        aligned = alignedBlocks(blockBytes, blocks);
      } catch {
        // No memory of that kind to be had (an address-space limit): written through the page cache.
      }
      if (aligned !== null) {
        try {
          return new StagedFile(await open(file, flags | constants.O_DIRECT, 0o666), file, true, blockBytes, aligned);
        } catch (error) {
          keepBlocks(blockBytes, aligned);
          if ((error as NodeJS.ErrnoException).code !== 'EINVAL') throw error;
          // The file system does not take direct writes.
        }
      }
    }
    return new StagedFile(await open(file, flags, 0o666), file, false, blockBytes, Array.from({ length: blocks }, () => new Uint8Array(blockBytes)));
  }

  /** Whether the file is written directly (O_DIRECT) so far (for tests). */
  get writesDirectly(): boolean {
    return this.direct;
  }

  /** A block of `blockBytes` to fill; it is lent until the write of it settles. */
  takeBlock(): Uint8Array {
    const block = this.free.pop();
    if (block !== undefined) return block;
    if (!this.direct) return new Uint8Array(this.blockBytes);
    const [more] = alignedBlocks(this.blockBytes, 1);
    this.aligned.push(more);
    return more;
  }

  /**
   * Writes the first `n` bytes of a block from takeBlock at `at` (a multiple of the block size, or the end of the
   * file), then takes the block back. Only the file's last block may be shorter than the block size.
   */
  async write(block: Uint8Array, n: number, at: number): Promise<void> {
    try {
      let length = n;
      if (this.direct && n % DIRECT_ALIGN !== 0) {
        // The last block: padded to the alignment, the file cut back to its size by finish(). Zeros, not what the
        // block held for an earlier file, in case the staged file outlives a crash before that.
        length = Math.ceil(n / DIRECT_ALIGN) * DIRECT_ALIGN;
        block.fill(0, n, length);
        this.padded = true;
      }
      try {
        await this.writeAll(block, length, at);
      } catch (error) {
        if (!this.direct || (error as NodeJS.ErrnoException).code !== 'EINVAL') throw error;
        // A file system that opened the file for direct writes but refuses them: the rest goes through the page cache.
        // (A padded last block written directly before this stays padded: finish() cuts it back all the same.)
        await this.writeThroughCache();
        await this.writeAll(block, n, at);
      }
    } finally {
      this.free.push(block);
    }
  }

  private async writeAll(block: Uint8Array, length: number, at: number): Promise<void> {
    let done = 0;
    while (done < length) done += (await this.fh.write(block, done, length - done, at + done)).bytesWritten;
  }

  private async writeThroughCache(): Promise<void> {
    if (!this.direct) return;
    this.direct = false;
    const old = this.fh;
    this.fh = await open(this.file, constants.O_WRONLY);
    await old.close();
  }

  /** Flushes what is written so far to the disk (its data; the size and the rest with finish()). */
  datasync(): Promise<void> {
    return this.fh.datasync();
  }

  /** Ends the file at `size` bytes (after a padded last block), syncs it to the disk and closes it. */
  async finish(size: number): Promise<void> {
    if (this.padded) await this.fh.truncate(size);
    await this.fh.sync();
    await this.fh.close();
    this.letGoOfBlocks();
  }

  /** Closes the file without syncing (it is being removed), once no write of it is pending. */
  async abandon(): Promise<void> {
    await this.fh.close().catch(() => {});
    this.letGoOfBlocks();
  }

  private letGoOfBlocks(): void {
    keepBlocks(this.blockBytes, this.aligned.splice(0));
    this.free.length = 0;
  }
}

/** Aligned blocks kept for the next files once a file is done with them, by size (at most MAX_KEPT_BLOCKS each). */
const keptBlocks = new Map<number, Uint8Array[]>();
/**
 * Aligned blocks kept at most, per size: two uploads at once with the intake's five 1 MiB blocks each (10 MiB). A
 * WebAssembly memory reserves a large range of address space (V8 guards it), so they are kept rather than made for
 * every file.
 */
const MAX_KEPT_BLOCKS = 10;

/** `count` blocks of `size` bytes (a multiple of 4 KiB) of page-aligned memory: kept ones first, else new ones. */
function alignedBlocks(size: number, count: number): Uint8Array[] {
  const taken = (keptBlocks.get(size) ?? []).splice(0, count);
  if (taken.length < count) {
    const pages = Math.ceil((size * (count - taken.length)) / 65_536);
    const memory = new WebAssembly.Memory({ initial: pages, maximum: pages });
    for (let i = 0; taken.length < count; i++) taken.push(new Uint8Array(memory.buffer, i * size, size));
  }
  return taken;
}

/** Keeps a file's aligned blocks for the next files (up to MAX_KEPT_BLOCKS of their size). */
function keepBlocks(size: number, blocks: Uint8Array[]): void {
  const kept = keptBlocks.get(size) ?? [];
  kept.push(...blocks.slice(0, Math.max(0, MAX_KEPT_BLOCKS - kept.length)));
  keptBlocks.set(size, kept);
}
