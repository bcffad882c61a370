// Two files of one shot whose reads end at the same moment, in every order, held step by step so each order happens
// for certain instead of once in a while. What ends a read runs here as the product runs it: the worker's ingest job
// (worker/processors/ingest-capture.ts), a job's last failed attempt (worker/final-failure.ts) and the API's read of
// an upload as it arrives (server/modules/shots/uploads.ts), on the throwaway PostgreSQL and Redis, in this process.
//
// How a step is held: a test trigger makes the write of a capture's final state ("ready" or "failed") wait for an
// advisory lock this file holds (one per file, keyed by its SHA-256), and this file can take the shot's row lock
// itself. Between steps it waits until every end still running is waiting on a lock, so nothing else can happen
// until it lets one go. A second trigger logs every status the shot's row is written with and the transaction that
// wrote it: what any reader could have read is the last status of each committed transaction.
//
// The race this catches (seen once in CI in shot-status.test.ts): file B's end sees file A still being read, so it
// makes no version; A's read is recorded; B settles the shot (a read file, no version: "failed"); only then does A's
// end make the version. The shot read "failed" although a result was on its way.
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Job } from 'bullmq';
import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, Capture, Shot } from '../../server/db/models/index.ts';
import { buildApp } from '../../server/app.ts';
import type { JobQueues } from '../../server/lib/job-queues.ts';
import { settleShot } from '../../server/modules/shots/settle-shot.ts';
import { QUEUE_NAMES } from '../../shared/contracts/jobs.ts';
import { closeWorkerContext, workerContext, type WorkerContext } from '../../worker/context.ts';
import { recordFinalFailure } from '../../worker/final-failure.ts';
import analyseShot from '../../worker/processors/analyse-shot.ts';
import ingestCapture from '../../worker/processors/ingest-capture.ts';
import { simulatedCsv } from '../../bench/lib/pipeline-client.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';
import { createDemoShotRow } from '../helpers/demo-shots.ts';
import { Client, type PgClient } from '../helpers/pg-query.ts';

let h: ApiHarness;
let demo: DemoWorld;
let ctx: WorkerContext;
let dataDir: string;
/** Holds the advisory locks the test trigger waits on (session locks: held until unlocked). */
let control: PgClient;
/** Takes the shot's row lock in a transaction of its own. */
let locker: PgClient;
/** The API, reading every upload as it arrives, on the worker's blob store; its held ingest jobs tell `released`. */
let readingApi: Express;
const released = new Map<string, () => void>();

const BARRIER = 4242;
const TEST_DDL = `
  CREATE TABLE test_shot_status_log (id bigserial PRIMARY KEY, shot_id uuid NOT NULL, status text NOT NULL, tx bigint NOT NULL);
  CREATE FUNCTION test_log_shot_status() RETURNS trigger LANGUAGE plpgsql AS $$
  BEGIN
    INSERT INTO test_shot_status_log (shot_id, status, tx) VALUES (NEW.id, NEW.status::text, txid_current());
    RETURN NEW;
  END $$;
  CREATE TRIGGER test_log_shot_status AFTER INSERT OR UPDATE OF status ON shots FOR EACH ROW EXECUTE FUNCTION test_log_shot_status();
  CREATE FUNCTION test_hold_capture_end() RETURNS trigger LANGUAGE plpgsql AS $$
  BEGIN
    PERFORM pg_advisory_xact_lock_shared(${BARRIER}, hashtext(NEW.sha256));
    RETURN NEW;
  END $$;
  CREATE TRIGGER test_hold_capture_end BEFORE UPDATE OF state ON captures FOR EACH ROW
    WHEN (NEW.state IN ('ready', 'failed') AND OLD.state IS DISTINCT FROM NEW.state) EXECUTE FUNCTION test_hold_capture_end();
`;
const DROP_TEST_DDL = `
  DROP TRIGGER IF EXISTS test_hold_capture_end ON captures;
  DROP FUNCTION IF EXISTS test_hold_capture_end();
  DROP TRIGGER IF EXISTS test_log_shot_status ON shots;
  DROP FUNCTION IF EXISTS test_log_shot_status();
  DROP TABLE IF EXISTS test_shot_status_log;
`;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  // The worker's context in this process (worker/context.ts reads the environment): the test services, a blob
  // store of this file's own.
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-status-race-'));
  process.env.GATEPOST_DATA_DIR = dataDir;
  process.env.GATEPOST_LOG_LEVEL = 'silent';
  ctx = workerContext();
  const url = process.env.GATEPOST_TEST_DATABASE_URL!;
  control = new Client({ connectionString: url });
  locker = new Client({ connectionString: url });
  await Promise.all([control.connect(), locker.connect()]);
  await control.query(DROP_TEST_DDL);
  await control.query(TEST_DDL);
  const queues: JobQueues = {
    ...h.deps.queues,
    async releaseIngest(data) {
      await h.deps.queues.releaseIngest(data);
      released.get(data.captureId)?.();
    },
  };
  readingApi = buildApp({ ...h.deps, blobStore: ctx.blobStore, queues, config: { ...h.config, dataDir, readUploadsFromBytes: 0 } });
}, 120_000);

