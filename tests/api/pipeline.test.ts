// The upload-to-result pipeline end to end, through real processes: the API server and the job worker are spawned
// (tests/helpers/app-processes.ts) against the throwaway PostgreSQL and Redis, and spoken to over HTTP only, signed
// in with POST /api/auth/login. Truth comes from outside the pipeline: the shot model's inputs
// (shared/simulate/simulate-shot.ts: the speed it was given), the fixture generator's recorded values
// (fixtures/generate.ts: the demo shot at 312 m/s through gates 100 mm apart) and the bytes we uploaded.
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Queue } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, Capture, GateRig, Projectile } from '../../server/db/models/index.ts';
import { QUEUE_NAMES } from '../../shared/contracts/jobs.ts';
import { pollUntil, signIn, simulatedCsv, type PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { expectForward, settleShot } from '../helpers/settle-shot.ts';
import { redisEndpoint } from '../../server/lib/redis.ts';

const fixture = (name: string) => new Uint8Array(readFileSync(path.join(import.meta.dirname, '../../fixtures/captures', name)));
const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

interface CaptureView { id: string; state: string; error: string | null; sha256: string; sampleCount: number | null; timeBase: { kind: string; t0: number; dt: number } | null; ingestAttempt: number; fileName: string }
interface AnalysisView { id: string; version: number; state: string; error: string | null; parameters: Record<string, unknown>; captureIds: string[]; results: Results | null; requestedBy: string | null }
interface Results { speed: { value: number; uncertainty: number; basis: string } | null; channels: { name: string }[]; gates: unknown[]; warnings: string[] }
interface ShotDetail { shot: { id: string; status: string; currentAnalysisId: string | null }; captures: CaptureView[]; analyses: AnalysisView[]; currentAnalysis: AnalysisView | null }

let h: ApiHarness;
let demo: DemoWorld;
let app: AppProcesses;
let dataDir: string;
let experimenter: PipelineClient;
let analyst: PipelineClient;
let ballId: string;
let rigId: string;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-pipeline-'));
  app = await startAppProcesses({ env: { GATEPOST_DATA_DIR: dataDir, GATEPOST_LOG_LEVEL: 'info' } });
  const e = demo.users.experimenter;
  experimenter = await signIn(app.baseUrl, e.email, e.password);
  // Recomputing is the analyst's job (permission analyses:write).
  analyst = await signIn(app.baseUrl, demo.users.analyst.email, demo.users.analyst.password);
  ballId = (await Projectile.findOne({ where: { labId: demo.labs.hollowmere.id, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true })).id;
  rigId = demo.hollowmere.gateRigIds[0];
}, 120_000);

