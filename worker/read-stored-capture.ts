import type { Readable } from 'node:stream';
import type { ImportedCapture } from '../shared/contracts/capture.ts';
import type { Capture } from '../server/db/models/index.ts';
import type { BlobStore } from '../server/storage/blob-store.ts';
import { isRepeatedTime } from '../shared/import/import-error.ts';
import { readCaptureFile } from './import/read-capture-file.ts';
import { readCaptureStream } from './import/read-capture-stream.ts';
import { checkChannelCount, checkSampleCount, type CaptureLimits } from './import/capture-limits.ts';

/**
 * Imports a stored raw file with the capture's importer overrides: in place on local disk (the fast path can
 * split it across threads), streamed from object storage otherwise.
 */
export async function readStoredCapture(store: BlobStore, capture: Capture, limits: CaptureLimits = {}): Promise<ImportedCapture> {
  // The installation's limits win over anything stored with the capture.
  const options: Record<string, unknown> = { ...((capture.importOptions ?? {}) as Record<string, unknown>), ...limits };
  const local = store.localPathOf?.(capture.storageKey);
  const read = async (extra: Record<string, unknown>) => {
    const stream: Readable = store.openRead(capture.storageKey);
    try {
      return await readCaptureStream(stream, { ...options, ...extra, sizeHint: Number(capture.sizeBytes) });
    } finally {
      stream.destroy();
    }
  };
  let imported: ImportedCapture;
  if (local) {
    imported = await readCaptureFile(local, options);
  } else {
    try {
      imported = await read({});
    } catch (error) {
      // Times printed too coarsely that start repeating past the head: read again, rebuilding from the interval.
      if (!isRepeatedTime(error) || options.coarseTime === true) throw error;
      imported = await read({ coarseTime: true });
    }
  }
  // The readers check as they go; the general text path (quoted fields, UTF-16) only knows at the end.
  checkChannelCount(imported.channels.length, limits);
  checkSampleCount(imported.length, limits);
  return imported;
}
