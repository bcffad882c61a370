import { Queue, type Job } from 'bullmq';
import type { Logger } from './logger.ts';
import { redisEndpoint } from './redis.ts';
import {
  analysisJobId, ingestJobId, JOB_NAMES, QUEUE_NAMES, type AnalysisJobData, type IngestJobData,
} from '../../shared/contracts/jobs.ts';

/** Retry transient faults (database or Redis briefly away) with exponential backoff: 2 s, 4 s, 8 s, 16 s, 32 s. */
const defaultJobOptions = {
  attempts: 6,
  backoff: { type: 'exponential', delay: 2_000 },
  removeOnComplete: { age: 7 * 24 * 3600, count: 10_000 },
  removeOnFail: { age: 30 * 24 * 3600 },
} as const;

export interface JobQueues {
  addIngest(data: IngestJobData): Promise<void>;
  addAnalysis(data: AnalysisJobData): Promise<void>;
  /**
   * Queue now if Redis answers, else leave it to the worker's sweep: the capture or analysis row already records
   * the work, so a failed add is logged, never thrown at the person who asked.
   */
  addIngestOrDefer(data: IngestJobData, logger: Logger): Promise<void>;
  /**
   * Queues the ingest held back for `holdMs` (a safety net while the API reads the upload itself); true when queued.
   * releaseIngest lets it run now; if the API goes away first, it runs when the hold ends.
   */
  addIngestHeld(data: IngestJobData, holdMs: number): Promise<boolean>;
  releaseIngest(data: IngestJobData): Promise<void>;
  addAnalysisOrDefer(data: AnalysisJobData, logger: Logger): Promise<void>;
  /**
   * The job of this work if BullMQ holds it as failed for good (its retries spent, or unrecoverable), else null.
   * The worker's sweep uses it for rows whose final "failed" write was lost.
   */
  failedIngest(data: IngestJobData): Promise<Job | null>;
  failedAnalysis(data: AnalysisJobData): Promise<Job | null>;
  close(): Promise<void>;
}

function connectionOf(url: string) {
  return {
    ...redisEndpoint(url),
    // Fail fast in the API: a request must not hang while Redis is away (the worker's sweep queues it later).
    maxRetriesPerRequest: 1,
    enableOfflineQueue: false,
  };
}

/** The API's and the worker's handle on the job queues; job ids are deterministic, so adding twice adds once. */
export function createJobQueues(redisUrl: string): JobQueues {
  const ingest = new Queue(QUEUE_NAMES.ingest, { connection: connectionOf(redisUrl), defaultJobOptions });
  const analysis = new Queue(QUEUE_NAMES.analysis, { connection: connectionOf(redisUrl), defaultJobOptions });
  // Errors surface on the add() calls; without a listener ioredis would log each reconnect attempt as unhandled.
  ingest.on('error', () => {});
  analysis.on('error', () => {});
  const addIngest = async (data: IngestJobData) => {
    await ingest.add(JOB_NAMES.ingest, data, { jobId: ingestJobId(data) });
  };
  const addAnalysis = async (data: AnalysisJobData) => {
    await analysis.add(JOB_NAMES.analysis, data, { jobId: analysisJobId(data) });
  };
  const orDefer = <T extends object>(add: (d: T) => Promise<void>, what: string) => async (data: T, logger: Logger) => {
    try {
      await add(data);
    } catch (err) {
      // The ids only: an analysis job may carry a version's worked-out numbers, which do not belong in a log line.
      const ids = Object.fromEntries(Object.entries(data).filter(([, v]) => typeof v !== 'object'));
      const fields: Record<string, unknown> = { err: (err as Error).message, ...ids };
      logger.warn(fields, `${what} job not queued now; the worker sweep will queue it`);
    }
  };
  // finishedOn and failedReason are written in one step when a job ends, so one read of the job tells both.
  const failedFor = async (queue: Queue, jobId: string) => {
    const job = await queue.getJob(jobId);
    return job?.finishedOn && job.failedReason ? job : null;
  };
  return {
    addIngest,
    addAnalysis,
    failedIngest: (data) => failedFor(ingest, ingestJobId(data)),
    failedAnalysis: (data) => failedFor(analysis, analysisJobId(data)),
    addIngestOrDefer: orDefer(addIngest, 'ingest'),
    async addIngestHeld(data, holdMs) {
      try {
        await ingest.add(JOB_NAMES.ingest, data, { jobId: ingestJobId(data), delay: holdMs });
        return true;
      } catch {
        return false;
      }
    },
    async releaseIngest(data) {
      const job = await ingest.getJob(ingestJobId(data));
      // A job whose hold ran out meanwhile is already waiting or running: nothing to promote.
      if (job && (await job.isDelayed())) await job.promote().catch(() => {});
    },
    addAnalysisOrDefer: orDefer(addAnalysis, 'analysis'),
    async close() {
      await Promise.allSettled([ingest.close(), analysis.close()]);
    },
  };
}
