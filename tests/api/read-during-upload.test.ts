// Uploads read by the API while their bytes arrive (GATEPOST_READ_UPLOADS_FROM_BYTES=0 here, so every upload is),
// with the compiled build (dist/node) that npm start runs:
// one pass over the bytes hashes, stores and reads them, the capture goes from queued straight to ready, and what
// was stored is exactly what the worker's disk reader and the engine make of the same file, run in this process.
import { createHash } from 'node:crypto';
import { mkdtempSync, readdirSync, readFileSync, rmSync, truncateSync, unlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Queue } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeShot } from '../../shared/analysis/analyze-shot.ts';
import { Analysis, Capture, GateRig, Projectile } from '../../server/db/models/index.ts';
import { createAnalysisVersion } from '../../server/modules/analyses/service.ts';
import { analysisJobId, ingestJobId, JOB_NAMES, QUEUE_NAMES, type AnalysisJobData } from '../../shared/contracts/jobs.ts';
import { float64FromBytes } from '../../server/traces/channel-files.ts';
import { readCaptureFile } from '../../worker/import/read-capture-file.ts';
import { pollUntil, signIn, simulatedCsv, type PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { expectForward, settleShot, type SettlingShot } from '../helpers/settle-shot.ts';

interface ShotDetail extends SettlingShot {
  captures: { id: string; state: string; error: string | null; fileName: string; sha256: string }[];
  analyses: { id: string; state: string; results: object | null; parameters: object }[];
  currentAnalysis: { id: string; results: { speed: { value: number; uncertainty: number } | null } } | null;
}

const fixture = (name: string) => new Uint8Array(readFileSync(path.join(import.meta.dirname, '../../fixtures/captures', name)));
const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

let h: ApiHarness;
let demo: DemoWorld;
let app: AppProcesses;
let dataDir: string;
let experimenter: PipelineClient;
let ballId: string;
let work: string;
let analysisQueue: Queue;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-read-upload-'));
  work = mkdtempSync(path.join(tmpdir(), 'gatepost-read-upload-files-'));
  // The compiled build, as npm start runs it (its thread boot files load the .js; pipeline.test.ts runs tsx).
  app = await startAppProcesses({ compiled: true, env: { GATEPOST_DATA_DIR: dataDir, GATEPOST_READ_UPLOADS_FROM_BYTES: '0' } });
  experimenter = await signIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
  analysisQueue = new Queue(QUEUE_NAMES.analysis, { connection: h.redis });
  ballId = (await Projectile.findOne({ where: { labId: demo.labs.hollowmere.id, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true })).id;
}, 120_000);

afterAll(async () => {
  await analysisQueue?.close();
  await app?.stop();
  await h?.close();
  for (const dir of [dataDir, work]) if (dir) rmSync(dir, { recursive: true, force: true });
});

async function newShot(gateRigId: string): Promise<string> {
  const res = await experimenter.post<{ shot: { id: string } }>(`/api/labs/${demo.labs.hollowmere.id}/shots`, {
    campaignId: demo.hollowmere.campaignIds[0], projectileId: ballId, gateRigId,
  });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.shot.id;
}

const incoming = () => readdirSync(path.join(dataDir, 'blobs', '.incoming'));

/** The analysis job's data (BullMQ keeps finished jobs for a week). */
async function analysisJobData(analysisId: string): Promise<AnalysisJobData> {
  const job = await analysisQueue.getJob(analysisJobId({ analysisId }));
  if (!job) throw new Error(`no job for analysis ${analysisId}`);
  return job.data as AnalysisJobData;
}

/** The version was finished by the API with the numbers its reading thread worked out: done, for these captures, with
 * the run's times, and no analysis job for it in BullMQ (which keeps finished jobs for a week). */
