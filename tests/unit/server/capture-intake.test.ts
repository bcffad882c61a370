// The upload intake (server/modules/shots/capture-intake.ts) with small blocks, so a file of a few hundred kilobytes
// goes through every path a deep upload takes: several blocks written at once, the periodic sync, blocks handed to
// the reading thread in order and handed back, a last partial block. The reference is the input itself: the stored
// file must be the same bytes, the hash Node's SHA-256 of them, and the reader's samples the disk reader's.
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import type { Request } from 'express';
import { afterAll, describe, expect, it } from 'vitest';
import { simulatedCsv } from '../../../bench/lib/pipeline-client.ts';
import { captureIntake, type CaptureIntakeOptions, type ReceivedFile } from '../../../server/modules/shots/capture-intake.ts';
import { helperUploadThreadId, prestartUploadReader, spareUploadReaderThreadId, stopSpareUploadReader, type AnalyseOutcome } from '../../../server/modules/shots/upload-reader.ts';
import { analyzeShot } from '../../../shared/analysis/analyze-shot.ts';
import { LocalDiskStore } from '../../../server/storage/local-disk-store.ts';
import { channelFilesOf } from '../../../server/traces/write-channel-files.ts';
import { readCaptureFile } from '../../../worker/import/read-capture-file.ts';

