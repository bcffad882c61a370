import type { Sequelize, Transaction } from 'sequelize';
import { Shot } from '../../db/models/index.ts';
import type { JobQueues } from '../../lib/job-queues.ts';
import type { Logger } from '../../lib/logger.ts';
import { automaticVersionIn, type PrecomputedVersion } from '../analyses/service.ts';
import { auditWithdrawnReview } from '../analyses/finish-version.ts';
import { settleShot } from './settle-shot.ts';

export interface EndCaptureReadOptions {
  /**
   * Writes the capture's final state (read, failed, or back in the queue) in the transaction and says whether it
   * did; when it did not (a condition on the row failed), nothing else happens. @default nothing to write
   */
  write?: (transaction: Transaction) => Promise<boolean>;
  /** Numbers already worked out for the automatic version (uploads.ts), stored on it when they fit. @default none */
  precomputed?: PrecomputedVersion;
  /**
   * Make the automatic version only when the shot has no current version (a file removed: the numbers shown stand
   * when they did not read it). @default false
   */
  onlyWithoutCurrent?: boolean;
}

/**
 * Ends a capture's read and does what follows, in one transaction under the shot's row lock: the capture's final
 * state (`write`), the check for files still pending, the automatic version once none is (automaticVersionIn), and
 * the shot's status (settleShot). The version's job is queued after the commit (none when the numbers the API
 * worked out were stored on the version: see automaticVersionIn).
 *
 * Why one transaction: two files of a shot ending together are then taken one after the other, and no reader sees
 * a state between two of these steps. Done as separate steps, the job of the file that ended first could see the
 * other still being read, then settle the shot after the other file's read was recorded but before its job made
 * the version: the shot read "failed" (a read file, no version) until the version appeared. Every path that ends a
 * read goes through here: the worker's ingest job, the API's read of an upload as it arrives, a job's last failed
 * attempt, the removal of a file the current version does not read (one still being read may be all the others
 * waited for), and the worker's sweep (with nothing to write: it only makes the missing version and status).
 *
 * Returns the shot as settled (null when it is gone), whether `write` wrote, the version made (if any) and whether
 * the shot's status changed from the one read under the lock.
 *
 * Lock order: the shot's row, then the capture's (settleShot and createAnalysisVersion lock the shot first too).
 * No existing version row is locked here, so the analysis job (its version, then the shot) cannot close a cycle.
 */
export async function endCaptureRead(
  ctx: { sequelize: Sequelize; queues: JobQueues; logger: Logger },
  shotId: string,
  options: EndCaptureReadOptions = {},
): Promise<{ shot: Shot | null; written: boolean; versionMadeId: string | null; statusChanged: boolean }> {
  const { write, precomputed, onlyWithoutCurrent = false } = options;
  const ended = await ctx.sequelize.transaction(async (transaction) => {
    const shot = await Shot.findByPk(shotId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!shot) return { shot: null, written: false, created: false, analysisId: null, job: null, withdrawn: null, statusChanged: false };
    if (write && !(await write(transaction))) return { shot, written: false, created: false, analysisId: null, job: null, withdrawn: null, statusChanged: false };
    const { created, analysisId, job, withdrawn } = onlyWithoutCurrent && shot.currentAnalysisId
      ? { created: false, analysisId: null, job: null, withdrawn: null }
      : await automaticVersionIn(shot, transaction, precomputed);
    const settled = await settleShot(shotId, transaction);
    return { shot: settled, written: write !== undefined, created, analysisId, job, withdrawn, statusChanged: settled !== null && settled.status !== shot.status };
  });
  if (ended.job) await ctx.queues.addAnalysisOrDefer(ended.job, ctx.logger);
  if (ended.withdrawn) await auditWithdrawnReview(ended.withdrawn);
  return {
    shot: ended.shot, written: ended.written, versionMadeId: ended.created ? ended.analysisId : null, statusChanged: ended.statusChanged,
  };
}
