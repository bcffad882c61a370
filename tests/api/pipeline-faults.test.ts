// Faults of the upload-to-result pipeline with real processes: a worker killed with SIGKILL in the middle of an
// ingest and of an analysis, two workers sharing one queue, Redis and then PostgreSQL stopped under a running API
// and worker (each started again the way scripts/with-services.sh started it, in a finally). The API
// server and the workers are spawned (tests/helpers/app-processes.ts) against the throwaway services of
// scripts/with-services.sh and spoken to over HTTP only. A short job lock (2 s) makes stalled-job recovery quick:
// the lock is set by the worker that holds the job, so every worker of this file gets it.
import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Queue } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, Capture, GateRig, Projectile, Shot } from '../../server/db/models/index.ts';
import { ingestJobId, notifyJobId, QUEUE_NAMES } from '../../shared/contracts/jobs.ts';
import { BIG_CAPTURE_SHOT, ensureBigCapture } from '../../bench/lib/big-capture.ts';
import { pollUntil, signIn, simulatedCsv, type PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { spawnChild, type ChildHandle } from '../../scripts/lib/processes.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { redisEndpoint } from '../../server/lib/redis.ts';

interface ShotDetail {
  shot: { id: string; status: string; currentAnalysisId: string | null };
  captures: { id: string; state: string; error: string | null }[];
  analyses: { id: string; version: number; state: string; error: string | null }[];
  currentAnalysis: { id: string; state: string; results: { speed: { value: number; uncertainty: number } | null } | null } | null;
}

const LOCK_MS = 2000;
let h: ApiHarness;
let demo: DemoWorld;
let app: AppProcesses;
let dataDir: string;
let experimenter: PipelineClient;
let ballId: string;
let exitRigId: string;
/** Every worker process this file started, so their logs can be searched and all are stopped at the end. */
const workers: ChildHandle[] = [];

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-faults-'));
  app = await startAppProcesses({
    // The worker reads every upload here (the API reads none as it arrives): these tests kill it in mid-read.
    env: {
      GATEPOST_DATA_DIR: dataDir, GATEPOST_LOG_LEVEL: 'info', GATEPOST_JOB_LOCK_MS: String(LOCK_MS), GATEPOST_SWEEP_INTERVAL_MS: '1000',
      GATEPOST_READ_UPLOADS_FROM_BYTES: '-1',
      // The workers of this file count each other as one two-core machine, whatever this machine has and whatever
      // other test files run beside (worker/host-share.ts).
      GATEPOST_WORKER_CORES: '2', GATEPOST_WORKER_HOST: `pipeline-faults-${process.pid}`,
    },
  });
  workers.push(app.worker!);
  experimenter = await signIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
  ballId = (await Projectile.findOne({ where: { labId: demo.labs.hollowmere.id, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true })).id;
  exitRigId = demo.hollowmere.gateRigIds[0];
}, 120_000);

