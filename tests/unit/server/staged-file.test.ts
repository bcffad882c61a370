// The file an upload is received into (server/modules/shots/staged-file.ts): written directly (O_DIRECT) from
// aligned blocks where the file system takes it, through the page cache otherwise, and in both cases the file holds
// exactly the bytes written, whatever the length of its last block. The reference is the input itself.
import { closeSync, constants, mkdtempSync, openSync, readFileSync, rmSync } from 'node:fs';
import { open } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, afterEach, describe, expect, it, vi } from 'vitest';
import { StagedFile } from '../../../server/modules/shots/staged-file.ts';

const dir = mkdtempSync(path.join(tmpdir(), 'staged-file-test-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
afterEach(() => vi.restoreAllMocks());

let files = 0;
const fresh = () => path.join(dir, `staged-${files++}.bin`);

/** Whether this folder's file system opens files for direct writes (asked of the system, not of StagedFile). */
function takesDirectWrites(folder: string): boolean {
  if (constants.O_DIRECT === undefined) return false;
  const probe = path.join(folder, `probe-${process.pid}`);
  try {
    closeSync(openSync(probe, constants.O_WRONLY | constants.O_CREAT | constants.O_DIRECT));
    return true;
  } catch {
    return false;
  } finally {
    rmSync(probe, { force: true });
  }
}

/** `length` bytes that differ from block to block and from byte to byte. */
function pattern(length: number, seed: number): Uint8Array {
  const bytes = new Uint8Array(length);
  let state = seed;
  for (let i = 0; i < length; i++) {
    state = (state * 1103515245 + 12345) % 2147483648;
    bytes[i] = state >>> 16;
  }
  return bytes;
}

/** Writes `bytes` through `staged` in its blocks, `inFlight` writes at a time (as the upload intake does). */
async function writeThrough(staged: StagedFile, bytes: Uint8Array, blockBytes: number, inFlight = 4): Promise<void> {
  const pending: Promise<void>[] = [];
  for (let at = 0; at < bytes.length; at += blockBytes) {
    const block = staged.takeBlock();
    expect(block.byteLength).toBe(blockBytes);
    const n = Math.min(blockBytes, bytes.length - at);
    block.set(bytes.subarray(at, at + n));
    pending.push(staged.write(block, n, at));
    while (pending.length >= inFlight) await pending.shift();
  }
  await Promise.all(pending);
  await staged.finish(bytes.length);
}

describe('When a received file is written block by block', () => {
  it('then on a file system that takes direct writes it is written directly, and holds exactly the bytes, the last block short', async () => {
    const blockBytes = 16_384;
    const bytes = pattern(10 * blockBytes + 1_234, 1);
    const file = fresh();
    const staged = await StagedFile.create(file, blockBytes, 5);
    expect(staged.writesDirectly).toBe(takesDirectWrites(dir));
    await writeThrough(staged, bytes, blockBytes);
    const stored = readFileSync(file);
    expect(stored.length).toBe(bytes.length);
    expect(Buffer.compare(stored, Buffer.from(bytes))).toBe(0);
  });

  it('then blocks reused from an earlier file leave none of its bytes in this one (a short last block\'s padding is cut off)', async () => {
    const blockBytes = 8_192;
    await writeThrough(await StagedFile.create(fresh(), blockBytes, 5), pattern(7 * blockBytes, 2), blockBytes);
    // A shorter file whose last block is shorter still: the padding written directly is cut off again.
    const bytes = pattern(2 * blockBytes + 5, 3);
    const file = fresh();
    await writeThrough(await StagedFile.create(file, blockBytes, 5), bytes, blockBytes);
    expect(Buffer.compare(readFileSync(file), Buffer.from(bytes))).toBe(0);
  });

  it('then blocks of a size direct writes cannot take are written through the page cache, with the same bytes', async () => {
    const blockBytes = 5_000;
    const bytes = pattern(9 * blockBytes + 77, 4);
    const file = fresh();
    const staged = await StagedFile.create(file, blockBytes, 5);
    expect(staged.writesDirectly).toBe(false);
    await writeThrough(staged, bytes, blockBytes);
    expect(Buffer.compare(readFileSync(file), Buffer.from(bytes))).toBe(0);
  });

  it('then a file system that opens the file for direct writes but refuses one goes on through the page cache, losing nothing', async () => {
    if (!takesDirectWrites(dir)) return expect(takesDirectWrites(dir)).toBe(false); // nothing to refuse here
    const blockBytes = 4_096;
    const bytes = pattern(12 * blockBytes + 100, 5);
    const file = fresh();
    const staged = await StagedFile.create(file, blockBytes, 5);
    expect(staged.writesDirectly).toBe(true);
    // The third write on the direct handle is refused as such a file system refuses it.
    const handle = await open(path.join(dir, 'prototype-of-handles'), 'w');
    const prototype = Object.getPrototypeOf(handle) as { write: (...args: unknown[]) => Promise<unknown> };
    await handle.close();
    const write = prototype.write;
    let calls = 0;
    vi.spyOn(prototype, 'write').mockImplementation(function (this: unknown, ...args: unknown[]) {
      calls += 1;
      if (calls === 3) return Promise.reject(Object.assign(new Error('EINVAL: invalid argument, write'), { code: 'EINVAL' }));
      return write.apply(this, args);
    });
    await writeThrough(staged, bytes, blockBytes);
    expect(staged.writesDirectly).toBe(false);
    expect(Buffer.compare(readFileSync(file), Buffer.from(bytes))).toBe(0);
  });

  it('then a file that already exists is refused (nothing is overwritten)', async () => {
    const file = fresh();
    await writeThrough(await StagedFile.create(file, 4_096, 5), pattern(100, 6), 4_096);
    await expect(StagedFile.create(file, 4_096, 5)).rejects.toMatchObject({ code: 'EEXIST' });
    expect(readFileSync(file).length).toBe(100);
  });
});
