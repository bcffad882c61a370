import { availableParallelism } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker, type Queue } from 'bullmq';
import { Redis } from 'ioredis';
import { Op } from 'sequelize';
import { loadConfig, loadConfigOrExit, type Config } from '../server/config.ts';
import { Analysis, Capture, Shot } from '../server/db/models/index.ts';
import { closeLabEventPublisher } from '../server/lib/lab-events.ts';
import { createNotifyQueue } from '../server/modules/notifications/notify-people.ts';
import { QUEUE_NAMES } from '../shared/contracts/jobs.ts';
import { closeWorkerContext, workerContext } from './context.ts';
import { isFinalFailure, recordFinalFailure } from './final-failure.ts';
import { concurrencyShare, joinHost, type HostShare } from './host-share.ts';
import { redisConnection } from './queues.ts';
import { afterCaptureFinished } from './settle-shot.ts';

/**
 * The job worker process: one BullMQ Worker per queue. The processors are sandboxed in worker threads
 * (worker/processors/*.ts), so a long import or analysis never blocks this thread's lock renewals. Several worker
 * processes, on one machine or many, may share one Redis and one PostgreSQL: each job runs once.
 */
const here = path.dirname(fileURLToPath(import.meta.url));
const processorFiles = {
  [QUEUE_NAMES.ingest]: path.join(here, 'processors/ingest-capture.boot.mjs'),
  [QUEUE_NAMES.analysis]: path.join(here, 'processors/analyse-shot.boot.mjs'),
  [QUEUE_NAMES.notify]: path.join(here, 'processors/notify.boot.mjs'),
};

let notifyQueueInstance: Queue | undefined;
function notifyQueue(): Queue {
  notifyQueueInstance ??= createNotifyQueue(redisConnection(loadConfig().redisUrl));
  return notifyQueueInstance;
}

/**
 * Mends what a fault between the API, Redis and PostgreSQL can leave behind. Work whose job never reached Redis
 * (the API saved the row, then Redis was away) is queued again; job ids are deterministic, so a job that does exist
 * is not added twice. Work whose job has failed for good while its row still says "queued", "reading" or "running"
 * (the final write was lost: the database was away when the job gave up) gets that write now.
 */
async function sweep(config: Config) {
  const { queues, logger } = workerContext();
  const before = new Date(Date.now() - Math.min(10_000, config.sweepIntervalMs));
  let requeued = 0;
  let mended = 0;
  const captures = await Capture.findAll({
    where: { state: { [Op.in]: ['queued', 'reading'] }, updatedAt: { [Op.lt]: before } }, attributes: ['id', 'state', 'ingestAttempt'], limit: 500,
  });
  for (const c of captures) {
    const data = { captureId: c.id, attempt: c.ingestAttempt };
    const failed = await queues.failedIngest(data);
    if (failed) {
      await recordFinalFailure(QUEUE_NAMES.ingest, failed, failed.failedReason, notifyQueue);
      mended += 1;
    } else if (c.state === 'queued') {
      await queues.addIngest(data);
      requeued += 1;
    }
  }
  const analyses = await Analysis.findAll({
    where: { state: { [Op.in]: ['queued', 'running'] }, createdAt: { [Op.lt]: before } }, attributes: ['id', 'state'], limit: 500,
  });
  for (const a of analyses) {
    const failed = await queues.failedAnalysis({ analysisId: a.id });
    if (failed) {
      await recordFinalFailure(QUEUE_NAMES.analysis, failed, failed.failedReason, notifyQueue);
      mended += 1;
    } else if (a.state === 'queued') {
      await queues.addAnalysis({ analysisId: a.id });
      requeued += 1;
    }
  }
  // A shot left "processing" by a write lost between two steps (a crash after a file was read, before its analysis
  // was made) gets the missing step and its status again; settling is idempotent.
  // Counted only when this call changed the status (read under the shot's lock): one with work still pending stays
  // "processing", and one its own job settled meanwhile was already changed when the lock was taken.
  let settled = 0;
  const stuck = await Shot.findAll({ where: { status: 'processing', updatedAt: { [Op.lt]: before } }, attributes: ['id'], limit: 500 });
  for (const s of stuck) {
    if ((await afterCaptureFinished(s.id)).statusChanged) settled += 1;
  }
  if (requeued > 0) logger.info({ requeued }, 'sweep re-queued work');
  if (mended > 0) logger.info({ mended }, 'sweep recorded failures whose first write was lost');
  if (settled > 0) logger.info({ settled }, 'sweep settled shots left processing with nothing pending');
}

