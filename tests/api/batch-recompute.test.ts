// Campaign default analysis settings and batch recomputes through real processes (API server + worker on the
// throwaway PostgreSQL and Redis), spoken to over HTTP. Truth comes from outside: the fixture generator's recorded
// values (fixtures/generate.ts: the per-channel pair at 312 m/s through gates 100 mm apart) and the shot model's input
// speeds (shared/simulate/simulate-shot.ts).
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Queue } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, AuditEvent, Campaign, GateRig, Projectile, Shot } from '../../server/db/models/index.ts';
import { QUEUE_NAMES } from '../../shared/contracts/jobs.ts';
import { pollUntil, signIn, simulatedCsv, type PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';

const fixture = (name: string) => new Uint8Array(readFileSync(path.join(import.meta.dirname, '../../fixtures/captures', name)));

let h: ApiHarness;
let demo: DemoWorld;
let app: AppProcesses;
let dataDir: string;
let experimenter: PipelineClient;
let analyst: PipelineClient;
let labId: string;
let campaignId: string;
let ballId: string;
let rigId: string;

interface ShotDetail {
  shot: { id: string; number: number; status: string; currentAnalysisId: string | null; approvedAnalysisId: string | null };
  analyses: { id: string; version: number; state: string; batchId: string | null }[];
  currentAnalysis: { id: string; parameters: Record<string, unknown>; results: { speed: { value: number; uncertainty: number; basis: string } | null } | null } | null;
}
interface BatchRow {
  shotId: string; number: number;
  before: { version: number; speed: { value: number; uncertainty: number } | null } | null;
  after: { version: number; state: string; speed: { value: number; uncertainty: number; basis: string } | null };
  change: { delta: number | null; deltaInU: number | null; methodChanged: boolean; gatesGained: string[]; gatesLost: string[] } | null;
}
interface BatchView { batch: { id: string; state: string; counts: { total: number; done: number; failed: number }; skipped: unknown[] }; shots: BatchRow[] }

const detail = async (shotId: string) => (await experimenter.get<ShotDetail>(`/api/shots/${shotId}`)).body;

async function analysedShot(files: { name: string; bytes: Uint8Array }[]): Promise<ShotDetail> {
  const res = await experimenter.post<{ shot: { id: string } }>(`/api/labs/${labId}/shots`, { campaignId, projectileId: ballId, gateRigId: rigId });
  expect(res.status).toBe(201);
  expect((await experimenter.upload(res.body.shot.id, files)).status).toBe(202);
  return pollUntil(async () => {
    const d = await detail(res.body.shot.id);
    return d.shot.status === 'analysed' ? d : undefined;
  }, { timeoutMs: 60_000, what: 'the shot to be analysed' });
}

const pair = () => [{ name: 'gate-a.csv', bytes: fixture('per-channel-gate-a.csv') }, { name: 'gate-b.csv', bytes: fixture('per-channel-gate-b.csv') }];
const simulated = (speed: number, seed: number) => [{ name: `sim-${speed}.csv`, bytes: simulatedCsv({ gatePositions: [0, 0.1], names: ['Gate A', 'Gate B'], speed, seed }).bytes }];

async function queuedJobs(): Promise<number> {
  const queue = new Queue(QUEUE_NAMES.analysis, { connection: { url: process.env.GATEPOST_TEST_REDIS_URL } as never });
  try {
    const counts = await queue.getJobCounts();
    return Object.values(counts).reduce((a, b) => a + b, 0);
  } finally {
    await queue.close();
  }
}

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  labId = demo.labs.hollowmere.id;
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-batch-'));
  app = await startAppProcesses({ env: { GATEPOST_DATA_DIR: dataDir } });
  experimenter = await signIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
  analyst = await signIn(app.baseUrl, demo.users.analyst.email, demo.users.analyst.password);
  ballId = (await Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true })).id;
  rigId = (await GateRig.create({
    labId, name: 'Batch pair, 100 mm', beamWidthM: 0.001, sensorType: 'photodiode',
    gates: [{ label: 'A', position_m: 0, position_uncertainty_m: 0.0002 }, { label: 'B', position_m: 0.1, position_uncertainty_m: 0.0002 }],
  })).id;
  campaignId = (await Campaign.create({ labId, name: 'Batch trial', startedOn: null, createdBy: null })).id;
}, 120_000);