afterAll(async () => {
  await Promise.allSettled(workers.map((w) => w.stop()));
  await app?.stop();
  await h?.close();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

async function newShot(gateRigId: string): Promise<string> {
  const res = await experimenter.post<{ shot: { id: string } }>(`/api/labs/${demo.labs.hollowmere.id}/shots`, {
    campaignId: demo.hollowmere.campaignIds[0], projectileId: ballId, gateRigId,
  });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.shot.id;
}

const detail = async (shotId: string) => (await experimenter.get<ShotDetail>(`/api/shots/${shotId}`)).body;

async function settled(shotId: string, timeoutMs: number): Promise<ShotDetail> {
  return pollUntil(async () => {
    const d = await detail(shotId);
    const busy = d.shot.status === 'processing' || d.captures.some((c) => c.state === 'queued' || c.state === 'reading') ||
      d.analyses.some((a) => a.state === 'queued' || a.state === 'running') || d.analyses.length === 0;
    return busy ? undefined : d;
  }, { timeoutMs, intervalMs: 50, what: `shot ${shotId} to settle` });
}

/** How many times each job id was logged as done ("job done", worker/index.ts) across these workers' output. */
function jobsDone(handles: ChildHandle[]): Map<string, number> {
  const counts = new Map<string, number>();
  for (const w of handles) {
    for (const line of w.output().split('\n')) {
      if (!line.startsWith('{')) continue;
      let entry: { msg?: string; job?: string };
      try {
        entry = JSON.parse(line) as { msg?: string; job?: string };
      } catch {
        continue;
      }
      if (entry.msg === 'job done' && entry.job) counts.set(entry.job, (counts.get(entry.job) ?? 0) + 1);
    }
  }
  return counts;
}

/**
 * Waits until each of `ids` has been logged done by one of `handles` (the log line follows the row's final write by
 * a moment), then a little longer so a late second run would show, and returns the counts.
 */
async function jobsDoneSettled(handles: ChildHandle[], ids: string[]): Promise<Map<string, number>> {
  await pollUntil(async () => {
    const done = jobsDone(handles);
    return ids.every((id) => done.has(id)) ? true : undefined;
  }, { timeoutMs: 10_000, what: `"job done" lines for ${ids.join(', ')}` });
  await new Promise((resolve) => setTimeout(resolve, 500));
  return jobsDone(handles);
}

/** The jobs per reading queue the worker last said it runs, and the worker processes it counted on its host. */
interface Share { concurrency: number; workers?: number }
function lastShare(handle: ChildHandle): Share | null {
  let last = null as Share | null;
  for (const line of handle.output().split('\n')) {
    if (!line.startsWith('{')) continue;
    try {
      const entry = JSON.parse(line) as { msg?: string; concurrency?: number; workers?: number };
      if (entry.concurrency !== undefined && (entry.msg === 'Gatepost worker ready' || entry.msg?.startsWith('jobs per reading queue'))) {
        last = { concurrency: entry.concurrency, workers: entry.workers ?? last?.workers };
      }
    } catch {
      continue;
    }
  }
  return last;
}

/** SIGKILL to the worker's whole process group (tsx runs the script in a child node process, with its threads). */
async function killWorker(worker: ChildHandle): Promise<void> {
  process.kill(-worker.pid, 'SIGKILL');
  await worker.exited;
}

describe('When the worker is killed with SIGKILL in the middle of a job', () => {
  it('then a new worker recovers the stalled ingest and analysis jobs: each completes once, one analysis row, results present', async () => {
    // 2 million rows of two gate channels (~66 MB, cached in .cache/bench): slow enough to be caught reading.
    // Truth: the shot model's inputs in bench/lib/big-capture.ts (305 m/s, gates at 0 and 0.1 m).
    const file = await ensureBigCapture({ rows: 2_000_000 });
    const rig = await GateRig.create({
      labId: demo.labs.hollowmere.id, name: 'Bench pair, 100 mm',
      gates: BIG_CAPTURE_SHOT.gatePositions.map((p, i) => ({ label: 'AB'[i], position_m: p, position_uncertainty_m: 0.0005 })),
      beamWidthM: 0.001, sensorType: 'phototransistor', notes: '',
    });
    const shotId = await newShot(rig.id);
    const up = await experimenter.upload<{ captures: { id: string }[] }>(shotId, [{ name: 'deep-record.csv', bytes: new Uint8Array(readFileSync(file)) }]);
    expect(up.status).toBe(202);
    const captureId = up.body.captures[0].id;

    // Kill 1: while the capture is being read.
    await pollUntil(async () => ((await detail(shotId)).captures[0].state === 'reading' ? true : undefined), { timeoutMs: 60_000, intervalMs: 20, what: 'the capture to be reading' });
    const first = app.worker!;
    await killWorker(first);
    expect((await Capture.findByPk(captureId, { rejectOnEmpty: true })).state).toBe('reading');
    // Nobody holds the job now; it stays "reading" until a worker notices the lapsed lock.
    const second = app.restartWorker();
    workers.push(second);

    // Kill 2: while the automatic analysis runs (the recovered ingest queued it).
    const analysisId = await pollUntil(async () => {
      const a = (await detail(shotId)).analyses[0];
      return a?.state === 'running' ? a.id : undefined;
    }, { timeoutMs: 90_000, intervalMs: 20, what: 'the analysis to be running' });
    // The ingest logs "job done" a moment after it queued the analysis; kill only once it has.
    await pollUntil(async () => (jobsDone([second]).has(`ingest-${captureId}-1`) ? true : undefined), { timeoutMs: 5_000, intervalMs: 10, what: 'the ingest to be logged done' });
    await killWorker(second);
    expect((await Analysis.findByPk(analysisId, { rejectOnEmpty: true })).state).toBe('running');
    const third = app.restartWorker();
    workers.push(third);

    const shot = await settled(shotId, 90_000);
    expect(shot.captures).toEqual([expect.objectContaining({ id: captureId, state: 'ready', error: null })]);
    expect(shot.analyses).toEqual([expect.objectContaining({ id: analysisId, version: 1, state: 'done' })]);
    expect(await Analysis.count({ where: { shotId } })).toBe(1);
    expect(shot.currentAnalysis!.id).toBe(analysisId);
    const speed = shot.currentAnalysis!.results!.speed!;
    expect(Math.abs(speed.value - BIG_CAPTURE_SHOT.speed)).toBeLessThanOrEqual(speed.uncertainty);

    const done = await jobsDoneSettled([first, second, third], [`ingest-${captureId}-1`, `analysis-${analysisId}`]);
    expect(done.get(`ingest-${captureId}-1`)).toBe(1);
    expect(done.get(`analysis-${analysisId}`)).toBe(1);
    // The ingest finished in the second worker, the analysis in the third: the killed ones finished nothing of these.
    expect(jobsDone([first]).get(`ingest-${captureId}-1`)).toBeUndefined();
    expect(jobsDone([second]).get(`ingest-${captureId}-1`)).toBe(1);
    expect(jobsDone([third]).get(`analysis-${analysisId}`)).toBe(1);
  }, 240_000);
});

describe('When two worker processes share the queue', () => {
  it('then they split the host\'s cores, both take jobs, every job of several shots runs exactly once, and each shot gets one analysis', async () => {
    const current = app.worker!;
    // Alone on its (two-core) host, once the entries of the workers killed above have expired: two jobs per queue.
    await pollUntil(async () => (lastShare(current)?.concurrency === 2 ? true : undefined), { timeoutMs: 30_000, what: 'the worker to run two jobs per queue alone' });
    const extra = spawnChild({ name: 'worker-2', command: path.resolve('node_modules/.bin/tsx'), args: ['worker/index.ts'], env: app.env, echo: false });
    workers.push(extra);
    await pollUntil(async () => (extra.output().includes('Gatepost worker ready') ? true : undefined), { timeoutMs: 60_000, what: 'the second worker to be ready' });
    // The newcomer counts both at once; the first one gives up a core at its next heartbeat (2 s).
    expect(lastShare(extra)).toEqual({ concurrency: 1, workers: 2 });
    await pollUntil(async () => (lastShare(current)?.concurrency === 1 ? true : undefined), { timeoutMs: 30_000, what: 'the first worker to give a core to the second' });
    expect(lastShare(current)).toEqual({ concurrency: 1, workers: 2 });
    const shots: { shotId: string; captureId: string }[] = [];
    for (let i = 0; i < 6; i++) {
      const shotId = await newShot(exitRigId);
      const csv = simulatedCsv({ speed: 280 + 5 * i, seed: 100 + i });
      const up = await experimenter.upload<{ captures: { id: string }[] }>(shotId, [{ name: `shot-${i}.csv`, bytes: csv.bytes }]);
      expect(up.status).toBe(202);
      shots.push({ shotId, captureId: up.body.captures[0].id });
    }
    const jobIds: string[] = [];
    for (const [i, { shotId, captureId }] of shots.entries()) {
      const shot = await settled(shotId, 60_000);
      expect(shot.analyses).toHaveLength(1);
      expect(await Analysis.count({ where: { shotId } })).toBe(1);
      expect(shot.currentAnalysis!.state).toBe('done');
      // Truth: the speed the shot model was given.
      const speed = shot.currentAnalysis!.results!.speed!;
      expect(Math.abs(speed.value - (280 + 5 * i))).toBeLessThanOrEqual(speed.uncertainty);
      jobIds.push(`ingest-${captureId}-1`, `analysis-${shot.analyses[0].id}`);
    }
    const done = await jobsDoneSettled([current, extra], jobIds);
    for (const id of jobIds) expect(done.get(id), id).toBe(1);
    const byExtra = jobIds.filter((id) => jobsDone([extra]).has(id)).length;
    console.log(`two workers: ${jobIds.length - byExtra} jobs ran in worker ${current.pid}, ${byExtra} in worker ${extra.pid}`);
    // One job per queue each, six shots queued at once: neither worker can have taken them all.
    expect(byExtra).toBeGreaterThan(0);
    expect(byExtra).toBeLessThan(jobIds.length);
    await extra.stop();
    // The second one left the host's list as it stopped: the first takes its core back.
    await pollUntil(async () => (lastShare(current)?.concurrency === 2 ? true : undefined), { timeoutMs: 30_000, what: 'the first worker to take the core back' });
    expect(lastShare(current)).toEqual({ concurrency: 2, workers: 1 });
  }, 180_000);
});

/** The throwaway Redis of scripts/with-services.sh, shut down and started again from its config file. */
function throwawayRedis() {
  const url = new URL(process.env.GATEPOST_TEST_REDIS_URL!);
  // The password goes to redis-cli through the environment, as scripts/lib/services.ts does (never in `ps`).
  const cli = (...args: string[]) => execFileSync('redis-cli', ['-h', '127.0.0.1', '-p', url.port, ...args], {
    encoding: 'utf8', timeout: 5_000, stdio: ['ignore', 'pipe', 'ignore'], env: { ...process.env, REDISCLI_AUTH: decodeURIComponent(url.password) },
  });
  const configFile = path.join(process.env.GATEPOST_TEST_TMP_DIR!, 'redis', 'redis.conf');
  const running = () => {
    try {
      return cli('ping').trim() === 'PONG';
    } catch {
      return false;
    }
  };
  return {
    running,
    stop: () => {
      // No persistence in tests: whatever was queued in Redis is gone, as after a crash of a Redis without a disk.
      cli('shutdown', 'nosave');
    },
    start: async () => {
      if (running()) return;
      execFileSync('redis-server', [configFile]);
      await pollUntil(async () => (running() ? true : undefined), { timeoutMs: 20_000, what: 'Redis to answer again' });
    },
  };
}

describe('When Redis is briefly down while a file is uploaded', () => {
  it('then the upload is kept (202 for a token client), and once Redis is back the sweep queues it and it is analysed', async () => {
    const shotId = await newShot(exitRigId);
    // Sessions are checked against Redis (revoked sign-ins); API tokens only against PostgreSQL, so a script with
    // a token can still upload while Redis is away.
    const created = await experimenter.post<{ secret: string }>('/api/me/tokens', { name: 'redis outage script', password: demo.users.experimenter.password });
    expect(created.status).toBe(201);
    const bearer = { authorization: `Bearer ${created.body.secret}` };
    const redis = throwawayRedis();
    // The harness's own client reconnects by itself; without a listener ioredis prints each refused attempt.
    h.redis.on('error', () => {});
    const csv = simulatedCsv({ speed: 295, seed: 91 });
    let captureId: string;
    try {
      redis.stop();
      await pollUntil(async () => (redis.running() ? undefined : true), { timeoutMs: 10_000, what: 'Redis to stop' });
      const session = await experimenter.get<{ error: { code: string; message: string } }>(`/api/shots/${shotId}`);
      expect(session.status).toBe(503);
      expect(session.body.error.code).toBe('service_unavailable');
      expect(session.body.error.message).toMatch(/not answering right now/);
      const form = new FormData();
      form.append('files', new Blob([csv.bytes as Uint8Array<ArrayBuffer>]), 'during-redis-outage.csv');
      const started = Date.now();
      const up = await fetch(`${app.baseUrl}/api/shots/${shotId}/captures`, { method: 'POST', headers: bearer, body: form, signal: AbortSignal.timeout(30_000) });
      const body = (await up.json()) as { captures: { id: string; state: string }[] };
      expect(up.status, JSON.stringify(body)).toBe(202);
      expect(Date.now() - started).toBeLessThan(10_000);
      captureId = body.captures[0].id;
      // The row is the record of work to do; no job reached Redis.
      expect((await Capture.findByPk(captureId, { rejectOnEmpty: true })).state).toBe('queued');
    } finally {
      await redis.start();
    }
    const shot = await settled(shotId, 60_000);
    expect(shot.captures).toEqual([expect.objectContaining({ id: captureId, state: 'ready' })]);
    expect(shot.analyses).toHaveLength(1);
    const speed = shot.currentAnalysis!.results!.speed!;
    expect(Math.abs(speed.value - 295)).toBeLessThanOrEqual(speed.uncertainty);
    expect(app.worker!.hasExited()).toBe(false);
    expect(app.worker!.output()).toContain('sweep re-queued work');
    // The session works again without signing in anew.
    expect((await experimenter.get(`/api/shots/${shotId}`)).status).toBe(200);
  }, 120_000);
});

/** The throwaway cluster of scripts/with-services.sh, stopped and started again the way it was started. */
function throwawayCluster() {
  const tmp = process.env.GATEPOST_TEST_TMP_DIR;
  if (!tmp) throw new Error('GATEPOST_TEST_TMP_DIR is not set: run through scripts/with-services.sh');
  const dir = path.join(tmp, 'postgres');
  let binDir: string;
  try {
    binDir = execFileSync('pg_config', ['--bindir'], { encoding: 'utf8' }).trim();
  } catch {
    binDir = execFileSync('bash', ['-c', 'ls -d /usr/lib/postgresql/*/bin | sort -V | tail -n1'], { encoding: 'utf8' }).trim();
  }
  const pgCtl = path.join(binDir, 'pg_ctl');
  const asPostgres = (args: string[]) =>
    process.getuid?.() === 0 ? execFileSync('runuser', ['-u', 'postgres', '--', pgCtl, ...args], { encoding: 'utf8' }) : execFileSync(pgCtl, args, { encoding: 'utf8' });
  // postmaster.opts holds the server's command line as quoted words: keep all but the binary and its -D folder.
  const opts = readFileSync(path.join(dir, 'postmaster.opts'), 'utf8');
  const words = [...opts.matchAll(/"((?:[^"\\]|\\.)*)"/g)].map((m) => m[1]);
  const dIndex = words.indexOf('-D');
  if (dIndex >= 0) words.splice(dIndex, 2);
  // pg_ctl hands -o to a shell: quote each word.
  const serverOptions = words.map((w) => `'${w.replace(/'/g, "'\\''")}'`).join(' ');
  const running = () => {
    try {
      asPostgres(['-D', dir, 'status']);
      return true;
    } catch {
      return false;
    }
  };
  return {
    running,
    stop: () => asPostgres(['-D', dir, '-w', '-t', '60', '-m', 'fast', 'stop']),
    start: () => {
      if (!running()) asPostgres(['-D', dir, '-l', path.join(tmp, 'postgres.log'), '-w', '-t', '60', '-o', serverOptions, 'start']);
    },
  };
}

describe('When PostgreSQL goes down under the running API', () => {
  it('then the API answers 503 with a clear JSON message, and recovers by itself once PostgreSQL is back', async () => {
    const shotId = await newShot(exitRigId);
    expect((await experimenter.get(`/api/shots/${shotId}`)).status).toBe(200);
    const cluster = throwawayCluster();
    expect(existsSync(path.join(process.env.GATEPOST_TEST_TMP_DIR!, 'postgres', 'postmaster.opts'))).toBe(true);
    try {
      cluster.stop();
      expect(cluster.running()).toBe(false);
      const started = Date.now();
      const down = await experimenter.get<{ error: { code: string; message: string } }>(`/api/shots/${shotId}`);
      const ms = Date.now() - started;
      expect(down.status, JSON.stringify(down.body)).toBe(503);
      expect(down.headers.get('content-type')).toMatch(/application\/json/);
      expect(down.headers.get('retry-after')).toBe('5');
      expect(down.body.error.code).toBe('service_unavailable');
      expect(down.body.error.message).toMatch(/database is not answering/i);
      // Not a hang (the pool's connect timeout is 5 s) and no stack trace in the answer.
      expect(ms).toBeLessThan(12_000);
      expect(JSON.stringify(down.body)).not.toMatch(/\bat \S+ \(|ECONNREFUSED|node_modules/);
      const health = await fetch(`${app.baseUrl}/api/health`);
      expect(health.status).toBe(503);
      expect(await health.json()).toMatchObject({ status: 'degraded', db: 'down', redis: 'ok' });
      // An upload while the database is away is refused as a whole, with the same message.
      const refused = await experimenter.upload<{ error: { code: string } }>(shotId, [{ name: 'during-outage.csv', bytes: simulatedCsv({ seed: 77 }).bytes }]);
      expect(refused.status).toBe(503);
      expect(refused.body.error.code).toBe('service_unavailable');
    } finally {
      // Later test files share this cluster: it runs again whatever happened above.
      cluster.start();
    }
    expect(cluster.running()).toBe(true);
    // Nobody restarts the API: its pool reconnects on the next request.
    const back = await pollUntil(async () => {
      const res = await experimenter.get<ShotDetail>(`/api/shots/${shotId}`);
      return res.status === 200 ? res : undefined;
    }, { timeoutMs: 20_000, intervalMs: 200, what: 'the API to answer 200 again' });
    expect(back.body.shot.id).toBe(shotId);
    // The worker rode out the outage too: a file uploaded now is read and analysed.
    expect(app.worker!.hasExited()).toBe(false);
    const csv = simulatedCsv({ speed: 310, seed: 78 });
    expect((await experimenter.upload(shotId, [{ name: 'after-outage.csv', bytes: csv.bytes }])).status).toBe(202);
    const shot = await settled(shotId, 60_000);
    expect(shot.currentAnalysis!.state).toBe('done');
    const speed = shot.currentAnalysis!.results!.speed!;
    expect(Math.abs(speed.value - 310)).toBeLessThanOrEqual(speed.uncertainty);
  }, 120_000);
});

describe('When a job gave up for good but writing that down was lost (the database was away at that moment)', () => {
  it('then the sweep writes it from the job\'s own record: the capture says why, the shot stops processing, one mail', async () => {
    const shotId = await newShot(exitRigId);
    const up = await experimenter.upload<{ captures: { id: string }[] }>(shotId, [{ name: 'lost-write.csv', bytes: new TextEncoder().encode('not,a scope\nfile,at all\n') }]);
    expect(up.status).toBe(202);
    const captureId = up.body.captures[0].id;
    const connection = redisEndpoint(h.config.redisUrl);
    const ingest = new Queue(QUEUE_NAMES.ingest, { connection });
    const notify = new Queue(QUEUE_NAMES.notify, { connection });
    try {
      const jobId = ingestJobId({ captureId, attempt: 1 });
      const mailJobId = notifyJobId({ kind: 'jobFailed', eventId: jobId, recipientId: demo.users.experimenter.id, labId: '', shotId: '' });
      // The worker's own handling ends with the uploader's mail queued: wait for it, so nothing of it runs later.
      await pollUntil(async () => (await notify.getJob(mailJobId)) ?? undefined, { timeoutMs: 20_000, what: 'the failure mail to be queued' });
      const failed = (await detail(shotId));
      expect(failed.shot.status).toBe('failed');
      const reason = failed.captures[0].error!;
      expect(reason.length).toBeGreaterThan(10);
      expect((await ingest.getJob(jobId))?.failedReason).toBe(reason);

      // What a lost write leaves: BullMQ has the job failed for good, the rows still say it is being read.
      await Capture.update({ state: 'reading', progress: 10, error: null }, { where: { id: captureId } });
      await Shot.update({ status: 'processing' }, { where: { id: shotId } });
      const mended = await pollUntil(async () => {
        const d = await detail(shotId);
        return d.captures[0].state === 'failed' ? d : undefined;
      }, { timeoutMs: 20_000, what: 'the sweep to record the failure' });
      expect(mended.captures[0].error).toBe(reason);
      await pollUntil(async () => ((await detail(shotId)).shot.status === 'failed' ? true : undefined), { timeoutMs: 5_000, what: 'the shot to be failed again' });
      // The sweep logs once it has gone through every row, a moment after this row's write.
      await pollUntil(async () => workers.some((w) => w.output().includes('sweep recorded failures whose first write was lost')) || undefined,
        { timeoutMs: 10_000, what: 'the sweep to log what it mended' });
      // The mail's job id is the failed job's: the uploader is told once, not once more by the sweep.
      const mails = (await notify.getJobs(['waiting', 'delayed', 'active', 'completed', 'failed', 'prioritized'])).filter((j) => j.data.eventId === jobId);
      expect(mails.map((j) => j.id)).toEqual([mailJobId]);
    } finally {
      await ingest.close();
      await notify.close();
    }
  }, 60_000);

  it('then a shot left "processing" with nothing pending (its status write lost) is settled by the sweep, and logged as such', async () => {
    const shotId = await newShot(exitRigId);
    expect((await experimenter.upload(shotId, [{ name: 'lost-status.csv', bytes: simulatedCsv({ speed: 300, seed: 79 }).bytes }])).status).toBe(202);
    const done = await settled(shotId, 60_000);
    expect(done.shot.status).not.toBe('processing');
    const logged = () => workers.reduce((n, w) => n + w.output().split('sweep settled shots left processing with nothing pending').length - 1, 0);
    const before = logged();
    await Shot.update({ status: 'processing' }, { where: { id: shotId } });
    await pollUntil(async () => ((await detail(shotId)).shot.status === done.shot.status ? true : undefined), { timeoutMs: 20_000, what: 'the sweep to settle the shot' });
    await pollUntil(async () => (logged() > before ? true : undefined), { timeoutMs: 10_000, what: 'the sweep to log the shot it settled' });
  }, 90_000);
});
