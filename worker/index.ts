import { UnrecoverableError, Worker, type Job } from 'bullmq';
import { loadConfig, ConfigError } from '../server/config.ts';
import { createLogger } from '../server/lib/logger.ts';
import { QUEUES, redisConnection } from './queues.ts';

/**
 * The job worker process: one BullMQ Worker per queue, each dispatching by job name to a processor in
 * worker/processors/. Runs apart from the API so heavy imports and analyses never slow requests; several
 * workers on several machines may share one Redis and one PostgreSQL.
 */
type Processor = (job: Job) => Promise<unknown>;

/** Processors by queue and job name. The ingest and analysis processors arrive with issue 5. */
const processors: Record<string, Record<string, Processor>> = {
  [QUEUES.ingest]: {},
  [QUEUES.analysis]: {},
};

async function main() {
  let config;
  try {
    config = loadConfig();
  } catch (err) {
    if (err instanceof ConfigError) {
      console.error(err.message);
      process.exit(2);
    }
    throw err;
  }
  const logger = createLogger(config.logLevel, 'worker');
  const workers = Object.entries(processors).map(([queue, byName]) => {
    const worker = new Worker(
      queue,
      async (job) => {
        const processor = byName[job.name];
        if (!processor) throw new UnrecoverableError(`No processor for job "${job.name}" on queue ${queue}`);
        return processor(job);
      },
      { connection: redisConnection(config.redisUrl), concurrency: 2 },
    );
    worker.on('failed', (job, err) => logger.warn({ queue, job: job?.id, name: job?.name, err: err.message }, 'job failed'));
    worker.on('error', (err) => logger.error({ queue, err: err.message }, 'worker error'));
    return worker;
  });
  await Promise.all(workers.map((w) => w.waitUntilReady()));
  logger.info({ queues: Object.keys(processors) }, 'Gatepost worker ready');

  let stopping = false;
  const shutdown = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'worker shutting down: finishing running jobs');
    const force = setTimeout(() => process.exit(1), 30_000);
    force.unref();
    await Promise.allSettled(workers.map((w) => w.close()));
    process.exit(0);
  };
  process.on('SIGINT', () => void shutdown('SIGINT'));
  process.on('SIGTERM', () => void shutdown('SIGTERM'));
}

void main();
