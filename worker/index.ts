import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker, type Job, type Queue } from 'bullmq';
import { Op } from 'sequelize';
import { loadConfig, loadConfigOrExit, type Config } from '../server/config.ts';
import { Analysis, Capture, Shot } from '../server/db/models/index.ts';
import { createNotifyQueue, notifyPeople } from '../server/modules/notifications/notify-people.ts';
import { QUEUE_NAMES } from '../shared/contracts/jobs.ts';
import { closeWorkerContext, workerContext } from './context.ts';
import { redisConnection } from './queues.ts';

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

/** After the last retry of a transient fault, the row says so instead of staying "queued" for ever. */
async function recordFinalFailure(queue: string, job: Job | undefined, err: Error) {
  if (!job) return;
  const attempts = job.opts.attempts ?? 1;
  const unrecoverable = err.name === 'UnrecoverableError';
  if (!unrecoverable && job.attemptsMade < attempts) return;
  const message = `${err.message} (gave up after ${job.attemptsMade} attempt${job.attemptsMade === 1 ? '' : 's'})`;
  if (queue === QUEUE_NAMES.ingest) {
    await Capture.update({ state: 'failed', progress: 100, error: unrecoverable ? err.message : message }, { where: { id: job.data.captureId, state: { [Op.ne]: 'ready' } } });
    const capture = await Capture.findByPk(job.data.captureId, { attributes: ['id', 'labId', 'shotId', 'uploadedBy', 'state', 'fileName'] });
    if (capture?.state === 'failed') {
      await notifyPeople(notifyQueue(), {
        kind: 'jobFailed', labId: capture.labId, shotId: capture.shotId, eventId: String(job.id),
        recipientIds: [capture.uploadedBy], error: `${capture.fileName}: ${err.message}`,
      });
    }
  } else if (queue === QUEUE_NAMES.analysis) {
    await Analysis.update({ state: 'failed', progress: 100, error: unrecoverable ? err.message : message, completedAt: new Date() }, { where: { id: job.data.analysisId, state: { [Op.ne]: 'done' } } });
    const analysis = await Analysis.findByPk(job.data.analysisId, { attributes: ['id', 'labId', 'shotId', 'requestedBy', 'state', 'version'] });
    if (analysis?.state === 'failed') {
      // An automatic analysis has no requester: the person who logged the shot hears of it instead.
      const shot = analysis.requestedBy ? null : await Shot.findByPk(analysis.shotId, { attributes: ['createdBy'] });
      await notifyPeople(notifyQueue(), {
        kind: 'jobFailed', labId: analysis.labId, shotId: analysis.shotId, eventId: String(job.id),
        recipientIds: [analysis.requestedBy ?? shot?.createdBy], error: `analysis version ${analysis.version}: ${err.message}`,
      });
    }
  }
}

let notifyQueueInstance: Queue | undefined;
function notifyQueue(): Queue {
  notifyQueueInstance ??= createNotifyQueue(redisConnection(loadConfig().redisUrl));
  return notifyQueueInstance;
}

/**
 * Re-queues work whose job never reached Redis (the API saved the row, then Redis was away). Job ids are
 * deterministic, so a job that does exist is not added twice.
 */
async function sweep(config: Config) {
  const { queues, logger } = workerContext();
  const before = new Date(Date.now() - Math.min(10_000, config.sweepIntervalMs));
  const captures = await Capture.findAll({ where: { state: 'queued', updatedAt: { [Op.lt]: before } }, attributes: ['id', 'ingestAttempt'], limit: 500 });
  for (const c of captures) await queues.addIngest({ captureId: c.id, attempt: c.ingestAttempt });
  const analyses = await Analysis.findAll({ where: { state: 'queued', createdAt: { [Op.lt]: before } }, attributes: ['id'], limit: 500 });
  for (const a of analyses) await queues.addAnalysis({ analysisId: a.id });
  if (captures.length + analyses.length > 0) logger.info({ captures: captures.length, analyses: analyses.length }, 'sweep re-queued work');
}

async function main() {
  const config = loadConfigOrExit();
  const { logger, sequelize } = workerContext();
  await sequelize.authenticate();
  const workers = Object.entries(processorFiles).map(([queue, file]) => {
    const worker = new Worker(queue, file, {
      connection: redisConnection(config.redisUrl),
      useWorkerThreads: true,
      concurrency: 2,
      lockDuration: config.jobLockMs,
      stalledInterval: config.jobLockMs,
      maxStalledCount: 2,
    });
    worker.on('failed', (job, err) => {
      logger.warn({ queue, job: job?.id, attempt: job?.attemptsMade, err: err.message }, 'job failed');
      recordFinalFailure(queue, job, err).catch((e: Error) => logger.error({ err: e.message }, 'could not record the failure'));
    });
    worker.on('completed', (job) => logger.info({ queue, job: job.id }, 'job done'));
    worker.on('error', (err) => logger.error({ queue, err: err.message }, 'worker error'));
    return worker;
  });
  await Promise.all(workers.map((w) => w.waitUntilReady()));
  logger.info({ queues: Object.keys(processorFiles) }, 'Gatepost worker ready');

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
    await Promise.allSettled(workers.map((w) => w.close()));
    await notifyQueueInstance?.close().catch(() => {});
    await closeWorkerContext();
    process.exit(0);
  };
  process.on('SIGINT', () => void shutdown('SIGINT'));
  process.on('SIGTERM', () => void shutdown('SIGTERM'));
}

void main();