async function expectStoredByTheApi(analysisId: string, captureIds: string[]): Promise<void> {
  const version = await Analysis.findByPk(analysisId, { rejectOnEmpty: true });
  expect(version.state).toBe('done');
  expect(version.captureIds).toEqual(captureIds);
  expect(version.completedAt!.getTime()).toBeGreaterThanOrEqual(version.startedAt!.getTime());
  expect(await analysisQueue.getJob(analysisJobId({ analysisId }))).toBeFalsy();
}

/** The full-precision values are written just after the capture is marked read (uploads.ts): wait for the file. */
async function storedFile(key: string): Promise<Buffer> {
  const file = path.join(dataDir, 'blobs', ...key.split('/'));
  for (const deadline = Date.now() + 10_000; ;) {
    try {
      return readFileSync(file);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'ENOENT' || Date.now() > deadline) throw err;
      await new Promise((resolve) => setTimeout(resolve, 50));
    }
  }
}

/** The shot of the first scenario, read on arrival and analysed (the scenarios after it damage its files). */
let shot: ShotDetail;

describe('When a capture is uploaded to an API that reads uploads as they arrive', () => {
  const csv = simulatedCsv({ speed: 300, seed: 21 });
  let seen: Map<string, string[]>;

  it('then the capture goes from queued straight to ready (no worker read) and the shot is analysed', async () => {
    const shotId = await newShot(demo.hollowmere.gateRigIds[0]);
    const up = await experimenter.upload<{ captures: { id: string; state: string; sha256: string }[] }>(shotId, [{ name: 'read-on-arrival.csv', bytes: csv.bytes }]);
    expect(up.status, JSON.stringify(up.body)).toBe(202);
    expect(up.body.captures[0]).toMatchObject({ state: 'queued', sha256: sha256(csv.bytes) });
    ({ shot, seen } = await settleShot<ShotDetail>(experimenter, shotId));
    const states = seen.get(up.body.captures[0].id)!;
    expect(states.at(-1)).toBe('ready');
    // The worker marks a capture "reading" while it reads one; a capture read by the API never is.
    expect(states).not.toContain('reading');
    expectForward(states, ['queued', 'ready']);
    expect(shot.analyses).toHaveLength(1);
    expect(shot.analyses[0].state).toBe('done');
    const speed = shot.currentAnalysis!.results.speed!;
    expect(Math.abs(speed.value - 300)).toBeLessThanOrEqual(speed.uncertainty);
    // The shot's only file: the thread that read it worked the numbers out, and the API stored them on the version
    // (no analysis job was queued for it); the results are the engine's on the same file (checked below).
    await expectStoredByTheApi(shot.analyses[0].id, [up.body.captures[0].id]);
  });

  it('then the raw file is stored byte for byte, and nothing is left in the staging folder', () => {
    const stored = readFileSync(path.join(dataDir, 'blobs', 'labs', demo.labs.hollowmere.id, 'raw', sha256(csv.bytes)));
    expect(Buffer.compare(stored, Buffer.from(csv.bytes))).toBe(0);
    expect(incoming()).toEqual([]);
  });

  it("then the stored channels are the disk reader's values to the bit, and the results are the engine's on them", async () => {
    const file = path.join(work, 'read-on-arrival.csv');
    writeFileSync(file, csv.bytes);
    const imported = await readCaptureFile(file);
    const row = await Capture.findByPk(shot.captures[0].id, { rejectOnEmpty: true });
    const files = row.channels as { channels: { samplesKey: string; values: { key: string; type: string } }[]; length: number };
    expect(files.length).toBe(imported.length);
    for (const [k, c] of files.channels.entries()) {
      expect(c.values.type).toBe('f64');
      const bytes = await storedFile(c.values.key);
      const stored = float64FromBytes(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength).slice());
      const expected = imported.channels[k].values as Float64Array;
      expect(Buffer.compare(Buffer.from(stored.buffer), Buffer.from(expected.buffer, expected.byteOffset, expected.byteLength))).toBe(0);
      // The plot files were prepared after the engine ran on the same samples in the thread: still the importer's.
      const samples = await storedFile(c.samplesKey);
      expect(Buffer.compare(samples, Buffer.from(Float32Array.from(expected).buffer))).toBe(0);
    }
    expect(row.layout).toMatchObject({ reader: 'stream', delimiter: ',' });
    expect(row.warnings).toEqual(imported.warnings);
    const analysis = await Analysis.findByPk(shot.analyses[0].id, { rejectOnEmpty: true });
    const again = JSON.parse(JSON.stringify(analyzeShot(imported, analysis.parameters as object)));
    expect(analysis.results).toEqual(again);
  });
});

