import type { Job, Queue } from 'bullmq';
import { Op } from 'sequelize';
import { Analysis, Capture, Shot } from '../server/db/models/index.ts';
import { notifyPeople } from '../server/modules/notifications/notify-people.ts';
import { QUEUE_NAMES } from '../shared/contracts/jobs.ts';
import { settleShot } from '../server/modules/shots/settle-shot.ts';
import { afterCaptureFinished } from './settle-shot.ts';

/** True when this failure ends the job: its retries are spent, or it threw an UnrecoverableError. */
export function isFinalFailure(job: Job, err: Error): boolean {
  return err.name === 'UnrecoverableError' || job.attemptsMade >= (job.opts.attempts ?? 1);
}

/**
 * After the last attempt of a job failed, its row says so instead of staying "queued" or "reading" for ever, the
 * shot stops "processing" when nothing of it is left to succeed, and the person concerned is told. Runs from the
 * worker's "failed" event and again from the sweep when that first write was lost (the database was away): every
 * step is idempotent (the row is only written while not finished; the mail's job id is the job's).
 */
export async function recordFinalFailure(queue: string, job: Job, reason: string, notifyQueue: () => Queue): Promise<void> {
  const retried = job.attemptsMade > 1;
  const error = retried ? `${reason} (gave up after ${job.attemptsMade} attempts)` : reason;
  if (queue === QUEUE_NAMES.ingest) {
    // A later attempt (a re-read with other importer settings) owns the row once it exists: this job's end says
    // nothing of it.
    const attempt = { id: job.data.captureId, ingestAttempt: job.data.attempt };
    const of = await Capture.findOne({ where: attempt, attributes: ['shotId'] });
    if (!of) return;
    // The row's failure, the automatic version of the files read beside it and the shot's status in one transaction
    // under the shot's lock (worker/settle-shot.ts).
    const ended: { capture?: Capture | null } = {};
    await afterCaptureFinished(of.shotId, async (transaction) => {
      await Capture.update({ state: 'failed', progress: 100, error }, { where: { ...attempt, state: { [Op.notIn]: ['ready', 'failed'] } }, transaction });
      ended.capture = await Capture.findOne({ where: attempt, attributes: ['id', 'labId', 'shotId', 'uploadedBy', 'state', 'fileName'], transaction });
      return ended.capture?.state === 'failed';
    });
    const { capture } = ended;
    if (capture?.state !== 'failed') return;
    await notifyPeople(notifyQueue(), {
      kind: 'jobFailed', labId: capture.labId, shotId: capture.shotId, eventId: String(job.id),
      recipientIds: [capture.uploadedBy], error: `${capture.fileName}: ${reason}`,
    });
  } else if (queue === QUEUE_NAMES.analysis) {
    await Analysis.update({ state: 'failed', progress: 100, error, completedAt: new Date() }, { where: { id: job.data.analysisId, state: { [Op.notIn]: ['done', 'failed'] } } });
    const analysis = await Analysis.findByPk(job.data.analysisId, { attributes: ['id', 'labId', 'shotId', 'requestedBy', 'state', 'version'] });
    if (analysis?.state !== 'failed') return;
    await settleShot(analysis.shotId);
    // An automatic analysis has no requester: the person who logged the shot hears of it instead.
    const shot = analysis.requestedBy ? null : await Shot.findByPk(analysis.shotId, { attributes: ['createdBy'] });
    await notifyPeople(notifyQueue(), {
      kind: 'jobFailed', labId: analysis.labId, shotId: analysis.shotId, eventId: String(job.id),
      recipientIds: [analysis.requestedBy ?? shot?.createdBy], error: `analysis version ${analysis.version}: ${reason}`,
    });
  }
}
