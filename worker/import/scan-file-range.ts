import { readSync } from 'node:fs';
import { ImportError } from '../../shared/import/import-error.ts';
import { scanNumericRows, type ScanOutput, type ScanSpec, type ScanState, type ScanStop } from '../../shared/import/scan-numeric-rows.ts';
import { BLOCK_BYTES, rowScannerBlock } from '../../shared/import/wasm/scan-rows-wasm.ts';

export interface ScanFileRangeOptions {
  /** Bytes read per system call; also the longest line accepted. @default 4 MiB */
  blockBytes?: number;
}

/**
 * Scans the data rows in bytes [start, end) of an open file (start at a line start, end at a line start or the
 * end of the file) into the output arrays, reading blocks into one reused buffer so memory stays flat however
 * deep the record is. Returns where it stopped (offset in the file) or null when it read the whole range.
 */
export function scanFileRange(fd: number, start: number, end: number, spec: ScanSpec, out: ScanOutput, state: ScanState, options: ScanFileRangeOptions = {}): ScanStop | null {
  const { blockBytes = 4 << 20 } = options;
  if (!(start >= 0 && start <= end)) throw new RangeError('start and end must satisfy 0 <= start <= end');
  // One spare byte to end a last line that has no line end, as the scanner wants. Read straight into the compiled
  // scanner's memory where there is one (no copy of every byte into its window; the JS scanner reads it as well).
  const size = Math.min(blockBytes, Math.max(1, end - start)) + 1;
  const buffer = (size <= BLOCK_BYTES ? rowScannerBlock(size) : null) ?? new Uint8Array(size);
  const room = buffer.length - 1;
  let filled = 0; // bytes in buffer
  let bufferAt = start; // file offset of buffer[0]
  let position = start;
  while (position < end || filled > 0) {
    const want = Math.min(room - filled, end - position);
    const got = want > 0 ? readSync(fd, buffer, filled, want, position) : 0;
    if (want > 0 && got === 0) throw new ImportError(`the file ended early, at byte ${position}; was it changed while being read?`);
    position += got;
    filled += got;
    const atEnd = position >= end;
    if (atEnd && filled > 0 && buffer[filled - 1] !== 10 && buffer[filled - 1] !== 13) buffer[filled++] = 10;
    let stopAt = filled;
    if (!atEnd) {
      // Scan only complete lines; keep the tail for the next block. A CR as the last byte may be the first
      // half of a CRLF, so the line it ends waits for the next block too.
      let j = filled - 1;
      while (j >= 0 && !(buffer[j] === 10 || (buffer[j] === 13 && j + 1 < filled))) j--;
      stopAt = j + 1;
      if (stopAt === 0) {
        throw new ImportError(`a line is longer than ${Math.round(buffer.length / 1024)} KiB, which no row of samples is; this is not a plain data file`, state.line);
      }
    }
    const stop = scanNumericRows(buffer, 0, stopAt, spec, out, state);
    if (stop !== null) return { ...stop, offset: bufferAt + stop.offset };
    buffer.copyWithin(0, stopAt, filled);
    filled -= stopAt;
    bufferAt += stopAt;
    if (atEnd && filled === 0) break;
  }
  return null;
}