afterAll(async () => {
  await control?.query(DROP_TEST_DDL).catch(() => {});
  await Promise.allSettled([control?.end(), locker?.end()]);
  await closeWorkerContext();
  await h?.close();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');
const good = (seed: number) => simulatedCsv({ speed: 300, seed }).bytes;
// A text file renamed .csv: the importer refuses it.
const notAScopeFile = (n: number) => new TextEncoder().encode(`Shopping list ${n}\nmilk\neggs\n`);

let shotNumber = 9000;
async function newShot(): Promise<string> {
  shotNumber += 1;
  return createDemoShotRow(demo, shotNumber);
}

/** A file stored and recorded on the shot as an upload leaves it (queued for the worker), the shot settled. */
async function storedCapture(shotId: string, fileName: string, bytes: Uint8Array): Promise<Capture> {
  const sha = sha256(bytes);
  const storageKey = `labs/${demo.labs.hollowmere.id}/raw/${sha}`;
  await ctx.blobStore.putBytes(storageKey, bytes);
  const capture = await Capture.create({
    labId: demo.labs.hollowmere.id, shotId, fileName, sizeBytes: bytes.length, sha256: sha, storageKey, uploadedBy: demo.users.experimenter.id,
  });
  await settleShot(shotId);
  return capture;
}

const jobOf = (data: object, more: object = {}) => ({ id: `race-${Math.random()}`, data, updateProgress: async () => {}, ...more }) as unknown as Job;

/**
 * An end of a read, as the product runs it; `sha` keys the barrier its final write waits at. `recorded`, when
 * given, settles once the file's row exists (an upload answered): the ends after it start only then.
 */
interface End { name: string; sha: string; start(): Promise<unknown>; recorded?: Promise<unknown> }

/** The worker's ingest job reads the file and records it read (or failed: the importer refuses it). */
const ingestEnd = (capture: Capture): End => ({
  name: `ingest job of ${capture.fileName}`, sha: capture.sha256,
  start: () => ingestCapture(jobOf({ captureId: capture.id, attempt: capture.ingestAttempt })),
});

/** The last attempt of an ingest job failed while the file was being read (the worker's "failed" event). */
const finalFailureEnd = (capture: Capture): End => ({
  name: `final failure of ${capture.fileName}`, sha: capture.sha256,
  start: async () => {
    await capture.update({ state: 'reading', progress: 10 });
    const job = jobOf({ captureId: capture.id, attempt: capture.ingestAttempt }, { attemptsMade: 3, opts: { attempts: 3 } });
    await recordFinalFailure(QUEUE_NAMES.ingest, job, 'connect ECONNREFUSED 127.0.0.1:5432', () => ({ addBulk: async () => [] }) as never);
  },
});

/** Uploaded to the API, which reads the file as it arrives, marks it read and queues the version itself. */
const apiReadEnd = (shotId: string, fileName: string, bytes: Uint8Array): End => {
  let answered: () => void = () => {};
  const recorded = new Promise<void>((resolve) => { answered = resolve; });
  return {
    name: `API read of ${fileName}`, sha: sha256(bytes), recorded,
    start: async () => {
      const upload = request(readingApi).post(`/api/shots/${shotId}/captures`).set('Cookie', h.sessionCookie(demo.users.experimenter.id))
        .attach('files', Buffer.from(bytes), fileName);
      const res = await Promise.resolve(upload).finally(answered);
      expect(res.status, JSON.stringify(res.body)).toBe(202);
      const [capture] = res.body.captures as { id: string }[];
      // The upload is answered first; the read's end follows and ends by releasing the held ingest job.
      await new Promise<void>((resolve) => {
        released.set(capture.id, resolve);
        void Capture.findByPk(capture.id).then((c) => { if (c?.state === 'ready' || c?.state === 'failed') resolve(); });
      });
    },
  };
};

interface Tracked { name: string; done: boolean; promise: Promise<unknown> }
function track(name: string, promise: Promise<unknown>): Tracked {
  const t: Tracked = { name, done: false, promise };
  promise.then(() => { t.done = true; }, () => { t.done = true; });
  return t;
}

/** Backends of the test database waiting on a lock (row, transaction or advisory), this one left out. */
async function lockWaiters(): Promise<string[]> {
  const { rows } = await control.query(
    "SELECT wait_event AS what, left(query, 80) AS query FROM pg_stat_activity WHERE datname = current_database() AND wait_event_type = 'Lock' AND pid <> pg_backend_pid()",
  );
  return rows.map((r) => `${String(r.what)}: ${String(r.query)}`);
}

/**
 * Waits until every task still running is waiting on a lock (seen three times in a row, 10 ms apart): nothing
 * can move until the test lets a lock go.
 */
async function untilHeld(tasks: Tracked[], step: string): Promise<void> {
  let seen = 0;
  let waiting: string[] = [];
  for (const deadline = Date.now() + 30_000; Date.now() < deadline;) {
    const running = tasks.filter((t) => !t.done);
    waiting = await lockWaiters();
    seen = waiting.length >= running.length ? seen + 1 : 0;
    if (seen >= 3) return;
    await new Promise((resolve) => setTimeout(resolve, 10));
  }
  throw new Error(`${step}: still running after 30 s (${tasks.filter((t) => !t.done).map((t) => t.name).join(', ')}); waiting: ${waiting.join('; ')}`);
}

const hold = (sha: string) => control.query('SELECT pg_advisory_lock($1, hashtext($2))', [BARRIER, sha]);
const letGo = (sha: string) => control.query('SELECT pg_advisory_unlock($1, hashtext($2))', [BARRIER, sha]);

/**
 * Runs the ends together: each is held at its capture's final write; then the shot's row lock is taken; then they
 * are let go in `order`, one at a time, each running as far as it can; then the shot's lock goes. On the code
 * before the fix this puts every end's settle between the other's final write and its version. Returns what each
 * end came to, and every status a reader could have read, in order.
 */
async function race(shotId: string, ends: End[], order: number[]): Promise<{ outcomes: PromiseSettledResult<unknown>[]; statuses: string[] }> {
  for (const end of ends) await hold(end.sha);
  let lockTask: Tracked | null = null;
  // An end that records its file first (an upload) has its row in before the next end starts: otherwise the other
  // file's read could end before this file exists, which is not two files ending together.
  const tasks: Tracked[] = [];
  for (const end of ends) {
    tasks.push(track(end.name, end.start()));
    await end.recorded;
  }
  try {
    await untilHeld(tasks, 'every end at its final write');
    for (const t of tasks) expect(t.done, `${t.name} ended before its final write was held`).toBe(false);
    lockTask = track('the test taking the shot\'s lock', locker.query('BEGIN').then(() => locker.query('SELECT id FROM shots WHERE id = $1 FOR UPDATE', [shotId])));
    await untilHeld([...tasks, lockTask], 'the shot\'s lock taken');
    for (const i of order) {
      await letGo(ends[i].sha);
      await untilHeld([...tasks, lockTask], `${ends[i].name} let go`);
    }
  } finally {
    for (const end of ends) await letGo(end.sha).catch(() => {});
    if (lockTask) await lockTask.promise.finally(() => locker.query('COMMIT'));
  }
  const outcomes = await Promise.allSettled(tasks.map((t) => t.promise));
  return { outcomes, statuses: await statusesRead(shotId) };
}

/** The last status each committed transaction wrote on the shot, in the order they were written (under its lock). */
async function statusesRead(shotId: string): Promise<string[]> {
  const { rows } = await control.query('SELECT status, tx FROM test_shot_status_log WHERE shot_id = $1 ORDER BY id', [shotId]);
  const out: { status: string; tx: string }[] = [];
  for (const r of rows) {
    const last = out.at(-1);
    if (last && last.tx === String(r.tx)) last.status = String(r.status);
    else out.push({ status: String(r.status), tx: String(r.tx) });
  }
  return out.map((s) => s.status);
}

const rejectionOf = (o: PromiseSettledResult<unknown>) => (o.status === 'rejected' ? String((o.reason as Error).message ?? o.reason) : null);

async function rowsOf(shotId: string) {
  const [shot, captures, analyses] = await Promise.all([
    Shot.findByPk(shotId, { rejectOnEmpty: true }),
    Capture.findAll({ where: { shotId }, order: [['uploadedAt', 'ASC'], ['id', 'ASC']] }),
    Analysis.findAll({ where: { shotId }, order: [['version', 'ASC']] }),
  ]);
  return { shot, captures, analyses };
}

/** Runs the shot's queued version as the worker would: the shot then reads "analysed" with it current. */
async function analyseQueued(shotId: string) {
  const { analyses } = await rowsOf(shotId);
  expect(analyses.map((a) => a.state)).toEqual(['queued']);
  await analyseShot(jobOf({ analysisId: analyses[0].id }));
  return rowsOf(shotId);
}

describe('When a read file and a refused file of one shot end together (worker ingest jobs)', () => {
  for (const [label, order] of [['the refused one let go first', [1, 0]], ['the read one let go first', [0, 1]]] as const) {
    it(`then, ${label}, the shot never reads "failed" on the way to its one version`, async () => {
      const shotId = await newShot();
      const read = await storedCapture(shotId, 'good.csv', good(101 + order[0]));
      const refused = await storedCapture(shotId, 'renamed-notes.csv', notAScopeFile(order[0]));
      const { outcomes, statuses } = await race(shotId, [ingestEnd(read), ingestEnd(refused)], [...order]);
      expect(rejectionOf(outcomes[0])).toBeNull();
      // The refused file's job ends as unrecoverable, with the importer's reason, as in the worker.
      expect(rejectionOf(outcomes[1])).toBeTruthy();
      expect(statuses, statuses.join(' → ')).not.toContain('failed');
      const { shot, captures, analyses } = await rowsOf(shotId);
      expect(captures.map((c) => c.state)).toEqual(['ready', 'failed']);
      expect(analyses.map((a) => [a.version, a.state, a.captureIds])).toEqual([[1, 'queued', [read.id]]]);
      expect(shot.status).toBe('processing');
      expect((await analyseQueued(shotId)).shot.status).toBe('analysed');
    });
  }
});

describe('When two read files of one shot end together (worker ingest jobs)', () => {
  it('then the shot never reads "failed", and one version reads both files', async () => {
    const shotId = await newShot();
    const first = await storedCapture(shotId, 'first.csv', good(111));
    const second = await storedCapture(shotId, 'second.csv', good(112));
    const { outcomes, statuses } = await race(shotId, [ingestEnd(first), ingestEnd(second)], [0, 1]);
    expect(outcomes.map(rejectionOf)).toEqual([null, null]);
    expect(statuses, statuses.join(' → ')).not.toContain('failed');
    const { shot, analyses } = await rowsOf(shotId);
    expect(analyses.map((a) => [a.version, a.state, a.captureIds])).toEqual([[1, 'queued', [first.id, second.id]]]);
    expect(shot.status).toBe('processing');
  });
});

describe('When a file is read while the last attempt of the other file\'s job fails (worker final failure)', () => {
  it('then the shot never reads "failed", and the read file gets its version', async () => {
    const shotId = await newShot();
    const read = await storedCapture(shotId, 'good.csv', good(121));
    const lost = await storedCapture(shotId, 'lost.csv', good(122));
    const { outcomes, statuses } = await race(shotId, [ingestEnd(read), finalFailureEnd(lost)], [1, 0]);
    expect(outcomes.map(rejectionOf)).toEqual([null, null]);
    expect(statuses, statuses.join(' → ')).not.toContain('failed');
    const { shot, captures, analyses } = await rowsOf(shotId);
    expect(captures.map((c) => [c.state, c.error])).toEqual([['ready', null], ['failed', 'connect ECONNREFUSED 127.0.0.1:5432 (gave up after 3 attempts)']]);
    expect(analyses.map((a) => [a.version, a.captureIds])).toEqual([[1, [read.id]]]);
    expect(shot.status).toBe('processing');
  });
});

describe('When both files of one shot are refused together', () => {
  it('then the shot goes from processing to failed once, with no version and no deadlock', async () => {
    const shotId = await newShot();
    const one = await storedCapture(shotId, 'notes-1.csv', notAScopeFile(131));
    const two = await storedCapture(shotId, 'notes-2.csv', notAScopeFile(132));
    const { outcomes, statuses } = await race(shotId, [ingestEnd(one), ingestEnd(two)], [0, 1]);
    for (const o of outcomes) expect(rejectionOf(o)).not.toMatch(/deadlock/i);
    expect(statuses).toEqual(['draft', 'processing', 'failed']);
    const { shot, analyses } = await rowsOf(shotId);
    expect(analyses).toHaveLength(0);
    expect(shot.status).toBe('failed');
  });
});

describe('When a file the API reads as it arrives ends beside a file of an earlier upload the worker reads', () => {
  for (const [label, order] of [['the API one let go first', [0, 1]], ['the worker one let go first', [1, 0]]] as const) {
    it(`then, ${label}, the shot never reads "failed", and one version reads both files`, async () => {
      const shotId = await newShot();
      const earlier = await storedCapture(shotId, 'earlier.csv', good(141 + order[0]));
      const arriving = good(143 + order[0]);
      const { outcomes, statuses } = await race(shotId, [apiReadEnd(shotId, 'arriving.csv', arriving), ingestEnd(earlier)], [...order]);
      expect(outcomes.map(rejectionOf)).toEqual([null, null]);
      expect(statuses, statuses.join(' → ')).not.toContain('failed');
      const { shot, captures, analyses } = await rowsOf(shotId);
      expect(captures.map((c) => [c.fileName, c.state])).toEqual([['earlier.csv', 'ready'], ['arriving.csv', 'ready']]);
      expect(analyses.map((a) => [a.version, a.captureIds])).toEqual([[1, captures.map((c) => c.id)]]);
      expect(shot.status).toBe('processing');
    });
  }
});

describe('When the only file a read file waited for is removed before its job ran', () => {
  it('then the read file gets its version at once and the shot never reads "failed" (the removed file\'s job makes none)', async () => {
    const shotId = await newShot();
    const read = await storedCapture(shotId, 'good.csv', good(151));
    const dropped = await storedCapture(shotId, 'wrong-shot.csv', good(152));
    // The read file's job ends while the other is still queued: no version yet, the shot is processing.
    await ingestCapture(jobOf({ captureId: read.id, attempt: read.ingestAttempt }));
    expect((await rowsOf(shotId)).analyses).toHaveLength(0);
    const res = await request(readingApi).delete(`/api/shots/${shotId}/captures/${dropped.id}`).set('Cookie', h.sessionCookie(demo.users.experimenter.id));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    // The removed file's job, when it runs, finds it removed and ends there.
    expect(await ingestCapture(jobOf({ captureId: dropped.id, attempt: dropped.ingestAttempt }))).toEqual({ captureId: dropped.id, state: 'removed' });
    const { shot, analyses } = await rowsOf(shotId);
    expect(analyses.map((a) => [a.version, a.state, a.captureIds])).toEqual([[1, 'queued', [read.id]]]);
    expect(res.body.analysis).toMatchObject({ id: analyses[0].id });
    expect(shot.status).toBe('processing');
    const statuses = await statusesRead(shotId);
    expect(statuses, statuses.join(' → ')).not.toContain('failed');
    expect((await analyseQueued(shotId)).shot.status).toBe('analysed');
  });
});
