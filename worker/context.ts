import { isMainThread } from 'node:worker_threads';
import type { Sequelize } from 'sequelize';
import { loadConfig, type Config } from '../server/config.ts';
import { createSequelize } from '../server/db/sequelize.ts';
import { createJobQueues, type JobQueues } from '../server/lib/job-queues.ts';
import { createLogger, type Logger } from '../server/lib/logger.ts';
import { createBlobStore } from '../server/storage/create-blob-store.ts';
import type { BlobStore } from '../server/storage/blob-store.ts';

/** What a processor needs. Sandboxed processors run in their own thread, so each thread builds its own. */
export interface WorkerContext {
  config: Config;
  logger: Logger;
  sequelize: Sequelize;
  blobStore: BlobStore;
  queues: JobQueues;
}

let context: WorkerContext | undefined;

/**
 * The database pool of a processor thread: it runs one job at a time, which holds one connection (two while it
 * settles the shot beside an open transaction), so three are enough; one stays open while the thread waits, so a
 * job after a quiet spell neither opens a connection nor meets a PostgreSQL backend with cold catalogue caches
 * (bench:pipeline, issue 13). The worker's main thread (the sweep) keeps the default pool.
 */
export const PROCESSOR_THREAD_POOL = { max: 3, min: 1 };

export function workerContext(): WorkerContext {
  if (!context) {
    const config = loadConfig();
    context = {
      config,
      logger: createLogger(config.logLevel, 'worker'),
      sequelize: createSequelize(config.databaseUrl, undefined, isMainThread ? undefined : PROCESSOR_THREAD_POOL),
      blobStore: createBlobStore(config),
      queues: createJobQueues(config.redisUrl),
    };
  }
  return context;
}

export async function closeWorkerContext(): Promise<void> {
  if (!context) return;
  const c = context;
  context = undefined;
  await Promise.allSettled([c.sequelize.close(), c.queues.close()]);
}
