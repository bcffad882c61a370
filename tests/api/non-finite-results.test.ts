// Issue 12 review, gap b: captures stored before the importer bounded values (±9.9e37) can still hold samples such as
// ±1e308, which make the engine's levels NaN or Infinity. jsonb cannot hold those and JSON.stringify turned them into
// null, so the browser got a result of nulls. The real analysis processor (in this process, against the test
// PostgreSQL and a local blob folder) must refuse such a result and fail the version with the reason.
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Job } from 'bullmq';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { Analysis, Capture, Shot } from '../../server/db/models/index.ts';
import { ENGINE_VERSION } from '../../shared/analysis/engine-version.ts';
import { simulateShot } from '../../shared/simulate/simulate-shot.ts';
import { simulatedShotToCapture } from '../../shared/simulate/simulated-shot-to-capture.ts';
import { LocalDiskStore } from '../../server/storage/local-disk-store.ts';
import { writeChannelFiles } from '../../server/traces/write-channel-files.ts';
import { closeWorkerContext } from '../../worker/context.ts';
import analyseShot from '../../worker/processors/analyse-shot.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;
let dataDir: string;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  // The processor builds its own context from the environment, as the worker process does.
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-nonfinite-'));
  process.env.GATEPOST_DATABASE_URL = process.env.GATEPOST_TEST_DATABASE_URL;
  process.env.GATEPOST_REDIS_URL = process.env.GATEPOST_TEST_REDIS_URL;
  process.env.GATEPOST_DATA_DIR = dataDir;
  process.env.GATEPOST_STORAGE = 'local';
});
afterAll(async () => {
  await closeWorkerContext();
  await h?.close();
  rmSync(dataDir, { recursive: true, force: true });
});

/** A job as BullMQ hands it to the processor: only data and progress are used. */
const jobFor = (analysisId: string) => ({ data: { analysisId }, updateProgress: async () => undefined }) as unknown as Job;

/** Stores a simulated two-gate capture (`transform` applied to its samples) as a ready capture with a new version. */
async function versionOf(transform: (v: number) => number, key: string) {
  const store = new LocalDiskStore(path.join(dataDir, 'blobs'));
  const shotId = demo.hollowmere.shotIds[0];
  const imported = simulatedShotToCapture(simulateShot({}));
  for (const channel of imported.channels) channel.values = Float64Array.from(channel.values, transform);
  const capture = await Capture.create({
    labId: demo.labs.hollowmere.id, shotId, fileName: `${key}.csv`, sizeBytes: 1, sha256: createHash('sha256').update(key).digest('hex'), storageKey: `labs/x/raw/${key}`,
    state: 'ready', channels: null, sampleCount: imported.length, uploadedBy: null,
  });
  await capture.update({ channels: await writeChannelFiles(store, demo.labs.hollowmere.id, capture.id, imported) });
  const last = ((await Analysis.max('version', { where: { shotId } })) as number | null) ?? 0;
  return Analysis.create({
    labId: demo.labs.hollowmere.id, shotId, version: last + 1, parameters: { spacing: 0.1 }, engineVersion: ENGINE_VERSION,
    jobKey: `r12-${key}`, requestedBy: demo.users.analyst.id, captureIds: [capture.id], batchId: null, previousAnalysisId: null,
  });
}

it('When a stored capture holds ±1e308 samples, then the version fails naming the non-finite numbers and stores no result', async () => {
  // Every sample pushed to ±1e308, its state kept (the simulated gates swing between about 0.2 V and 4.8 V).
  const analysis = await versionOf((v) => (v > 2.5 ? 1e308 : -1e308), 'huge');

  await expect(analyseShot(jobFor(analysis.id))).rejects.toThrow(/not finite/);

  await analysis.reload();
  expect(analysis.state).toBe('failed');
  expect(analysis.results).toBeNull();
  expect(analysis.error).toMatch(/^The analysis gave numbers that are not finite \(channels\[0\]\.levels\.\w+ = (NaN|Infinity|-Infinity)/);
  expect(analysis.error).toContain('Upload the file again');
  const shot = await Shot.findByPk(analysis.shotId);
  expect(shot?.currentAnalysisId).not.toBe(analysis.id);
});

it('When the same processor analyses an ordinary capture, then the result is stored (the check refuses nothing legitimate)', async () => {
  const analysis = await versionOf((v) => v, 'plain');
  await expect(analyseShot(jobFor(analysis.id))).resolves.toEqual({ analysisId: analysis.id, state: 'done' });
  await analysis.reload();
  expect(analysis.state).toBe('done');
  // simulateShot's default is 300 m/s (shared/simulate): the stored result is the engine's, whole.
  expect((analysis.results as { speed: { value: number } }).speed.value).toBeCloseTo(300, 0);
});
