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

export function workerContext(): WorkerContext {
  if (!context) {
    const config = loadConfig();
    context = {
      config,
      logger: createLogger(config.logLevel, 'worker'),
      sequelize: createSequelize(config.databaseUrl),
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
