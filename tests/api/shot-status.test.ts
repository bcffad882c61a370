// A shot's status through real processes (API server + worker on the throwaway PostgreSQL and Redis), for every
// order in which its files and versions succeed or fail, and the lab event stream that tells browsers about it.
// The rule itself is shared/contracts/shot-status.ts (unit-tested in tests/unit/contracts/shot-status.test.ts);
// here the point is that every transition writes it: no order leaves a shot "processing" with nothing pending.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Job } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis } from '../../server/db/models/index.ts';
import { QUEUE_NAMES } from '../../shared/contracts/jobs.ts';
import { recordFinalFailure } from '../../worker/final-failure.ts';
import { pollUntil, signIn, simulatedCsv, type PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { logDemoShot } from '../helpers/demo-shots.ts';
import { openEventStream } from '../helpers/event-stream.ts';

interface ShotDetail {
  shot: { id: string; status: string; currentAnalysisId: string | null };
  captures: { id: string; state: string; error: string | null; fileName: string }[];
  analyses: { id: string; version: number; state: string; error: string | null }[];
}

let h: ApiHarness;
let demo: DemoWorld;
let app: AppProcesses;
let dataDir: string;
let experimenter: PipelineClient;
let analyst: PipelineClient;

// A text file renamed .csv: what a person drops by mistake.
const notAScopeFile = new TextEncoder().encode('Shopping list\nmilk\neggs\n');
const good = (seed: number) => simulatedCsv({ speed: 300, seed }).bytes;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-status-'));
  app = await startAppProcesses({ env: { GATEPOST_DATA_DIR: dataDir, GATEPOST_LOG_LEVEL: 'warn' } });
  experimenter = await signIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
  analyst = await signIn(app.baseUrl, demo.users.analyst.email, demo.users.analyst.password);
}, 120_000);

