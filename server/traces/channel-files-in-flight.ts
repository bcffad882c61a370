import { AppError } from '../lib/errors.ts';
import { BlobNotFoundError } from '../storage/blob-store.ts';

/**
 * Channel files this process is still writing for captures already recorded as read. A deep upload's result comes
 * first and its trace files follow (server/modules/shots/uploads.ts); a trace request that comes in between waits
 * here for them instead of finding no file. Another API process has no entry and answers 503 until they are in
 * place (tracesPending); the capture's held ingest job checks them and writes them again if they never arrive.
 */
const writing = new Map<string, Promise<void>>();

/** Records that the files of `captureId` are being written until `done` settles (either way). */
export function channelFilesWriting(captureId: string, done: Promise<unknown>): void {
  const settled: Promise<void> = done.then(() => undefined, () => undefined).finally(() => {
    if (writing.get(captureId) === settled) writing.delete(captureId);
  });
  writing.set(captureId, settled);
}

/** Resolves once this process is not writing the files of `captureId` (at once when it is not). */
export function channelFilesWritten(captureId: string): Promise<void> {
  return writing.get(captureId) ?? Promise.resolve();
}

/**
 * The answer when a capture recorded as read has no trace file yet: another process is still writing it, or the
 * worker is writing it again. A short wait, not a fault (503: the client asks again).
 */
export function tracesPending(): AppError {
  return new AppError(503, 'traces_pending', 'The trace files of this capture are still being written; try again in a moment.');
}

/** Rethrows `err`, as tracesPending() when a trace file was missing: for `.catch()` on reads of a capture's files. */
export function missingAsPending(err: unknown): never {
  throw err instanceof BlobNotFoundError ? tracesPending() : err;
}