describe('When a capture is sent as the whole request body (?fileName=) to an API that reads uploads as they arrive', () => {
  it('then it is read on arrival like a multipart file: stored byte for byte, ready without a worker read, and the results are the engine\'s', async () => {
    const csv = simulatedCsv({ speed: 300, seed: 24 });
    const shotId = await newShot(demo.hollowmere.gateRigIds[0]);
    const up = await experimenter.uploadBody<{ captures: { id: string; state: string; sha256: string; fileName: string }[] }>(shotId, { name: 'as-the-body.csv', bytes: csv.bytes });
    expect(up.status, JSON.stringify(up.body)).toBe(202);
    expect(up.body.captures[0]).toMatchObject({ state: 'queued', sha256: sha256(csv.bytes), fileName: 'as-the-body.csv' });
    const { shot: read, seen } = await settleShot<ShotDetail>(experimenter, shotId);
    expect(seen.get(up.body.captures[0].id)).not.toContain('reading');
    expect(read.captures[0].state).toBe('ready');
    await expectStoredByTheApi(read.analyses[0].id, [up.body.captures[0].id]);
    const stored = readFileSync(path.join(dataDir, 'blobs', 'labs', demo.labs.hollowmere.id, 'raw', sha256(csv.bytes)));
    expect(Buffer.compare(stored, Buffer.from(csv.bytes))).toBe(0);
    expect(incoming()).toEqual([]);
    const file = path.join(work, 'as-the-body.csv');
    writeFileSync(file, csv.bytes);
    const analysis = await Analysis.findByPk(read.analyses[0].id, { rejectOnEmpty: true });
    expect(analysis.results).toEqual(JSON.parse(JSON.stringify(analyzeShot(await readCaptureFile(file), analysis.parameters as object))));
    const speed = read.currentAnalysis!.results.speed!;
    expect(Math.abs(speed.value - 300)).toBeLessThanOrEqual(speed.uncertainty);
  });
});