const dir = mkdtempSync(path.join(tmpdir(), 'intake-test-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The bytes in chunks of uneven sizes (1 B to 9 KiB, fixed by a seed), as a socket delivers them. */
function chunked(bytes: Uint8Array, seed: number): Readable {
  let state = seed;
  const chunks: Buffer[] = [];
  for (let at = 0; at < bytes.length;) {
    state = (state * 1103515245 + 12345) % 2147483648;
    const n = 1 + (state % 9216);
    chunks.push(Buffer.from(bytes.subarray(at, at + n)));
    at += n;
  }
  return Readable.from(chunks);
}

/** `bytes` received as the multipart file "shot.csv" of a request `requestBytes` long (just the file by default). */
function receive(bytes: Uint8Array, readFromBytes: number, seed: number, options: Partial<CaptureIntakeOptions> = {}, requestBytes = bytes.length): Promise<ReceivedFile> {
  const intake = captureIntake({ store: new LocalDiskStore(path.join(dir, 'blobs')), uploadsDir: dir, readFromBytes, blockBytes: 4096, syncEveryBytes: 64 << 10, ...options });
  const req = { headers: { 'content-length': String(requestBytes) } } as unknown as Request;
  return new Promise((resolve, reject) => {
    const file = { stream: chunked(bytes, seed), originalname: 'shot.csv' } as Express.Multer.File;
    intake._handleFile(req, file, (err, info) => (err ? reject(err) : resolve(info as unknown as ReceivedFile)));
  });
}

/** An outcome of UploadReader.analyse without its run times, which differ from run to run. */
function withoutRunTimes(outcome: AnalyseOutcome): object {
  if (!('results' in outcome)) return outcome;
  const { ranAt, ...rest } = outcome;
  expect(ranAt.completedAt.getTime()).toBeGreaterThanOrEqual(ranAt.startedAt.getTime());
  return rest;
}

describe('When an upload arrives in uneven chunks through small blocks', () => {
  const csv = simulatedCsv({ seed: 31, length: 6000 });
  const sha256 = createHash('sha256').update(csv.bytes).digest('hex');

  it('then without a reader the stored file is the same bytes and the hash is their SHA-256', async () => {
    expect(csv.bytes.length).toBeGreaterThan(3 * (64 << 10)); // dozens of blocks and several syncs
    const got = await receive(csv.bytes, -1, 7);
    expect(got.reader).toBeNull();
    expect(got.size).toBe(csv.bytes.length);
    expect(got.sha256).toBe(sha256);
    expect(Buffer.compare(readFileSync(got.path), Buffer.from(csv.bytes))).toBe(0);
  });

  /** The stored file is the upload's bytes, and what the reader read (descriptor, files, values) the disk reader's. */
  async function expectReadAsOnDisk(got: ReceivedFile): Promise<void> {
    expect(got.sha256).toBe(sha256);
    expect(Buffer.compare(readFileSync(got.path), Buffer.from(csv.bytes))).toBe(0);
    const read = await got.reader!.outcome;
    if ('problem' in read) throw new Error(read.problem);
    // At once only the descriptor; the files stay with the thread until asked for: the plot files, then the values.
    expect(Object.keys(read)).not.toContain('blobs');
    const plots = await got.reader!.takeFiles();
    expect(plots!.map((b) => b.key)).toEqual(expect.arrayContaining(['ch0/samples.f32', 'ch1/samples.f32', 'ch1/level-1.f32']));
    expect(plots!.map((b) => b.key)).not.toContain('ch1/values.f64');
    const kept = await got.reader!.takeKept();
    expect(kept!.map((b) => b.key)).toEqual(read.files.channels.map((c) => c.values!.key));
    expect(kept!.map((b) => b.key)).toContain('ch1/values.f64');
    await got.reader!.close();
    const reference = await readCaptureFile(got.path);
    expect(read.length).toBe(reference.length);
    // The descriptor sent before any file was built, and every file, are the worker's (channelFilesOf) to the byte.
    const worker = channelFilesOf(reference);
    // (The time grid's jitter is a rounding-level residual that the one-pass and two-part reads sum in another order.)
    const withoutJitter = (f: typeof read.files) => ({ ...f, time: { ...f.time, jitter: 0 } });
    expect(withoutJitter(read.files)).toEqual(withoutJitter(worker.files));
    expect([...plots!, ...kept!].map((b) => b.key).sort()).toEqual(worker.blobs.map((b) => b.key).sort());
    for (const blob of [...plots!, ...kept!]) {
      expect(Buffer.compare(Buffer.from(blob.bytes), Buffer.from(worker.blobs.find((b) => b.key === blob.key)!.bytes)), blob.key).toBe(0);
    }
    const f64 = kept!.find((b) => b.key === 'ch1/values.f64')!;
    const values = new Float64Array(f64.bytes.buffer, f64.bytes.byteOffset, f64.bytes.byteLength / 8);
    expect(Buffer.compare(Buffer.from(values.buffer, values.byteOffset, values.byteLength), Buffer.from(reference.channels[1].values.buffer, reference.channels[1].values.byteOffset, reference.channels[1].values.byteLength))).toBe(0);
  }

  it("then with a reader the file is the same too, and the reader's samples are the disk reader's to the bit", async () => {
    const got = await receive(csv.bytes, 0, 11);
    expect(got.reader).not.toBeNull();
    await expectReadAsOnDisk(got);
  });

  it('then a thread started ahead (warmed up on a simulated shot) reads it the same, and the next is started after it', async () => {
    try {
      prestartUploadReader();
      const spare = spareUploadReaderThreadId();
      expect(spare).not.toBeNull();
      // Let it warm up first, as it does between uploads; the upload then waits for nothing.
      await new Promise((resolve) => setTimeout(resolve, 300));
      const got = await receive(csv.bytes, 0, 13);
      expect(got.reader!.threadId).toBe(spare);
      expect(spareUploadReaderThreadId()).toBeNull();
      await expectReadAsOnDisk(got);
      const next = spareUploadReaderThreadId();
      expect(next).not.toBeNull();
      expect(next).not.toBe(spare);
      // An upload that comes while the spare still warms up waits for it, and is read the same.
      const early = await receive(csv.bytes, 0, 17);
      expect(early.reader!.threadId).toBe(next);
      await expectReadAsOnDisk(early);
    } finally {
      await stopSpareUploadReader();
    }
    expect(spareUploadReaderThreadId()).toBeNull();
  });

  it("then the engine's numbers worked out with the helper thread preparing half of the channels are the ones the engine gives alone", async () => {
    const parameters = { gates: [{ channel: 'Gate A', position: 0 }, { channel: 'Gate B', position: 0.15 }, { channel: 'Gate C', position: 0.3 }] };
    const alone = JSON.parse(JSON.stringify(analyzeShot(await readCaptureFile(await storedCopy()), parameters))) as unknown;
    // Without a helper (none started): the reading thread prepares every channel.
    const one = await receive(csv.bytes, 0, 19);
    expect(withoutRunTimes(await one.reader!.analyse(parameters))).toEqual({ results: alone, threads: 1 });
    await one.reader!.close();
    try {
      prestartUploadReader();
      // The helper starts once the spare has warmed up.
      expect(helperUploadThreadId()).toBeNull();
      for (let waited = 0; helperUploadThreadId() === null && waited < 30_000; waited += 50) await new Promise((resolve) => setTimeout(resolve, 50));
      expect(helperUploadThreadId()).not.toBeNull();
      const two = await receive(csv.bytes, 0, 23);
      expect(withoutRunTimes(await two.reader!.analyse(parameters))).toEqual({ results: alone, threads: 2 });
      // Smoothing asked for: the traces differ, so the reading thread prepares them all.
      const smoothed = { ...parameters, smoothing: { windowSize: 11, polynomial: 2 } };
      const smoothedAlone = JSON.parse(JSON.stringify(analyzeShot(await readCaptureFile(await storedCopy()), smoothed))) as unknown;
      expect(withoutRunTimes(await two.reader!.analyse(smoothed))).toEqual({ results: smoothedAlone, threads: 1 });
      await two.reader!.close();
    } finally {
      await stopSpareUploadReader();
    }
    expect(helperUploadThreadId()).toBeNull();
  });

  it('then with parameters to start on, the engine runs as soon as the read is over, and asking for the same parameters takes that run', async () => {
    const parameters = { gates: [{ channel: 'Gate A', position: 0 }, { channel: 'Gate B', position: 0.15 }] };
    const other = { ...parameters, threshold: { level: 45, hysteresis: 30 } };
    const alone = JSON.parse(JSON.stringify(analyzeShot(await readCaptureFile(await storedCopy()), parameters))) as unknown;
    const asked: { length: number; channels: string[]; fileName: string }[] = [];
    const parametersOnRead: CaptureIntakeOptions['parametersOnRead'] = async (read, fileName) => {
      asked.push({ length: read.length, channels: read.files.channels.map((c) => c.name), fileName });
      return parameters;
    };
    const got = await receive(csv.bytes, 0, 29, { parametersOnRead });
    try {
      await got.reader!.outcome;
      expect(asked).toEqual([{ length: 6000, channels: ['Gate A', 'Gate B', 'Gate C'], fileName: 'shot.csv' }]);
      // Long enough for the run started on its own to be over before it is asked for.
      await new Promise((resolve) => setTimeout(resolve, 500));
      const askedAt = Date.now();
      const first = await got.reader!.analyse(parameters);
      if (!('results' in first)) throw new Error(first.problem);
      expect(withoutRunTimes(first)).toEqual({ results: alone, threads: 1 });
      expect(first.ranAt.completedAt.getTime()).toBeLessThanOrEqual(askedAt);
      // Asked again, the same run; other parameters get a run of their own.
      expect(await got.reader!.analyse(parameters)).toBe(first);
      const second = await got.reader!.analyse(other);
      if (!('results' in second)) throw new Error(second.problem);
      expect(second.ranAt.startedAt.getTime()).toBeGreaterThanOrEqual(askedAt);
      expect(second.results).toEqual(JSON.parse(JSON.stringify(analyzeShot(await readCaptureFile(await storedCopy()), other))));
    } finally {
      await got.reader!.close();
    }
  });

  it('then a file that is not (nearly) the whole request, or parameters the shot cannot give, start no run', async () => {
    const parameters = { gates: [{ channel: 'Gate A', position: 0 }, { channel: 'Gate B', position: 0.15 }] };
    let asked = 0;
    // Another file of 100 KB follows in the same request: the guess that this one is the shot's only file is not made.
    const part = await receive(csv.bytes, 0, 37, { parametersOnRead: async () => { asked += 1; return parameters; } }, csv.bytes.length + 100_000);
    // The shot gives none (another file of it is being read): nothing runs until asked.
    const none = await receive(csv.bytes, 0, 41, { parametersOnRead: async () => { asked += 10; return null; } });
    try {
      await Promise.all([part.reader!.outcome, none.reader!.outcome]);
      await new Promise((resolve) => setTimeout(resolve, 500));
      expect(asked).toBe(10);
      for (const got of [part, none]) {
        const askedAt = Date.now();
        const outcome = await got.reader!.analyse(parameters);
        if (!('results' in outcome)) throw new Error(outcome.problem);
        expect(outcome.ranAt.startedAt.getTime()).toBeGreaterThanOrEqual(askedAt);
      }
    } finally {
      await Promise.all([part.reader!.close(), none.reader!.close()]);
    }
  });
});

/** The simulated capture as a file, for the disk reader. */
async function storedCopy(): Promise<string> {
  const file = path.join(dir, 'stored-copy.csv');
  writeFileSync(file, simulatedCsv({ seed: 31, length: 6000 }).bytes);
  return file;
}
