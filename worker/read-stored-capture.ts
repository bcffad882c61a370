import type { Readable } from 'node:stream';
import type { ImportedCapture } from '../shared/contracts/capture.ts';
import type { Capture } from '../server/db/models/index.ts';
import type { BlobStore } from '../server/storage/blob-store.ts';
import { isRepeatedTime } from '../shared/import/import-error.ts';
import { readCaptureFile } from './import/read-capture-file.ts';
import { readCaptureStream } from './import/read-capture-stream.ts';

/**
 * Imports a stored raw file with the capture's importer overrides: in place on local disk (the fast path can
 * split it across threads), streamed from object storage otherwise.
 */
export async function readStoredCapture(store: BlobStore, capture: Capture): Promise<ImportedCapture> {
  const options = (capture.importOptions ?? {}) as Record<string, unknown>;
  const local = store.localPathOf?.(capture.storageKey);
  if (local) return readCaptureFile(local, options);
  const read = async (extra: Record<string, unknown>) => {
    const stream: Readable = store.openRead(capture.storageKey);
    try {
      return await readCaptureStream(stream, { ...options, ...extra, sizeHint: Number(capture.sizeBytes) });
    } finally {
      stream.destroy();
    }
  };
  try {
    return await read({});
  } catch (error) {
    // Times printed too coarsely that start repeating past the head: read again, rebuilding from the interval.
    if (!isRepeatedTime(error) || options.coarseTime === true) throw error;
    return read({ coarseTime: true });
  }
}