describe('When the API stopped before a read upload\'s channel files were all on the disk', () => {
  // The API records a deep upload as read, with its version's numbers, before its channel files are written, and
  // syncs them after (uploads.ts). Here the API's process "stopped" in that gap: a plot file and a values file of
  // the capture read above are taken away, one cut short.
  let captureId: string;
  let before: Map<string, Buffer>;

  it('then its traces answer 503 "still being written" instead of failing, and the shot keeps its version', async () => {
    const row = await Capture.findByPk(shot.captures[0].id, { rejectOnEmpty: true });
    captureId = row.id;
    // The held ingest job, released once the files were synced, has run (it would find the damage and repair it).
    const ingest = new Queue(QUEUE_NAMES.ingest, { connection: h.redis });
    try {
      await pollUntil(async () => ((await ingest.getJob(ingestJobId({ captureId, attempt: row.ingestAttempt })))?.finishedOn ? true : undefined), {
        timeoutMs: 30_000, intervalMs: 50, what: 'the released ingest job to finish',
      });
    } finally {
      await ingest.close();
    }
    const files = row.channels as { channels: { samplesKey: string; values: { key: string }; levels: { key: string }[] }[] };
    // Channel 0's plot files (its samples and every pyramid level: a window may be drawn from any of them), channel
    // 1's samples, and channel 1's values cut short.
    const gone = [files.channels[0].samplesKey, ...files.channels[0].levels.map((l) => l.key), files.channels[1].samplesKey];
    const cut = files.channels[1].values.key;
    before = new Map(await Promise.all([...gone, cut].map(async (key) => [key, await storedFile(key)] as const)));
    const onDisk = (key: string) => path.join(dataDir, 'blobs', ...key.split('/'));
    for (const key of gone) unlinkSync(onDisk(key));
    truncateSync(onDisk(cut), 100);
    const window = await experimenter.get<{ error: { message: string } }>(`/api/captures/${captureId}/window?channel=0`);
    expect(window.status).toBe(503);
    expect(JSON.stringify(window.body)).toMatch(/still being written; try again/);
    const samples = await experimenter.get(`/api/captures/${captureId}/samples?channel=1`);
    expect(samples.status).toBe(503);
  });

  it('then the held ingest job, when it runs, finds them missing and writes them again from the stored upload, without a new version', async () => {
    const ingest = new Queue(QUEUE_NAMES.ingest, { connection: h.redis });
    try {
      // The job that would have been released after the files: here it runs (again) for the same attempt.
      const data = { captureId, attempt: (await Capture.findByPk(captureId, { rejectOnEmpty: true })).ingestAttempt };
      await (await ingest.getJob(ingestJobId(data)))?.remove();
      await h.deps.queues.addIngest(data);
      for (const [key, bytes] of before) {
        const file = path.join(dataDir, 'blobs', ...key.split('/'));
        await pollUntil(async () => {
          try {
            return readFileSync(file).length === bytes.length ? true : undefined;
          } catch {
            return undefined;
          }
        }, { timeoutMs: 30_000, intervalMs: 50, what: `${key} written again` });
        expect(Buffer.compare(readFileSync(file), bytes), key).toBe(0);
      }
      const { shot: after } = await settleShot<ShotDetail>(experimenter, (await Capture.findByPk(captureId, { rejectOnEmpty: true })).shotId);
      expect(after.captures[0].state).toBe('ready');
      expect(after.analyses.map((a) => a.id)).toEqual(shot.analyses.map((a) => a.id));
      const window = await experimenter.get(`/api/captures/${captureId}/window?channel=0`);
      expect(window.status).toBe(200);
    } finally {
      await ingest.close();
    }
  });
});

describe('When files the reader refuses are uploaded to it', () => {
  it("then the worker reads them from the stored file and the capture says why, with the importer's message", async () => {
    const shotId = await newShot(demo.hollowmere.gateRigIds[0]);
    const lines = Buffer.from(simulatedCsv({ seed: 22 }).bytes).toString('utf8').split('\n');
    lines[1234] = `${lines[1234]},9.999`;
    const ragged = new TextEncoder().encode(lines.join('\n'));
    const up = await experimenter.upload<{ captures: { id: string }[] }>(shotId, [{ name: 'ragged.csv', bytes: ragged }]);
    expect(up.status).toBe(202);
    const { shot } = await settleShot<ShotDetail>(experimenter, shotId);
    expect(shot.captures[0]).toMatchObject({ state: 'failed' });
    expect(shot.captures[0].error).toMatch(/^line 1,?235: expected 4 columns/);
    // Read again by the worker: its ingest job ran and failed with the importer's message (only the worker writes
    // "failed"; the API leaves a file it could not read queued). Watching for the passing "reading" state missed it
    // once the worker's threads were warm, so the job itself is the witness. The job writes the row before it throws,
    // and BullMQ moves it to the failed set a moment after: wait for that move.
    const row = await Capture.findByPk(up.body.captures[0].id, { rejectOnEmpty: true });
    const job = await pollUntil(async () => (await h.deps.queues.failedIngest({ captureId: row.id, attempt: row.ingestAttempt })) ?? undefined, {
      timeoutMs: 10_000, intervalMs: 50, what: 'the ingest job to be failed in BullMQ',
    });
    expect(job.failedReason).toMatch(/^line 1,?235: expected 4 columns/);
    expect(incoming()).toEqual([]);
  });
});