afterAll(async () => {
  await app?.stop();
  await h?.close();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

/** A new shot in Hollowmere's first campaign with the demo ball and, unless told otherwise, the three-gate exit rig. */
async function newShot(client: PipelineClient, gateRigId: string | null = rigId): Promise<string> {
  const res = await client.post<{ shot: { id: string } }>(`/api/labs/${demo.labs.hollowmere.id}/shots`, {
    campaignId: demo.hollowmere.campaignIds[0], projectileId: ballId, gateRigId,
  });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.shot.id;
}

const detail = async (shotId: string) => (await experimenter.get<ShotDetail>(`/api/shots/${shotId}`)).body;

const settle = (shotId: string, timeoutMs?: number) => settleShot<ShotDetail>(experimenter, shotId, timeoutMs);


describe('When a simulated three-gate capture is uploaded to a shot with the demo ball and rig', () => {
  // The shot model's input speed is the truth; the rig's gates (0, 0.15, 0.3 m) and the 40 mm ball are the demo
  // seed's. 300 m/s, no deceleration, 0.2 µs sampling, 10 mV noise.
  const csv = simulatedCsv({ speed: 300, seed: 11 });
  let shotId: string;
  let captureId: string;
  let settled: ShotDetail;
  let seen: Map<string, string[]>;

  it('then the upload answers at once (202) with the capture queued, and the capture only moves forward, queued → reading → ready', async () => {
    shotId = await newShot(experimenter);
    const up = await experimenter.upload<{ captures: { id: string; state: string; duplicate: boolean; sha256: string }[] }>(shotId, [{ name: 'three-gates.csv', bytes: csv.bytes }]);
    expect(up.status, JSON.stringify(up.body)).toBe(202);
    expect(up.body.captures).toHaveLength(1);
    // Queued in the answer: the request did not wait for the worker to read the file.
    expect(up.body.captures[0]).toMatchObject({ state: 'queued', duplicate: false, sha256: sha256(csv.bytes) });
    captureId = up.body.captures[0].id;
    ({ shot: settled, seen } = await settle(shotId));
    const captureStates = seen.get(captureId)!;
    expectForward(captureStates, ['queued', 'reading', 'ready']);
    expect(captureStates.at(-1)).toBe('ready');
    const capture = settled.captures[0];
    expect(capture.sampleCount).toBe(csv.written.length);
    expect(capture.timeBase).toMatchObject({ kind: 'uniform' });
    expect(capture.timeBase!.dt).toBeCloseTo(csv.shot.time.dt, 15);
  });

  it('then analysis v1 appears, runs to done and is the current analysis of GET /api/shots/:id', async () => {
    expect(settled.analyses).toHaveLength(1);
    const v1 = settled.analyses[0];
    expect(v1).toMatchObject({ version: 1, state: 'done', requestedBy: null });
    expectForward(seen.get(v1.id)!, ['queued', 'running', 'done']);
    expect(settled.shot).toMatchObject({ status: 'analysed', currentAnalysisId: v1.id });
    expect(settled.currentAnalysis).toMatchObject({ id: v1.id, version: 1, state: 'done', captureIds: [captureId] });
    // The shot's defaults reached the engine: the rig's three gates on the three channels and the ball's size.
    expect(settled.currentAnalysis!.parameters).toMatchObject({
      gates: [{ channel: 'Gate A', position: 0 }, { channel: 'Gate B', position: 0.15 }, { channel: 'Gate C', position: 0.3 }],
      projectile: { length: 0.04 },
    });
  });

  it('then the speed agrees with the simulated truth within its stated expanded uncertainty', () => {
    const speed = settled.currentAnalysis!.results!.speed!;
    // Truth: the shot model was given 300 m/s at the first gate and no deceleration.
    expect(csv.shot.truth.speedAtFirstGate).toBe(300);
    expect(speed.uncertainty).toBeGreaterThan(0);
    // U came out near 1.6 m/s in our runs; the bound keeps a runaway U from making the check below empty. A wrong
    // gate map (say the rig's 0.15 m pitch read as 0.1 m) would be off by a third, far outside it.
    expect(speed.uncertainty).toBeLessThan(5);
    expect(Math.abs(speed.value - csv.shot.truth.speedAtFirstGate)).toBeLessThanOrEqual(speed.uncertainty);
  });

  it('then the stored raw file is byte for byte the uploaded one, under its SHA-256', () => {
    const stored = path.join(dataDir, 'blobs', 'labs', demo.labs.hollowmere.id, 'raw', sha256(csv.bytes));
    expect(existsSync(stored), stored).toBe(true);
    const bytes = new Uint8Array(readFileSync(stored));
    expect(sha256(bytes)).toBe(settled.captures[0].sha256);
    expect(bytes.length).toBe(csv.bytes.length);
    expect(Buffer.compare(Buffer.from(bytes), Buffer.from(csv.bytes))).toBe(0);
  });

  it('then the same file uploaded again is not stored twice: duplicate, the same capture, one row, no new job', async () => {
    const again = await experimenter.upload<{ captures: { id: string; state: string; duplicate: boolean }[] }>(shotId, [{ name: 'three-gates-again.csv', bytes: csv.bytes }]);
    expect(again.status).toBe(202);
    expect(again.body.captures).toEqual([expect.objectContaining({ id: captureId, duplicate: true, state: 'ready' })]);
    expect(await Capture.count({ where: { shotId } })).toBe(1);
    await new Promise((r) => setTimeout(r, 300));
    expect(await Analysis.count({ where: { shotId } })).toBe(1);
  });

  it('then a recompute with another threshold makes version 2, leaves version 1 as it was, and the diff shows what changed', async () => {
    const v1Before = (await experimenter.get<{ analysis: AnalysisView }>(`/api/shots/${shotId}/analyses/${settled.currentAnalysis!.id}`)).body.analysis;
    // Everything left out takes the engine's defaults, so send v1's parameters with only the threshold changed.
    const parameters = { ...v1Before.parameters, threshold: { unit: 'percent', level: 70, hysteresis: 20 } };
    const key = 'recompute-threshold-70-0001';
    const first = await analyst.post<{ analysis: AnalysisView }>(`/api/shots/${shotId}/analyses`, { parameters }, { 'idempotency-key': key });
    expect(first.status, JSON.stringify(first.body)).toBe(202);
    expect(first.body.analysis.version).toBe(2);
    // The same key again (a client retrying after a lost answer): the same version, no second row.
    const repeat = await analyst.post<{ analysis: AnalysisView }>(`/api/shots/${shotId}/analyses`, { parameters }, { 'idempotency-key': key });
    expect(repeat.status).toBe(200);
    expect(repeat.body.analysis.id).toBe(first.body.analysis.id);
    const v2Id = first.body.analysis.id;
    const { shot } = await settle(shotId);
    expect(shot.analyses.map((a) => a.version).sort()).toEqual([1, 2]);
    expect(await Analysis.count({ where: { shotId } })).toBe(2);
    expect(shot.shot.currentAnalysisId).toBe(v2Id);
    const v2 = (await experimenter.get<{ analysis: AnalysisView }>(`/api/shots/${shotId}/analyses/${v2Id}`)).body.analysis;
    expect(v2.state).toBe('done');
    const v1After = (await experimenter.get<{ analysis: AnalysisView }>(`/api/shots/${shotId}/analyses/${v1Before.id}`)).body.analysis;
    expect(v1After).toEqual(v1Before);

    const diff = await experimenter.get<{
      parameters: { path: string; from: unknown; to: unknown }[]; results: { path: string }[]; engineChanged: boolean;
      budget?: { from: { group: string; contribution: number; share: number }[] | null; to: { group: string }[] | null };
    }>(
      `/api/shots/${shotId}/analyses/${v1Before.id}/diff/${v2Id}`,
    );
    expect(diff.status).toBe(200);
    expect(diff.body.engineChanged).toBe(false);
    // Each version's budget whole, so the page names budget rows by source ("Gate positions"), not "Budget line 1".
    expect(diff.body.budget?.from?.map((l) => l.group)).toEqual((v1Before.results!.speed as unknown as { budget: { group: string }[] }).budget.map((l) => l.group));
    expect(diff.body.budget?.to?.length).toBeGreaterThan(0);
    expect(diff.body.parameters).toEqual(expect.arrayContaining([
      expect.objectContaining({ path: 'threshold.level', from: 50, to: 70 }),
      expect.objectContaining({ path: 'threshold.hysteresis', from: 40, to: 20 }),
    ]));
    expect(diff.body.parameters.every((d) => d.path.startsWith('threshold.'))).toBe(true);
    // A deeper level is crossed later on the way in and earlier on the way out: the transition instants move.
    expect(diff.body.results.length).toBeGreaterThan(0);
    expect(v2.results!.speed!.value).not.toBe(v1After.results!.speed!.value);
    // The gates all see the same pulse shape, so the time of flight, and with it the speed, still meets the truth.
    expect(Math.abs(v2.results!.speed!.value - 300)).toBeLessThanOrEqual(v2.results!.speed!.uncertainty);
  });

  it('then windows of the ingested capture give at most `points` min/max pairs, and raw samples at full zoom', async () => {
    const values = csv.shot.channels[1].values; // Gate B as simulated
    const { t0, dt } = csv.shot.time;
    const whole = await experimenter.get<{ raw: boolean; min: (number | null)[]; max: (number | null)[]; channel: { name: string } }>(
      `/api/captures/${captureId}/window?channel=Gate%20B&points=200`,
    );
    expect(whole.status, JSON.stringify(whole.body)).toBe(200);
    expect(whole.body).toMatchObject({ raw: false, channel: { name: 'Gate B' } });
    expect(whole.body.min.length).toBeLessThanOrEqual(200);
    expect(whole.body.max.length).toBe(whole.body.min.length);
    // The envelope of the whole record holds the extreme samples (printed with 6 decimals, stored as Float32).
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = 0; i < values.length; i++) {
      lo = Math.min(lo, values[i]);
      hi = Math.max(hi, values[i]);
    }
    const tol = 5e-7 + 1e-6;
    expect(Math.min(...(whole.body.min as number[]))).toBeCloseTo(lo, 5);
    expect(Math.abs(Math.max(...(whole.body.max as number[])) - hi)).toBeLessThan(tol);

    // Full zoom: 40 samples from index 3000 in a 100-point window come back as the samples themselves.
    const from = t0 + 3000 * dt;
    const to = t0 + 3039 * dt;
    const zoom = await experimenter.get<{ raw: boolean; t: number[]; v: number[] }>(`/api/captures/${captureId}/window?channel=1&from=${from}&to=${to}&points=100`);
    expect(zoom.status).toBe(200);
    expect(zoom.body.raw).toBe(true);
    expect(zoom.body.t).toHaveLength(40);
    for (let k = 0; k < 40; k++) {
      expect(Math.abs(zoom.body.t[k] - (t0 + (3000 + k) * dt))).toBeLessThan(dt * 1e-6);
      expect(Math.abs(zoom.body.v[k] - values[3000 + k])).toBeLessThan(tol);
    }
  });

  it("then another lab's admin gets 404 for the shot, its capture windows, its analyses and the diff", async () => {
    const other = demo.users.otherLabAdmin;
    const sandgate = await signIn(app.baseUrl, other.email, other.password);
    const ids = (await detail(shotId)).analyses.map((a) => a.id);
    const paths = [
      `/api/shots/${shotId}`,
      `/api/captures/${captureId}/window?channel=0&points=100`,
      `/api/shots/${shotId}/analyses`,
      `/api/shots/${shotId}/analyses/${ids[0]}`,
      `/api/shots/${shotId}/analyses/${ids[0]}/diff/${ids[1]}`,
    ];
    for (const p of paths) expect((await sandgate.get(p)).status, p).toBe(404);
    const recompute = await sandgate.post(`/api/shots/${shotId}/analyses`, { parameters: {} });
    expect(recompute.status).toBe(404);
    // The same requests from the owning lab succeed, so the 404s are about the lab, not the paths.
    for (const p of paths) expect((await experimenter.get(p)).status, p).toBe(200);
  });
});

describe('When a shot gets one file per channel', () => {
  // fixtures/generate.ts: the demo shot, 312 m/s through gates at 0 and 0.1 m, one channel per file; the
  // "shifted" gate B file starts 3 samples later. The shots use a two-gate rig of that geometry.
  let pairRigId: string;
  beforeAll(async () => {
    const rig = await GateRig.create({
      labId: demo.labs.hollowmere.id, name: 'Bench pair, 100 mm',
      gates: [{ label: 'A', position_m: 0, position_uncertainty_m: 0.0005 }, { label: 'B', position_m: 0.1, position_uncertainty_m: 0.0005 }],
      beamWidthM: 0.001, sensorType: 'phototransistor', notes: '',
    });
    pairRigId = rig.id;
  });

  it('then the two files are combined into one analysis that gives 312 m/s within its uncertainty', async () => {
    const shotId = await newShot(experimenter, pairRigId);
    const up = await experimenter.upload<{ captures: { id: string }[] }>(shotId, [
      { name: 'per-channel-gate-a.csv', bytes: fixture('per-channel-gate-a.csv') },
      { name: 'per-channel-gate-b.csv', bytes: fixture('per-channel-gate-b.csv') },
    ]);
    expect(up.status).toBe(202);
    expect(up.body.captures).toHaveLength(2);
    const { shot } = await settle(shotId);
    expect(shot.captures.map((c) => c.state)).toEqual(['ready', 'ready']);
    expect(shot.analyses).toHaveLength(1);
    const v1 = shot.currentAnalysis!;
    expect(v1).toMatchObject({ version: 1, state: 'done' });
    expect([...v1.captureIds].sort()).toEqual(up.body.captures.map((c) => c.id).sort());
    expect(v1.results!.channels.map((c) => c.name)).toEqual(['Gate A', 'Gate B']);
    expect(v1.parameters).toMatchObject({ gates: [{ channel: 'Gate A', position: 0 }, { channel: 'Gate B', position: 0.1 }] });
    const speed = v1.results!.speed!;
    expect(Math.abs(speed.value - 312)).toBeLessThanOrEqual(speed.uncertainty);
  });

  it('then each of several shots whose two files are read at the same time gets exactly one automatic analysis', async () => {
    // The worker reads two files at once (concurrency 2), so both ingests often finish together; the automatic
    // analysis is keyed by the set of ready captures, and that set must be the final one for both.
    const shotIds: string[] = [];
    for (let i = 0; i < 4; i++) {
      const shotId = await newShot(experimenter, pairRigId);
      const up = await experimenter.upload(shotId, [
        { name: 'per-channel-gate-a.csv', bytes: fixture('per-channel-gate-a.csv') },
        { name: 'per-channel-gate-b.csv', bytes: fixture('per-channel-gate-b.csv') },
      ]);
      expect(up.status).toBe(202);
      shotIds.push(shotId);
    }
    for (const shotId of shotIds) {
      const { shot } = await settle(shotId);
      expect(shot.analyses, shotId).toHaveLength(1);
      expect(await Analysis.count({ where: { shotId } })).toBe(1);
      expect(shot.currentAnalysis!.captureIds).toHaveLength(2);
    }
  });

  it('then a file whose time base disagrees gives a failed analysis whose error names that file', async () => {
    const shotId = await newShot(experimenter, pairRigId);
    const up = await experimenter.upload(shotId, [
      { name: 'per-channel-gate-a.csv', bytes: fixture('per-channel-gate-a.csv') },
      { name: 'per-channel-gate-b-shifted.csv', bytes: fixture('per-channel-gate-b-shifted.csv') },
    ]);
    expect(up.status).toBe(202);
    const { shot } = await settle(shotId);
    // Each file on its own is fine; only putting them together fails.
    expect(shot.captures.map((c) => c.state)).toEqual(['ready', 'ready']);
    expect(shot.analyses).toHaveLength(1);
    const analysis = (await experimenter.get<{ analysis: AnalysisView }>(`/api/shots/${shotId}/analyses/${shot.analyses[0].id}`)).body.analysis;
    expect(analysis.state).toBe('failed');
    expect(analysis.error).toContain('per-channel-gate-b-shifted.csv');
    expect(analysis.error).toMatch(/time base/);
    expect(shot.shot.status).toBe('failed');
  });
});

describe('When a file cannot be read', () => {
  let queue: Queue;
  beforeAll(() => {
    queue = new Queue(QUEUE_NAMES.ingest, { connection: { ...redisEndpoint(process.env.GATEPOST_TEST_REDIS_URL!), maxRetriesPerRequest: null } });
  });
  afterAll(async () => {
    await queue?.close();
  });

  it("then the capture is failed with the importer's message naming the line, the job ran once, and the raw file is kept", async () => {
    const shotId = await newShot(experimenter);
    // A simulated capture with one ragged row: file line 1235 (header + data row 1234) carries an extra value.
    const lines = Buffer.from(simulatedCsv({ seed: 12 }).bytes).toString('utf8').split('\n');
    lines[1234] = `${lines[1234]},9.999`;
    const ragged = new TextEncoder().encode(lines.join('\n'));
    const junk = new Uint8Array(4096);
    for (let i = 0; i < junk.length; i++) junk[i] = (i * 2654435761) >>> 24; // binary, with zero bytes
    const up = await experimenter.upload<{ captures: { id: string; fileName: string }[] }>(shotId, [
      { name: 'ragged.csv', bytes: ragged },
      { name: 'junk.bin', bytes: junk },
    ]);
    expect(up.status).toBe(202);
    const { shot } = await settle(shotId);
    const byName = new Map(shot.captures.map((c) => [c.fileName, c]));
    expect(byName.get('ragged.csv')).toMatchObject({ state: 'failed' });
    expect(byName.get('ragged.csv')!.error).toMatch(/^line 1,?235: expected 4 columns/);
    expect(byName.get('junk.bin')).toMatchObject({ state: 'failed' });
    expect(byName.get('junk.bin')!.error).toMatch(/binary data/);
    expect(shot.analyses).toHaveLength(0);
    expect(shot.shot.status).toBe('failed');
    for (const [name, bytes] of [['ragged.csv', ragged], ['junk.bin', junk]] as const) {
      const c = byName.get(name)!;
      // Not retried: an UnrecoverableError ends the job after its first attempt.
      // The processor marks the row failed, then throws; BullMQ records the job's end a moment later, writing
      // finishedOn, failedReason and attemptsMade in one step (asking getState() of a job object fetched earlier
      // would pair a fresh state with stale fields).
      const job = await pollUntil(async () => {
        const j = await queue.getJob(`ingest-${c.id}-1`);
        return j?.finishedOn ? j : undefined;
      }, { timeoutMs: 10_000, what: `the ingest job of ${name} to be failed` });
      expect(await job.getState(), name).toBe('failed');
      expect(job.attemptsMade, name).toBe(1);
      expect(job.failedReason, name).toBe(c.error);
      const stored = path.join(dataDir, 'blobs', 'labs', demo.labs.hollowmere.id, 'raw', c.sha256);
      expect(Buffer.compare(readFileSync(stored), Buffer.from(bytes)), name).toBe(0);
    }
  });

  it('then re-ingest with importer overrides reads a file that needs them', async () => {
    const shotId = await newShot(experimenter, null);
    // Samples only, no time column and no preamble: the importer needs the sample interval from a person.
    const sim = simulatedCsv({ gatePositions: [0], seed: 13 });
    const text = Array.from(sim.shot.channels[0].values, (v) => v.toFixed(6)).join('\n') + '\n';
    const up = await experimenter.upload<{ captures: { id: string }[] }>(shotId, [{ name: 'values-only.csv', bytes: new TextEncoder().encode(text) }]);
    const captureId = up.body.captures[0].id;
    const { shot } = await settle(shotId);
    expect(shot.captures[0].state).toBe('failed');
    expect(shot.captures[0].error).toMatch(/give dt/);
    const { t0, dt } = sim.shot.time;
    const re = await experimenter.post<{ capture: CaptureView }>(`/api/shots/${shotId}/captures/${captureId}/reingest`, { importOptions: { dt, t0 } });
    expect(re.status, JSON.stringify(re.body)).toBe(202);
    expect(re.body.capture).toMatchObject({ state: 'queued', ingestAttempt: 2 });
    const { shot: after } = await settle(shotId);
    const capture = after.captures[0];
    expect(capture).toMatchObject({ state: 'ready', error: null, sampleCount: sim.shot.channels[0].values.length });
    expect(capture.timeBase).toMatchObject({ kind: 'uniform', t0, dt });
    expect(after.analyses).toHaveLength(1);
    expect(after.currentAnalysis!.state).toBe('done');
  });
});

describe('When the OpenAPI document is read', () => {
  it('then it lists every pipeline route with its method', async () => {
    const res = await fetch(`${app.baseUrl}/api/openapi.json`);
    expect(res.status).toBe(200);
    const doc = (await res.json()) as { openapi: string; paths: Record<string, Record<string, unknown>> };
    expect(doc.openapi).toMatch(/^3\./);
    const routes: [string, string][] = [
      ['post', '/api/labs/{labId}/shots'], ['get', '/api/labs/{labId}/shots'], ['get', '/api/shots/{shotId}'], ['patch', '/api/shots/{shotId}'],
      ['post', '/api/shots/{shotId}/captures'], ['get', '/api/shots/{shotId}/analyses'], ['post', '/api/shots/{shotId}/analyses'],
      ['get', '/api/shots/{shotId}/analyses/{analysisId}'], ['get', '/api/shots/{shotId}/analyses/{analysisId}/diff/{otherId}'],
      ['post', '/api/shots/{shotId}/captures/{captureId}/reingest'], ['get', '/api/captures/{captureId}/window'],
    ];
    for (const [method, p] of routes) expect(doc.paths[p]?.[method], `${method.toUpperCase()} ${p}`).toBeDefined();
  });
});