/**
 * Starts one processor thread of a queue before its first job and leaves it idle in BullMQ's pool, so the first job
 * after a start does not wait for a thread to boot and load its modules (BullMQ starts them on demand). The pool is
 * not public API in BullMQ 6.7.0 (pinned): without it, nothing is started ahead and threads start on demand.
 */
async function prewarm(worker: Worker, file: string): Promise<void> {
  const pool = (worker as unknown as { childPool?: { retain(file: string): Promise<unknown>; release(child: unknown): void } }).childPool;
  if (!pool || typeof pool.retain !== 'function' || typeof pool.release !== 'function') return;
  pool.release(await pool.retain(file));
}

/** Queues whose jobs read and analyse captures (a core each while they run); notify only waits on the mail server. */
const READING_QUEUES: string[] = [QUEUE_NAMES.ingest, QUEUE_NAMES.analysis];
const NOTIFY_CONCURRENCY = 2;

async function main() {
  const config = loadConfigOrExit();
  const { logger, sequelize } = workerContext();
  await sequelize.authenticate();
  const workers: Worker[] = [];
  const applyShare = (share: number) => {
    for (const w of workers) if (READING_QUEUES.includes(w.name)) w.concurrency = share;
  };
  // The jobs each reading queue runs at once: fixed by GATEPOST_WORKER_CONCURRENCY, else this process's share of the
  // host's cores among the worker processes registered there (worker/host-share.ts), followed as they come and go.
  let hostShare: HostShare | null = null;
  let hostRedis: Redis | null = null;
  let share = config.workerConcurrency ?? concurrencyShare(config.workerCores ?? availableParallelism(), 1, 0);
  if (config.workerConcurrency === undefined) {
    hostRedis = new Redis({ ...redisConnection(config.redisUrl), maxRetriesPerRequest: 1 });
    hostRedis.on('error', () => {});
    hostShare = await joinHost({
      redis: hostRedis,
      host: config.workerHost,
      cores: config.workerCores,
      onShare(next, seen) {
        share = next;
        applyShare(next);
        logger.info({ concurrency: next, ...seen }, 'jobs per reading queue set from the worker processes of this host');
      },
      onError: (err) => logger.warn({ err: err.message }, 'worker heartbeat did not reach Redis; concurrency unchanged'),
    });
  }
  for (const [queue, file] of Object.entries(processorFiles)) {
    const worker = new Worker(queue, file, {
      connection: redisConnection(config.redisUrl),
      useWorkerThreads: true,
      concurrency: READING_QUEUES.includes(queue) ? share : NOTIFY_CONCURRENCY,
      lockDuration: config.jobLockMs,
      stalledInterval: config.jobLockMs,
      maxStalledCount: 2,
    });
    worker.on('failed', (job, err) => {
      logger.warn({ queue, job: job?.id, attempt: job?.attemptsMade, err: err.message }, 'job failed');
      if (!job || !isFinalFailure(job, err)) return;
      // If this write is lost (the database is away), the sweep makes it later from the job's own record.
      recordFinalFailure(queue, job, err.message, notifyQueue).catch((e: Error) => logger.error({ err: e.message }, 'could not record the failure; the sweep will'));
    });
    worker.on('completed', (job) => logger.info({ queue, job: job.id }, 'job done'));
    worker.on('error', (err) => logger.error({ queue, err: err.message }, 'worker error'));
    workers.push(worker);
  }
  await Promise.all(workers.map((w) => w.waitUntilReady()));
  // Not awaited: jobs may start meanwhile (a busy pool just starts a thread of its own, as without this).
  for (const [k, [queue, file]] of Object.entries(processorFiles).entries()) {
    if (queue !== QUEUE_NAMES.notify) void prewarm(workers[k], file).catch((err: Error) => logger.warn({ queue, err: err.message }, 'could not start a processor thread ahead'));
  }
  logger.info({ queues: Object.keys(processorFiles), concurrency: share }, 'Gatepost worker ready');

  const sweeper = setInterval(() => {
    sweep(config).catch((err: Error) => logger.warn({ err: err.message }, 'sweep failed; will try again'));
  }, config.sweepIntervalMs);
  void sweep(config).catch(() => {});

  let stopping = false;
  const shutdown = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    clearInterval(sweeper);
    logger.info({ signal }, 'worker shutting down: finishing running jobs');
    const force = setTimeout(() => process.exit(1), 30_000);
    force.unref();
    await hostShare?.stop();
    await Promise.allSettled(workers.map((w) => w.close()));
    hostRedis?.disconnect();
    await notifyQueueInstance?.close().catch(() => {});
    await closeWorkerContext();
    await closeLabEventPublisher();
    process.exit(0);
  };
  process.on('SIGINT', () => void shutdown('SIGINT'));
  process.on('SIGTERM', () => void shutdown('SIGTERM'));
}

void main();
