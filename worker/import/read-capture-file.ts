import { createReadStream } from 'node:fs';
import { stat } from 'node:fs/promises';
import type { ImportedCapture } from '../../shared/contracts/capture.ts';
import { ImportError } from '../../shared/import/import-error.ts';
import { readCaptureStream, type ReadCaptureStreamOptions } from './read-capture-stream.ts';

export interface ReadCaptureFileOptions extends ReadCaptureStreamOptions {
  /** Threads for the scan of a large plain file. @default 2 when the data exceeds `parallelFromBytes` and 2+ cores exist, else 1 */
  threads?: number;
  /** Smallest data size worth a second thread (a worker takes ~0.3 s to start under tsx). @default 64 MiB */
  parallelFromBytes?: number;
}

/**
 * Reads a scope export from disk into an ImportedCapture: the layout from the file's head, then the plain numeric
 * body with the byte scanner straight into typed arrays. Throws ImportError with an actionable message (and the
 * line) for a file it cannot read, including one that cannot be opened.
 */
export async function readCaptureFile(path: string, options: ReadCaptureFileOptions = {}): Promise<ImportedCapture> {
  if (typeof path !== 'string' || path === '') throw new TypeError('path must be a non-empty string');
  let size: number;
  try {
    const s = await stat(path);
    if (s.isDirectory()) throw new ImportError(`${path} is a folder, not a file`);
    size = s.size;
  } catch (error) {
    if (error instanceof ImportError) throw error;
    throw new ImportError(`cannot open ${path}: ${(error as NodeJS.ErrnoException).code === 'ENOENT' ? 'no such file' : (error as Error).message}`);
  }
  if (size === 0) throw new ImportError('the file is empty: there is no text in it');
  const stream = createReadStream(path, { highWaterMark: 1 << 20 });
  try {
    return await readCaptureStream(stream, { ...options, sizeHint: size });
  } finally {
    stream.destroy();
  }
}