describe('When one shot gets one file per channel in one request', () => {
  it('then both are read on arrival and combined into one analysis that gives 312 m/s within its uncertainty', async () => {
    // fixtures/generate.ts: the demo shot, 312 m/s through gates at 0 and 0.1 m, one channel per file.
    const rig = await GateRig.create({
      labId: demo.labs.hollowmere.id, name: 'Arrival pair, 100 mm',
      gates: [{ label: 'A', position_m: 0, position_uncertainty_m: 0.0005 }, { label: 'B', position_m: 0.1, position_uncertainty_m: 0.0005 }],
      beamWidthM: 0.001, sensorType: 'phototransistor', notes: '',
    });
    const shotId = await newShot(rig.id);
    const up = await experimenter.upload<{ captures: { id: string }[] }>(shotId, [
      { name: 'per-channel-gate-a.csv', bytes: fixture('per-channel-gate-a.csv') },
      { name: 'per-channel-gate-b.csv', bytes: fixture('per-channel-gate-b.csv') },
    ]);
    expect(up.status).toBe(202);
    const { shot, seen } = await settleShot<ShotDetail>(experimenter, shotId);
    expect(shot.captures.map((c) => c.state)).toEqual(['ready', 'ready']);
    for (const c of up.body.captures) expect(seen.get(c.id)).not.toContain('reading');
    expect(shot.analyses).toHaveLength(1);
    const speed = shot.currentAnalysis!.results.speed!;
    expect(Math.abs(speed.value - 312)).toBeLessThanOrEqual(speed.uncertainty);
    // Two files: no single reading thread holds the combined record, so the worker works the numbers out.
    expect((await analysisJobData(shot.analyses[0].id)).precomputed).toBeUndefined();
  });
});

describe('When an analysis job brings numbers that are not for its version', () => {
  it('then the worker ignores them and works the numbers out from the stored files', async () => {
    const shotId = await newShot(demo.hollowmere.gateRigIds[0]);
    const csv = simulatedCsv({ speed: 300, seed: 23 });
    const up = await experimenter.upload<{ captures: { id: string }[] }>(shotId, [{ name: 'numbers.csv', bytes: csv.bytes }]);
    expect(up.status).toBe(202);
    const { shot } = await settleShot<ShotDetail>(experimenter, shotId);
    const auto = await Analysis.findByPk(shot.analyses[0].id, { rejectOnEmpty: true });
    const made = async (jobKey: string, parameters: object) => {
      const { analysis } = await createAnalysisVersion(h.sequelize, { shotId, parametersInput: parameters, requestedBy: null, jobKey });
      return analysis;
    };
    const bogus = { speed: { value: 1, uncertainty: 0 } };
    const params = auto.parameters as { threshold: object };
    const otherParameters = await made('test-other-parameters', { ...params, threshold: { ...params.threshold, level: 45 } });
    const otherCaptures = await made('test-other-captures', auto.parameters as object);
    await analysisQueue.add(JOB_NAMES.analysis, { analysisId: otherParameters.id, precomputed: { captureIds: auto.captureIds, parameters: auto.parameters, results: bogus } }, { jobId: analysisJobId({ analysisId: otherParameters.id }) });
    await analysisQueue.add(JOB_NAMES.analysis, { analysisId: otherCaptures.id, precomputed: { captureIds: [], parameters: auto.parameters, results: bogus } }, { jobId: analysisJobId({ analysisId: otherCaptures.id }) });
    await settleShot<ShotDetail>(experimenter, shotId);
    const file = path.join(work, 'numbers.csv');
    writeFileSync(file, csv.bytes);
    const imported = await readCaptureFile(file);
    for (const version of [otherParameters, otherCaptures]) {
      await version.reload();
      expect(version.state).toBe('done');
      expect(version.results).not.toEqual(bogus);
      expect(version.results).toEqual(JSON.parse(JSON.stringify(analyzeShot(imported, version.parameters as object))));
    }
  });
});
