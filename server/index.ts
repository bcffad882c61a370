import { setFlagsFromString } from 'node:v8';
import { loadConfigOrExit } from './config.ts';
import { buildApp } from './app.ts';
import { createLogger } from './lib/logger.ts';
import { createMailer } from './lib/mailer.ts';
import { createLoginLimiter } from './lib/rate-limit.ts';
import { createRedis } from './lib/redis.ts';
import { createJobQueues } from './lib/job-queues.ts';
import { labEventHubFor } from './modules/events/lab-event-hub.ts';
import { createSequelize } from './db/sequelize.ts';
import { createBlobStore } from './storage/create-blob-store.ts';
import { warmUploadPath } from './modules/shots/warm-upload.ts';
import { prestartUploadReader } from './modules/shots/upload-reader.ts';

/**
 * After a full collection V8 sets the heap's next limit at its live size times a factor it picks from how fast it
 * collects; for the API during a deep upload that was about 1.2 (41 MB live, limit 50 MB, seen with
 * --trace-incremental-marking). With the young generation grown large by the upload's stream of socket chunks, the
 * room left was less than one scavenge could promote, so V8 started marking again at once: on the 330 MB deep capture
 * the API ran ~16 full collections one after another during the upload, their marking on V8's helper threads.
 * A fixed factor of 2 leaves that room (the API's heap is ~40 MB: this costs ~40 MB at most). Measured 3 December
 * 2026 with `npm start`, four starts alternating with and without it, three uploads of the file as the request body
 * in each: processor time of the API during the upload 3.03–3.68 s against 4.21–5.06 s (medians 3.29 and 3.28
 * against 4.87 and 4.61); with V8's --trace-gc, 3 full collections in three uploads against ~16 in one.
 * The flag is read at each collection, so setting it here (rather than on the command line) applies to every way
 * the API is started, and to its reading threads (V8's flags are the process's).
 */
setFlagsFromString('--heap-growing-percent=100');

/** The API server process: reads config, connects, listens, and shuts down cleanly on SIGINT/SIGTERM. */
async function main() {
  const config = loadConfigOrExit();
  const logger = createLogger(config.logLevel, 'api');
  // Two connections stay open while the server is idle: the first request after a quiet spell (a person's upload)
  // neither opens one nor meets a PostgreSQL backend with cold caches (issue 13, bench:pipeline's first shot).
  const sequelize = createSequelize(config.databaseUrl, undefined, { max: 10, min: 2 });
  const redis = createRedis(config.redisUrl);
  redis.on('error', (err) => logger.warn({ err: err.message }, 'redis connection problem'));
  const mailer = createMailer(config);
  const loginLimiter = createLoginLimiter(redis, config);
  const blobStore = createBlobStore(config);
  const queues = createJobQueues(config.redisUrl);
  const app = buildApp({ config, logger, sequelize, redis, mailer, loginLimiter, queues, blobStore });

  const server = app.listen(config.port, config.host, () => {
    logger.info({ url: config.publicUrl, port: config.port }, 'Gatepost API listening');
    // Not awaited: requests are served meanwhile (the first upload after a start then pays for what is not ready).
    void warmUploadPath(config, queues)
      .catch((err: Error) => logger.debug({ err: err.message }, 'upload path not readied ahead'))
      // Then the thread that reads the next large upload while it arrives, started and warmed up ahead of it.
      .finally(() => { if (config.readUploadsFromBytes >= 0) prestartUploadReader(); });
  });
  server.on('error', (err) => {
    logger.fatal({ err }, 'cannot listen');
    process.exit(1);
  });

  let stopping = false;
  const shutdown = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'shutting down');
    const force = setTimeout(() => process.exit(1), 10_000);
    force.unref();
    server.closeIdleConnections();
    await labEventHubFor(redis, logger).close();
    await new Promise<void>((resolve) => server.close(() => resolve()));
    mailer.close();
    await Promise.allSettled([sequelize.close(), redis.quit(), queues.close()]);
    process.exit(0);
  };
  process.on('SIGINT', () => void shutdown('SIGINT'));
  process.on('SIGTERM', () => void shutdown('SIGTERM'));
  process.on('unhandledRejection', (reason) => logger.error({ err: reason }, 'unhandled rejection'));
  process.on('uncaughtException', (err) => {
    logger.fatal({ err }, 'uncaught exception');
    process.exit(1);
  });
}

void main();
