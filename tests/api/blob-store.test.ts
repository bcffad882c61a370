// One contract, two stores: LocalDiskStore in a temp folder and S3Store against s3rver (a fake S3 server) run
// in-process on a free loopback port. The truth is always the bytes we wrote: byte-for-byte comparison and
// SHA-256 of the source file.
import { createHash, randomBytes } from 'node:crypto';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { open } from 'node:fs/promises';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { BlobNotFoundError, type BlobStore } from '../../server/storage/blob-store.ts';
import { LocalDiskStore } from '../../server/storage/local-disk-store.ts';
import { S3Store } from '../../server/storage/s3-store.ts';
import { readWindow } from '../../server/traces/read-window.ts';
import { writeChannelFiles } from '../../server/traces/write-channel-files.ts';
import { freeLoopbackPort } from '../helpers/api-harness.ts';

// s3rver ships no type declarations; this is the part of its API the test uses.
interface S3rverInstance { run(): Promise<unknown>; close(): Promise<void> }
type S3rverClass = new (options: Record<string, unknown>) => S3rverInstance;
const S3rver = createRequire(import.meta.url)('s3rver') as S3rverClass;

const BUCKET = 'gatepost-test';
let work: string;
let s3rver: S3rverInstance;
let s3: S3Store;
let local: LocalDiskStore;
let bigFile: string;
let bigSha: string;
const everyByte = new Uint8Array(256 * 3);

async function readAll(stream: Readable): Promise<Buffer> {
  const parts: Buffer[] = [];
  for await (const chunk of stream) parts.push(chunk as Buffer);
  return Buffer.concat(parts);
}

beforeAll(async () => {
  work = mkdtempSync(path.join(tmpdir(), 'gatepost-blob-test-'));
  const port = await freeLoopbackPort();
  s3rver = new S3rver({
    address: '127.0.0.1', port, silent: true, directory: path.join(work, 's3rver'), configureBuckets: [{ name: BUCKET }],
  });
  await s3rver.run();
  // s3rver's built-in account: access key and secret are both "S3RVER".
  s3 = new S3Store({
    endpoint: `http://127.0.0.1:${port}`, region: 'us-east-1', bucket: BUCKET,
    accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER', forcePathStyle: true,
  });
  local = new LocalDiskStore(path.join(work, 'local'));
  // Every byte value, ascending, descending and interleaved, so no byte is special-cased by an encoding.
  for (let i = 0; i < 256; i++) {
    everyByte[i] = i;
    everyByte[256 + i] = 255 - i;
    everyByte[512 + i] = (i * 97) & 255;
  }
  bigFile = path.join(work, 'big.bin');
  const big = randomBytes(20 * 1024 * 1024);
  writeFileSync(bigFile, big);
  bigSha = createHash('sha256').update(big).digest('hex');
});

afterAll(async () => {
  s3?.close();
  await s3rver?.close();
  rmSync(work, { recursive: true, force: true });
});

const stores: [string, () => BlobStore][] = [
  ['LocalDiskStore', () => local],
  ['S3Store on s3rver', () => s3],
];

