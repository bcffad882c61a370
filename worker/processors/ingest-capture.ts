import { UnrecoverableError, type Job } from 'bullmq';
import type { Transaction } from 'sequelize';
import { ingestJobData } from '../../shared/contracts/jobs.ts';
import { ImportError } from '../../shared/import/import-error.ts';
import { Capture } from '../../server/db/models/index.ts';
import { settleShot } from '../../server/modules/shots/settle-shot.ts';
import { channelFilesSchema } from '../../server/traces/channel-files.ts';
import { missingChannelFiles } from '../../server/traces/check-channel-files.ts';
import { writeChannelFiles } from '../../server/traces/write-channel-files.ts';
import { AppError } from '../../server/lib/errors.ts';
import { assertStorageRoom, estimateChannelFileBytes } from '../../server/modules/storage/service.ts';
import { workerContext } from '../context.ts';
import { readStoredCapture } from '../read-stored-capture.ts';
import { afterCaptureFinished } from '../settle-shot.ts';

/** What the capture's row says once it is read. */
type ReadCapture = Pick<Capture, 'state' | 'progress' | 'layout' | 'channels' | 'sampleCount' | 'timeBase' | 'warnings' | 'error'>;

/**
 * Reads the stored raw file and writes the channel files; returns what was detected, for the row (written with the
 * shot's analysis and status, afterCaptureFinished). A file that cannot be read is recorded as failed here.
 */
async function readAndStore(job: Job, capture: Capture): Promise<ReadCapture> {
  const { blobStore, config } = workerContext();
  await capture.update({ state: 'reading', progress: 10, error: null });
  await settleShot(capture.shotId);
  await job.updateProgress(10);
  let imported;
  try {
    imported = await readStoredCapture(blobStore, capture, { maxChannels: config.maxChannelsPerCapture, maxSamples: config.maxSamplesPerChannel });
    const channelBytes = estimateChannelFileBytes(imported.length, imported.channels.length, imported.time.kind === 'explicit');
    await assertStorageRoom(config, capture.labId, channelBytes, 'Reading this file into channels');
  } catch (err) {
    if (err instanceof ImportError || err instanceof RangeError || err instanceof TypeError || (err instanceof AppError && err.code === 'storage_quota')) {
      // A file that cannot be read stays stored and says why; retrying cannot change its bytes. The files of the
      // shot that were read still get their analysis.
      const message = err.message;
      await afterCaptureFinished(capture.shotId, (transaction) => writeIfCurrent(capture, { state: 'failed', progress: 100, error: message }, transaction));
      throw new UnrecoverableError(message);
    }
    throw err;
  }
  await capture.update({ progress: 60 });
  await job.updateProgress(60);
  const descriptor = await writeChannelFiles(blobStore, capture.labId, capture.id, imported);
  return {
    state: 'ready',
    progress: 100,
    layout: imported.layout,
    channels: descriptor,
    sampleCount: imported.length,
    timeBase: descriptor.time,
    warnings: imported.warnings,
    error: null,
  };
}

/**
 * Writes the row's final state unless a later attempt took the row over while this one read (a re-read with other
 * importer settings): that attempt's job has the last word. True when written.
 */
async function writeIfCurrent(capture: Capture, values: Partial<ReadCapture>, transaction: Transaction): Promise<boolean> {
  const [written] = await Capture.update(values, { where: { id: capture.id, ingestAttempt: capture.ingestAttempt }, transaction });
  return written > 0;
}

/** Whether a capture recorded as read lacks any of its channel files (or has one cut short). */
async function channelFilesIncomplete(capture: Capture): Promise<boolean> {
  const parsed = channelFilesSchema.safeParse(capture.channels);
  if (!parsed.success) return true;
  const { blobStore, logger } = workerContext();
  const missing = await missingChannelFiles(blobStore, parsed.data);
  if (missing.length > 0) logger.warn({ captureId: capture.id, missing: missing.length }, 'channel files missing; writing them again from the stored upload');
  return missing.length > 0;
}

/**
 * Ingest job: read a stored capture file, write its channels and trace pyramids, record what was detected, and
 * once every capture of the shot is read, queue the shot's automatic analysis (worker/settle-shot.ts) and write
 * its status. Runs again safely: a stale attempt is skipped, a capture already read is not read again, files are
 * overwritten with the same bytes, the automatic analysis is keyed by the captures it reads.
 */
export default async function ingestCapture(job: Job): Promise<{ captureId: string; state: string }> {
  const data = ingestJobData.parse(job.data);
  // The context opens the database (and so sets up the models) in this worker thread: before any query.
  workerContext();
  const capture = await Capture.findByPk(data.captureId);
  if (!capture) throw new UnrecoverableError(`capture ${data.captureId} no longer exists`);
  if (capture.ingestAttempt !== data.attempt) return { captureId: capture.id, state: 'superseded' };
  if (capture.removedAt) return { captureId: capture.id, state: 'removed' };

  // Read already: by the API while the upload arrived, or by an earlier run of this job that stopped after it. The
  // API records a deep upload as read before its channel files are written: any it did not finish (it stopped, or
  // the machine lost power before they reached the disk) are written again from the stored upload.
  const read = capture.state !== 'ready' || (await channelFilesIncomplete(capture)) ? await readAndStore(job, capture) : null;

  // The row's new state, the automatic version and the shot's status in one transaction (worker/settle-shot.ts).
  const write = read === null ? undefined : (transaction: Transaction) => writeIfCurrent(capture, read, transaction);
  const { written } = await afterCaptureFinished(capture.shotId, write);
  if (write && !written) return { captureId: capture.id, state: 'superseded' };
  if (read) await job.updateProgress(100);
  return { captureId: capture.id, state: 'ready' };
}