afterAll(async () => {
  await app?.stop();
  await h?.close();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

describe('When an analyst applies settings to shots of a campaign', () => {
  let shots: ShotDetail[];

  beforeAll(async () => {
    shots = [await analysedShot(pair()), await analysedShot(simulated(280, 21)), await analysedShot(simulated(330, 22))];
    // The third is signed off: a batch gives it a new version that needs a new review, as a single recompute does.
    await Shot.update({ status: 'approved', approvedAnalysisId: shots[2].shot.currentAnalysisId }, { where: { id: shots[2].shot.id } });
  }, 180_000);

  it('then settings the engine refuses, or a gate on a channel a shot lacks, are refused before any job is queued', async () => {
    const versionsBefore = await Analysis.count({ where: { labId } });
    const jobsBefore = await queuedJobs();
    const band = await analyst.post<{ error: { message: string } }>(`/api/labs/${labId}/campaigns/${campaignId}/batches`, {
      all: true, settings: { threshold: { unit: 'percent', level: 95, hysteresis: 10 } },
    });
    expect(band.status).toBe(400);
    expect(band.body.error.message).toMatch(/threshold.*strictly between 0 % and 100 %/);
    const channel = await analyst.post<{ error: { message: string } }>(`/api/labs/${labId}/campaigns/${campaignId}/batches`, {
      all: true, settings: { gates: [{ channel: 'CH7', position: 0 }, { channel: 'Gate B', position: 0.1 }] },
    });
    expect(channel.status).toBe(400);
    expect(channel.body.error.message).toContain(`shot #${shots[0].shot.number}: gates.channel: "CH7" is not a channel of this shot (it has Gate A, Gate B)`);
    const neither = await analyst.post(`/api/labs/${labId}/campaigns/${campaignId}/batches`, { settings: { edges: 'leading' } });
    expect(neither.status).toBe(400);
    expect(await Analysis.count({ where: { labId } })).toBe(versionsBefore);
    expect(await queuedJobs()).toBe(jobsBefore);
  });

  it('then every shot gets one new version, audited with the batch, and the table shows before, after and the change in U', async () => {
    const settings = { threshold: { unit: 'percent', level: 40, hysteresis: 30 }, edges: 'leading' };
    const res = await analyst.post<BatchView>(`/api/labs/${labId}/campaigns/${campaignId}/batches`, { all: true, settings });
    expect(res.status).toBe(202);
    expect(res.body.batch.counts.total).toBe(3);
    const batchId = res.body.batch.id;
    const done = await pollUntil(async () => {
      const b = (await analyst.get<BatchView>(`/api/labs/${labId}/batches/${batchId}`)).body;
      return b.batch.state === 'done' ? b : undefined;
    }, { timeoutMs: 90_000, what: 'the batch to finish' });
    expect(done.batch.counts).toMatchObject({ total: 3, done: 3, failed: 0 });
    const truth = [312, 280, 330];
    done.shots.forEach((row, i) => {
      expect(row.before!.version).toBe(1);
      expect(row.after.version).toBe(2);
      // Both versions measure the same shot: each within its own U of the speed it was made with.
      expect(Math.abs(row.after.speed!.value - truth[i])).toBeLessThanOrEqual(row.after.speed!.uncertainty);
      expect(row.change!.delta).toBeCloseTo(row.after.speed!.value - row.before!.speed!.value, 9);
      expect(row.change!.deltaInU).toBeCloseTo(row.change!.delta! / row.before!.speed!.uncertainty, 9);
      expect(row.change).toMatchObject({ methodChanged: false, gatesGained: [], gatesLost: [] });
    });
    for (const s of shots) {
      const d = await detail(s.shot.id);
      expect(d.analyses.filter((a) => a.batchId === batchId)).toHaveLength(1);
      expect(d.currentAnalysis!.parameters).toMatchObject({ threshold: { level: 40, hysteresis: 30 }, edges: 'leading', projectile: { length: 0.04 } });
    }
    const approved = await detail(shots[2].shot.id);
    expect(approved.shot.status).toBe('analysed');
    expect(approved.shot.approvedAnalysisId).toBe(shots[2].shot.currentAnalysisId);
    const audited = await AuditEvent.findAll({ where: { labId, action: 'analysis.requested' } });
    expect(audited.filter((e) => e.details.batchId === batchId).map((e) => e.targetId).sort()).toEqual(shots.map((s) => s.shot.id).sort());
    const listed = (await analyst.get<{ batches: { id: string }[] }>(`/api/labs/${labId}/campaigns/${campaignId}/batches`)).body;
    expect(listed.batches[0].id).toBe(batchId);
  }, 120_000);

  it('then a batch that maps away a gate shows the lost gate and the change of method', async () => {
    const res = await analyst.post<BatchView>(`/api/labs/${labId}/campaigns/${campaignId}/batches`, {
      shotIds: [shots[0].shot.id], settings: { gates: [{ channel: 'Gate A', position: 0 }] },
    });
    expect(res.status).toBe(202);
    const done = await pollUntil(async () => {
      const b = (await analyst.get<BatchView>(`/api/labs/${labId}/batches/${res.body.batch.id}`)).body;
      return b.batch.state === 'done' ? b : undefined;
    }, { timeoutMs: 60_000, what: 'the batch to finish' });
    const [row] = done.shots;
    expect(row.after.speed!.basis).toBe('occlusion');
    expect(row.change).toMatchObject({ methodChanged: true, gatesLost: ['gate at 100 mm (Gate B)'] });
  }, 90_000);
});

describe('When a campaign keeps default analysis settings', () => {
  it('then a new shot is analysed with them, and only analysts and admins may set them', async () => {
    const settings = { threshold: { unit: 'percent', level: 45, hysteresis: 35 }, polarity: 'falling' };
    const put = (client: PipelineClient, body: unknown) => fetch(`${app.baseUrl}/api/labs/${labId}/campaigns/${campaignId}/analysis-settings`, {
      method: 'PUT', headers: { cookie: client.cookie, 'content-type': 'application/json' }, body: JSON.stringify(body),
    });
    expect((await put(experimenter, { settings })).status).toBe(403);
    const ok = await put(analyst, { settings });
    expect(ok.status).toBe(200);
    const d = await analysedShot(simulated(300, 23));
    expect(d.currentAnalysis!.parameters).toMatchObject({ threshold: { level: 45, hysteresis: 35 }, polarity: 'falling', gates: [{ channel: 'Gate A', position: 0 }, { channel: 'Gate B', position: 0.1 }] });
    expect(Math.abs(d.currentAnalysis!.results!.speed!.value - 300)).toBeLessThanOrEqual(d.currentAnalysis!.results!.speed!.uncertainty);
    const bad = await put(analyst, { settings: { smoothing: { windowSize: 8, polynomial: 2 } } });
    expect(bad.status).toBe(400);
    expect(((await bad.json()) as { error: { message: string } }).error.message).toMatch(/windowSize must be odd/);
  }, 120_000);
});
