import type { Redis } from 'ioredis';
import type { Sequelize } from 'sequelize';
import type { Config } from '../config.ts';
import type { BlobStore } from '../storage/blob-store.ts';
import type { JobQueues } from './job-queues.ts';
import type { Logger } from './logger.ts';
import type { Mailer } from './mailer.ts';
import type { LoginLimiter } from './rate-limit.ts';

/** What route modules need from the outside world; built once in server/index.ts (or by a test). */
export interface Deps {
  config: Config;
  logger: Logger;
  sequelize: Sequelize;
  redis: Redis;
  mailer: Mailer;
  loginLimiter: LoginLimiter;
  /** Raw uploaded files and channel files (local disk or S3). */
  blobStore: BlobStore;
  /** BullMQ queues for ingest and analysis jobs. */
  queues: JobQueues;
}