describe.each(stores)('%s', (_name, store) => {
  it('When a file with every byte value is stored with putFile and putBytes, then both read back byte for byte', async () => {
    // Arrange
    const source = path.join(work, 'every-byte.bin');
    writeFileSync(source, everyByte);
    // Act
    await store().putFile('t/every/from-file.bin', source);
    await store().putBytes('t/every/from-bytes.bin', everyByte);
    // Assert
    expect(new Uint8Array(await readAll(store().openRead('t/every/from-file.bin')))).toEqual(everyByte);
    expect(new Uint8Array(await readAll(store().openRead('t/every/from-bytes.bin')))).toEqual(everyByte);
    expect(await store().readRange('t/every/from-bytes.bin', 0, everyByte.length)).toEqual(everyByte);
    expect(await store().stat('t/every/from-file.bin')).toEqual({ size: 768 });
  });

  it('When a 20 MB file is stored, then its size and SHA-256 come back unchanged and ranges at start, middle and end match', async () => {
    // Act (on S3 this is a multipart upload: 20 MB > the 8 MiB part size)
    await store().putFile('t/big/file.bin', bigFile);
    // Assert
    expect(await store().stat('t/big/file.bin')).toEqual({ size: 20 * 1024 * 1024 });
    const hash = createHash('sha256');
    for await (const chunk of store().openRead('t/big/file.bin')) hash.update(chunk as Buffer);
    expect(hash.digest('hex')).toBe(bigSha);
    const source = readFileSync(bigFile);
    const size = source.length;
    for (const [offset, length] of [[0, 4096], [size / 2 - 3, 1_000_003], [size - 777, 777], [12_345_677, 1], [size, 0]]) {
      const got = await store().readRange('t/big/file.bin', offset, length);
      expect(got.byteLength).toBe(length);
      expect(Buffer.from(got).equals(source.subarray(offset, offset + length))).toBe(true);
    }
    // Views as Float32Array need a 0-offset buffer of their own.
    const range = await store().readRange('t/big/file.bin', 8, 16);
    expect(range.byteOffset).toBe(0);
    expect(new Float32Array(range.buffer, 0, 4).length).toBe(4);
  });

  it('When a range reaches past the end, then a RangeError names the blob and its size', async () => {
    await store().putBytes('t/range/short.bin', everyByte.subarray(0, 100));
    await expect(store().readRange('t/range/short.bin', 90, 20)).rejects.toThrow(
      new RangeError('Bytes 90..109 reach past the end of blob "t/range/short.bin" (100 bytes).'),
    );
    await expect(store().readRange('t/range/short.bin', 200, 1)).rejects.toThrow(RangeError);
    await expect(store().readRange('t/range/short.bin', -1, 1)).rejects.toThrow(new RangeError('offset must be an integer ≥ 0, got -1'));
  });

  it('When a key is missing, then stat is null, exists is false, and reads fail with BlobNotFoundError naming the key', async () => {
    expect(await store().stat('t/missing/nothing.bin')).toBeNull();
    expect(await store().exists('t/missing/nothing.bin')).toBe(false);
    await expect(store().readRange('t/missing/nothing.bin', 0, 4)).rejects.toThrow(new BlobNotFoundError('t/missing/nothing.bin'));
    await expect(readAll(store().openRead('t/missing/nothing.bin'))).rejects.toThrow('No stored blob at key "t/missing/nothing.bin".');
    // Deleting what is not there is not an error.
    await store().delete('t/missing/nothing.bin');
  });

  it('When a key is written twice, then the second content replaces the first entirely, and delete removes it', async () => {
    await store().putBytes('t/over/x.bin', new Uint8Array(1000).fill(7));
    await store().putBytes('t/over/x.bin', Uint8Array.from([1, 2, 3]));
    expect(await store().stat('t/over/x.bin')).toEqual({ size: 3 });
    expect(new Uint8Array(await readAll(store().openRead('t/over/x.bin')))).toEqual(Uint8Array.from([1, 2, 3]));
    const source = path.join(work, 'over.bin');
    writeFileSync(source, Uint8Array.from([9, 9]));
    await store().putFile('t/over/x.bin', source);
    expect(await store().readRange('t/over/x.bin', 0, 2)).toEqual(Uint8Array.from([9, 9]));
    await store().delete('t/over/x.bin');
    expect(await store().exists('t/over/x.bin')).toBe(false);
  });

  it('When a key is not a clean relative path, then a TypeError says which segment is wrong', async () => {
    for (const bad of ['../etc/passwd', '/abs', 'a//b', 'a/./b', 'a/.hidden', 'a b', 'a\\b', '']) {
      await expect(store().putBytes(bad, everyByte)).rejects.toThrow(TypeError);
    }
    await expect(store().putBytes('labs/x/../y', everyByte)).rejects.toThrow(
      'Blob key "labs/x/../y" has a bad segment "..": use letters, digits, ".", "_" and "-", not starting with "." and no empty segments',
    );
  });
});