afterAll(async () => {
  await app?.stop();
  await h?.close();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

const newShot = async () => (await logDemoShot(experimenter, demo)).id;

const detail = async (shotId: string) => (await experimenter.get<ShotDetail>(`/api/shots/${shotId}`)).body;

/** Waits until nothing of the shot is pending (no capture or version queued, reading or running). */
async function quiet(shotId: string): Promise<ShotDetail> {
  return pollUntil(async () => {
    const d = await detail(shotId);
    const pending = d.captures.some((c) => c.state === 'queued' || c.state === 'reading') || d.analyses.some((a) => a.state === 'queued' || a.state === 'running');
    return pending ? undefined : d;
  }, { timeoutMs: 60_000, intervalMs: 50, what: `shot ${shotId} to have nothing pending` });
}

/**
 * After the last job ended, the status the worker wrote, read in the same answer as the files and versions: nothing
 * pending and a status other than "processing". A version's failure is written a moment before the status it
 * leaves (worker/processors/analyse-shot.ts), so "processing" with nothing pending is waited out; a status that
 * stays so fails here. A file's end, its version and the status are one transaction (endCaptureRead): whatever
 * status is read here is one the files and versions beside it justify (tests/api/shot-status-race.test.ts holds
 * two files' ends in every order).
 */
async function statusOnceQuiet(shotId: string): Promise<ShotDetail> {
  await quiet(shotId);
  return pollUntil(async () => {
    const d = await detail(shotId);
    const pending = d.captures.some((c) => c.state === 'queued' || c.state === 'reading') || d.analyses.some((a) => a.state === 'queued' || a.state === 'running');
    return pending || d.shot.status === 'processing' ? undefined : d;
  }, { timeoutMs: 30_000, intervalMs: 50, what: `shot ${shotId} to leave "processing" once nothing is pending` });
}

describe('When a good file and a bad file reach the same shot', () => {
  it('then good file first, bad file after: the shot is analysed again, the bad file says why, and it can be sent for review', async () => {
    const shotId = await newShot();
    expect((await experimenter.upload(shotId, [{ name: 'good.csv', bytes: good(21) }])).status).toBe(202);
    expect((await statusOnceQuiet(shotId)).shot.status).toBe('analysed');
    expect((await experimenter.upload(shotId, [{ name: 'renamed-notes.csv', bytes: notAScopeFile }])).status).toBe(202);
    const d = await statusOnceQuiet(shotId);
    expect(d.shot.status).toBe('analysed');
    const bad = d.captures.find((c) => c.fileName === 'renamed-notes.csv')!;
    expect(bad.state).toBe('failed');
    expect(bad.error).toBeTruthy();
    const sent = await experimenter.post(`/api/shots/${shotId}/review-requests`, { message: 'bad file aside' });
    expect(sent.status, JSON.stringify(sent.body)).toBe(201);
  });

  it('then bad file first, good file after: failed, then analysed with version 1', async () => {
    const shotId = await newShot();
    await experimenter.upload(shotId, [{ name: 'renamed-notes.csv', bytes: notAScopeFile }]);
    expect((await statusOnceQuiet(shotId)).shot.status).toBe('failed');
    await experimenter.upload(shotId, [{ name: 'good.csv', bytes: good(22) }]);
    const d = await statusOnceQuiet(shotId);
    expect(d.shot.status).toBe('analysed');
    expect(d.analyses.map((a) => [a.version, a.state])).toEqual([[1, 'done']]);
  });

  it('then both in one upload: the read one is analysed whichever finishes last, the shot is analysed', async () => {
    const shotId = await newShot();
    await experimenter.upload(shotId, [{ name: 'good.csv', bytes: good(23) }, { name: 'renamed-notes.csv', bytes: notAScopeFile }]);
    const d = await statusOnceQuiet(shotId);
    expect(d.shot.status).toBe('analysed');
    expect(d.analyses).toHaveLength(1);
    expect(d.captures.map((c) => c.state).sort()).toEqual(['failed', 'ready']);
  });
});

describe('When a recompute of an analysed shot fails', () => {
  it('then the failed version says why and the shot is analysed (version 1 still current), not processing', async () => {
    const shotId = await newShot();
    await experimenter.upload(shotId, [{ name: 'good.csv', bytes: good(24) }]);
    const before = await statusOnceQuiet(shotId);
    const v2 = await analyst.post<{ analysis: { id: string } }>(`/api/shots/${shotId}/analyses`, { parameters: { gates: [{ channel: 'Gate Z', position: 0 }] } });
    expect(v2.status, JSON.stringify(v2.body)).toBe(202);
    const d = await statusOnceQuiet(shotId);
    expect(d.analyses.find((a) => a.version === 2)).toMatchObject({ state: 'failed', error: expect.stringContaining('Gate Z') });
    expect(d.shot).toMatchObject({ status: 'analysed', currentAnalysisId: before.shot.currentAnalysisId });
  });
});

describe('When a recompute job gives up for good (an outage longer than its retries)', () => {
  it('then recording that failure puts the shot back to analysed with its finished version', async () => {
    const shotId = await newShot();
    await experimenter.upload(shotId, [{ name: 'good.csv', bytes: good(25) }]);
    const before = await statusOnceQuiet(shotId);
    // Version 2 as the API makes it, but its job never runs: the worker's last attempt failed while PostgreSQL was
    // away, so the row still says queued and the shot processing until the failure is written.
    const v1 = await Analysis.findByPk(before.shot.currentAnalysisId!, { rejectOnEmpty: true });
    const v2 = await Analysis.create({ labId: v1.labId, shotId, version: 2, parameters: v1.parameters, engineVersion: v1.engineVersion, jobKey: `lost-${shotId}`, requestedBy: demo.users.analyst.id, captureIds: v1.captureIds, state: 'running' });
    const { settleShot } = await import('../../server/modules/shots/settle-shot.ts');
    expect((await settleShot(shotId))?.status).toBe('processing');
    const job = { id: 'lost-job', attemptsMade: 5, opts: { attempts: 5 }, data: { analysisId: v2.id } } as unknown as Job;
    const mails: unknown[] = [];
    const notifyQueue = () => ({ addBulk: async (jobs: unknown[]) => mails.push(...jobs) }) as never;
    await recordFinalFailure(QUEUE_NAMES.analysis, job, 'connect ECONNREFUSED 127.0.0.1:5432', notifyQueue);
    expect(mails).toHaveLength(1);
    const d = await detail(shotId);
    expect(d.analyses.find((a) => a.version === 2)).toMatchObject({ state: 'failed', error: expect.stringContaining('gave up after 5 attempts') });
    expect(d.shot).toMatchObject({ status: 'analysed', currentAnalysisId: v1.id });
  });
});

describe('When a browser or a script listens to GET /api/labs/:labId/events', () => {
  it('then it gets text/event-stream and a `shot` event for each state change of its lab, ending with the analysed state', async () => {
    const stream = await openEventStream(`${app.baseUrl}/api/labs/${demo.labs.hollowmere.id}/events`, { cookie: experimenter.cookie });
    try {
      expect(stream.status).toBe(200);
      expect(stream.contentType).toContain('text/event-stream');
      await stream.waitFor((e) => e.event === 'ready');
      const shotId = await newShot();
      await experimenter.upload(shotId, [{ name: 'good.csv', bytes: good(26) }]);
      const done = await stream.waitFor((e) => e.event === 'shot' && (e.data as { shotId: string; state: string }).shotId === shotId && (e.data as { state: string }).state === 'analysed', 60_000);
      const d = await detail(shotId);
      expect(done.data).toEqual({ type: 'shot', shotId, campaignId: demo.hollowmere.campaignIds[0], state: 'analysed', currentVersionId: d.shot.currentAnalysisId });
      const states = stream.events.filter((e) => (e.data as { shotId?: string }).shotId === shotId).map((e) => (e.data as { state: string }).state);
      expect(states[0]).toBe('processing');
    } finally {
      stream.close();
    }
  });

  it('then a personal API token (Bearer) works too, and another lab hears nothing of this lab', async () => {
    const made = await experimenter.post<{ secret: string }>('/api/me/tokens', { name: 'event listener', password: demo.users.experimenter.password });
    expect(made.status).toBe(201);
    const own = await openEventStream(`${app.baseUrl}/api/labs/${demo.labs.hollowmere.id}/events`, { authorization: `Bearer ${made.body.secret}` });
    const other = await signIn(app.baseUrl, demo.users.otherLabAdmin.email, demo.users.otherLabAdmin.password);
    const otherLab = await openEventStream(`${app.baseUrl}/api/labs/${demo.labs.sandgate.id}/events`, { cookie: other.cookie });
    const probing = await openEventStream(`${app.baseUrl}/api/labs/${demo.labs.hollowmere.id}/events`, { cookie: other.cookie });
    try {
      expect(own.status).toBe(200);
      expect(otherLab.status).toBe(200);
      expect(probing.status).toBe(404);
      await otherLab.waitFor((e) => e.event === 'ready');
      const shotId = await newShot();
      await experimenter.upload(shotId, [{ name: 'good.csv', bytes: good(27) }]);
      await own.waitFor((e) => e.event === 'shot' && (e.data as { shotId: string }).shotId === shotId && (e.data as { state: string }).state === 'analysed', 60_000);
      expect(otherLab.events.filter((e) => e.event === 'shot')).toEqual([]);
    } finally {
      own.close();
      otherLab.close();
      probing.close();
    }
  });
});