describe('trace windows on S3', () => {
  it('When channel files are written to S3, then windows read through ranged GETs equal the ones read from local disk', async () => {
    // Arrange: 50 000 samples of a ramp with a NaN gap; the local-disk path is checked against brute force in
    // tests/api/capture-window.test.ts, so equality here is the check for the S3 path.
    const values = new Float64Array(50_000).map((_, i) => (i >= 20_000 && i < 20_500 ? NaN : Math.sin(i / 300)));
    const capture = {
      channels: [{ name: 'CH1', unit: 'V', sourceUnit: 'V', values, invalidCount: 500 }],
      time: { kind: 'uniform' as const, t0: 0, dt: 1e-6, jitter: 0 },
      length: values.length, metadata: {}, layout: {}, warnings: [],
    };
    const onS3 = await writeChannelFiles(s3, 'lab-a', 'capture-1', capture);
    const onDisk = await writeChannelFiles(local, 'lab-a', 'capture-1', capture);
    expect(onS3).toEqual(onDisk);
    // Act + Assert: whole record (pyramid), a mid zoom (level 0) and full zoom (raw).
    for (const [from, to, points] of [[0, 1, 500], [0.01, 0.02, 1000], [0.0199, 0.0202, 400]]) {
      const a = await readWindow(s3, onS3, 0, from, to, points);
      const b = await readWindow(local, onDisk, 0, from, to, points);
      expect(a).toEqual(b);
    }
  });
});

describe('LocalDiskStore only', () => {
  it('When writes finish, then no temporary files are left and localPathOf points at the stored bytes', async () => {
    await local.putBytes('t/tidy/a.bin', everyByte);
    await local.putBytes('t/tidy/a.bin', everyByte.subarray(0, 10));
    expect(readdirSync(path.join(work, 'local', 't', 'tidy'))).toEqual(['a.bin']);
    expect(new Uint8Array(readFileSync(local.localPathOf('t/tidy/a.bin')))).toEqual(everyByte.subarray(0, 10));
  });

  it('When bytes are put without waiting for the disk, then they are readable at once, whole, and sync() syncs each file and folder once', async () => {
    // FileHandle's prototype, to count fsync calls (the only observable difference short of pulling the power).
    const probe = await open(path.join(work, 'probe'), 'w');
    const proto = Object.getPrototypeOf(probe) as { sync: () => Promise<void> };
    await probe.close();
    const syncs = vi.spyOn(proto, 'sync');
    try {
      const keys = ['t/later/ch0/a.bin', 't/later/ch0/b.bin', 't/later/ch1/a.bin'];
      for (const key of keys) await local.putBytes(key, everyByte, { sync: false });
      expect(syncs).not.toHaveBeenCalled();
      for (const key of keys) expect(await local.readRange(key, 0, everyByte.length)).toEqual(everyByte);
      expect(readdirSync(path.join(work, 'local', 't', 'later', 'ch0')).sort()).toEqual(['a.bin', 'b.bin']);
      await local.sync([...keys, keys[0]]);
      // Three files (the repeated key once) and their folders up to the root (made by these writes, so not synced yet).
      expect(syncs).toHaveBeenCalledTimes(3 + ['ch0', 'ch1', 'later', 't', 'root'].length);
      syncs.mockClear();
      await local.putBytes('t/later/now.bin', everyByte);
      expect(syncs).toHaveBeenCalledTimes(2); // the default: the file, then its folder (which exists)
      await expect(local.sync(['t/later/none.bin'])).rejects.toThrow(BlobNotFoundError);
    } finally {
      syncs.mockRestore();
    }
  });

  it('When the source file of putFile does not exist, then the error says so and the old blob stays', async () => {
    await local.putBytes('t/keep/a.bin', everyByte);
    await expect(local.putFile('t/keep/a.bin', path.join(work, 'no-such-file'))).rejects.toThrow(/ENOENT/);
    expect(await local.stat('t/keep/a.bin')).toEqual({ size: 768 });
    expect(readdirSync(path.join(work, 'local', 't', 'keep'))).toEqual(['a.bin']);
  });
});
