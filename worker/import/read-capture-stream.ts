import type { ImportedCapture } from '../../shared/contracts/capture.ts';
import { decodeCaptureBytes } from '../../shared/import/decode-capture-bytes.ts';
import { detectCapturePlan } from '../../shared/import/detect-capture-plan.ts';
import { ImportError } from '../../shared/import/import-error.ts';
import { parseScopeCsv, type ParseScopeCsvOptions } from '../../shared/import/parse-scope-csv.ts';
import { scanNumericRows, scanSpecFromPlan, type ScanOutput, type ScanState } from '../../shared/import/scan-numeric-rows.ts';
import { splitLines } from '../../shared/import/split-lines.ts';
import { TimeGridHull } from '../../shared/import/time-grid-hull.ts';
import { finishCapture, isFooterText } from './finish-capture.ts';
import { headTimeHint } from './head-time-hint.ts';
import { lineStartOffset } from '../../shared/import/line-start-offset.ts';
import { checkChannelCount, checkSampleCount, type CaptureLimits } from './capture-limits.ts';

export interface ReadCaptureStreamOptions extends ParseScopeCsvOptions, CaptureLimits {
  /** Bytes read before the layout must be clear; a file with no data rows in them is refused. @default 256 KiB */
  headBytes?: number;
  /** Longest line accepted in the data; a longer one means the file is not a capture. @default 1 MiB */
  maxLineBytes?: number;
  /** Most text after the data that is still taken as a footer. @default 64 KiB */
  footerBytes?: number;
  /** Most bytes read for files the fast path cannot take (quoted fields in the data, UTF-16). @default 256 MiB */
  maxTextBytes?: number;
  /** Total size of the stream when known, to size the arrays once. @default unknown (arrays grow by doubling) */
  sizeHint?: number;
  /** Opens the same bytes again. When given, an evenly spaced time column is checked without keeping its
   * times (TimeGridHull), and only a file that turns out unevenly spaced is read a second time to keep them.
   * @default none: the times are kept while reading */
  reopen?: () => AsyncIterable<Uint8Array>;
  /** Sample arrays in shared memory (SharedArrayBuffer), for another thread to read them in place (the API's reading
   * thread: upload-reader-thread.ts). @default false */
  shared?: boolean;
}

/**
 * Reads a scope export from a stream of bytes (a file, an upload) with the fast byte scanner, holding only the
 * current block and the sample arrays in memory. The layout is detected from the first `headBytes`; the read
 * stops at the first line that cannot be data, so a huge file of junk is refused after at most about
 * `headBytes` + one block instead of being read to its end. Files the scanner cannot take (quoted data fields,
 * UTF-16) go through parseScopeCsv whole, up to `maxTextBytes`.
 */
export async function readCaptureStream(source: AsyncIterable<Uint8Array>, options: ReadCaptureStreamOptions = {}): Promise<ImportedCapture> {
  const {
    headBytes = 256 << 10,
    maxLineBytes = 1 << 20,
    footerBytes = 64 << 10,
    maxTextBytes = 256 << 20,
    sizeHint,
  } = options;
  if (!(headBytes >= 1024)) throw new RangeError('headBytes must be at least 1024');
  const iterator = source[Symbol.asyncIterator]();
  let done = false;
  let consumed = 0;
  const next = async (): Promise<Uint8Array | null> => {
    if (done) return null;
    const r = await iterator.next();
    if (r.done) {
      done = true;
      return null;
    }
    consumed += r.value.length;
    return r.value;
  };
  // The general text path needs the whole file in memory, up to a limit.
  const readRest = async (head: Uint8Array): Promise<Uint8Array> => {
    const parts = [head];
    let total = head.length;
    for (let chunk = await next(); chunk !== null; chunk = await next()) {
      total += chunk.length;
      if (total > maxTextBytes) {
        throw new ImportError(`this file needs the general text reader (quoted fields or UTF-16) and is larger than its limit of ${formatBytes(maxTextBytes)}; export it without quotes, as UTF-8`);
      }
      parts.push(chunk.slice());
    }
    return concat(parts, total);
  };
  try {
    // The head: enough bytes to see the preamble, the header and the first rows.
    const headParts: Uint8Array[] = [];
    let headLength = 0;
    while (headLength < headBytes) {
      const chunk = await next();
      if (chunk === null) break;
      headParts.push(chunk.slice()); // the source may reuse its buffer
      headLength += chunk.length;
    }
    const head = concat(headParts, headLength);
    if (head.length === 0) throw new ImportError('the file is empty: there is no text in it');
    // UTF-16 (a BOM of FF FE or FE FF) has two-byte line ends; the byte scanner cannot take it, the text path can.
    const wide = options.encoding === 'utf-16le' || options.encoding === 'utf-16be'
      || (options.encoding === undefined && head.length >= 2 && ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff)));
    if (wide) return parseScopeCsv(await readRest(head), options);
    let cut = head.length;
    if (!done) {
      cut = lastLineEnd(head);
      if (cut === 0) throw new ImportError(`no line end in the first ${formatBytes(head.length)}; this is not a CSV text file`, 1);
    }
    const decoded = decodeCaptureBytes(head.subarray(0, cut), { encoding: options.encoding });
    const lines = splitLines(decoded.text);
    const plan = detectCapturePlan(lines, { ...options, encoding: decoded.encoding, partial: !done });
    checkChannelCount(plan.channels.length, options);
    const dataLines = lines.slice(plan.dataStartLine - 1, plan.dataStartLine + 200);
    const fast = decoded.encoding !== 'utf-16le' && decoded.encoding !== 'utf-16be' && !dataLines.some((l) => l.includes('"'));
    const lineEnding = decoded.text.includes('\r\n') ? 'CRLF' : decoded.text.includes('\n') ? 'LF' : 'CR';
    const sourceInfo = { encoding: decoded.encoding, bom: decoded.bom, lineEnding };
    if (!fast) return parseScopeCsv(await readRest(head), options);

    const spec = scanSpecFromPlan(plan);
    const dataOffset = lineStartOffset(head, plan.dataStartLine);
    const headRows = Math.max(1, lines.length - plan.dataStartLine + 1);
    const bytesPerRow = Math.max(1, (cut - dataOffset) / headRows);
    // With the size known, arrays for the most rows the bytes could hold (a row is at least one digit and one
    // delimiter or line end per field): never grown, and viewed to the rows read at the end (finishCapture). Their
    // pages past the rows are never written and cost no memory: the allocator's zeroed pages come from the system on
    // their first write. Plain buffers, not resizable ones: with Node 20's V8 a loop over a typed array on a resizable
    // buffer ran about 2× slower (measured 3 December 2026: the engine's scan for a crossing over 10 M samples,
    // 34–57 ms against 17–24 ms), and the engine, the pyramids and the Float32 copies all loop over these arrays.
    // (Shrinking a buffer to the rows instead cost RSS: V8 zeroes the cut-off tail.)
    const most = sizeHint !== undefined ? Math.ceil((sizeHint - dataOffset) / (2 * spec.requiredFields)) + 1 : 0;
    const reserve = most > 0 && most * 8 <= MAX_RESERVE_BYTES;
    let capacity = reserve
      ? most
      : sizeHint !== undefined ? Math.ceil(((sizeHint - dataOffset) / bytesPerRow) * 1.05) + 1024 : Math.max(4096, headRows * 4);
    const array = () => newArray(capacity, options.shared === true);
    const hint = options.reopen !== undefined ? headTimeHint(plan, lines) : null;
    const out: ScanOutput = {
      values: plan.channels.map(array),
      times: plan.timeMode === 'column' && hint === null ? array() : null,
      hull: hint === null ? null : new TimeGridHull(hint.t0, hint.dtHint),
      invalidCounts: plan.channels.map(() => 0),
    };
    const finish = async (footerText: string | null): Promise<ImportedCapture> => {
      // Arrays sized from the file's length never fill up on the way, so the count is checked here too.
      checkSampleCount(state.row, options);
      const source = { ...sourceInfo, reader: 'stream', bytesRead: consumed };
      if (out.hull === null || out.hull === undefined || state.row < 2) return finishCapture({ plan, out, rows: state.row, footerText, source });
      const t0 = out.hull.t0;
      const dt = (state.lastTime - t0) / (state.row - 1);
      const jitter = out.hull.jitter(t0, dt);
      if (jitter <= plan.uniformTolerance * dt) {
        return finishCapture({ plan, out, rows: state.row, footerText, source, time: { kind: 'uniform', t0, dt, jitter } });
      }
      // Unevenly spaced: read again, keeping every time.
      const again = (options.reopen as () => AsyncIterable<Uint8Array>)();
      return readCaptureStream(again, { ...options, reopen: undefined });
    };
    const state: ScanState = { row: 0, line: plan.dataStartLine, lastTime: NaN, nextIndex: NaN };
    // One work buffer for the whole read: a fresh buffer per chunk would pile up as garbage between collections.
    let work = new Uint8Array(Math.max(2 << 20, head.length - dataOffset + 1));
    work.set(head.subarray(dataOffset));
    let filled = head.length - dataOffset;
    const room = (need: number) => {
      if (need <= work.length) return;
      const bigger = new Uint8Array(Math.max(need, work.length * 2));
      bigger.set(work.subarray(0, filled));
      work = bigger;
    };
    for (;;) {
      if (done && filled > 0 && work[filled - 1] !== 10 && work[filled - 1] !== 13) {
        room(filled + 1);
        work[filled++] = 10; // the scanner wants every line ended
      }
      const stopAt = done ? filled : lastLineEnd(work, filled);
      if (stopAt === 0 && filled > maxLineBytes) {
        throw new ImportError(`a line is longer than ${formatBytes(maxLineBytes)}, which no row of samples is; this is not a capture file`, state.line);
      }
      let stop = stopAt > 0 ? scanNumericRows(work, 0, stopAt, spec, out, state) : null;
      while (stop !== null && stop.kind === 'full') {
        // Full: every row so far is stored and at least one more is waiting.
        checkSampleCount(state.row + 1, options);
        if (reserve) throw new ImportError('the file grew while it was being read; read it again when the scope has finished writing it');
        capacity *= 2;
        grow(out, capacity);
        stop = scanNumericRows(work, stop.offset, stopAt, spec, out, state);
      }
      if (stop !== null) {
        if (stop.kind === 'text') {
          // Text after the data is a footer only if nothing but text follows, and not much of it.
          const tailParts = [work.slice(stop.offset, filled)];
          let tailLength = tailParts[0].length;
          while (!done && tailLength <= footerBytes) {
            const chunk = await next();
            if (chunk === null) break;
            tailParts.push(chunk.slice());
            tailLength += chunk.length;
          }
          if (done && tailLength <= footerBytes) {
            const tailText = decodeCaptureBytes(concat(tailParts, tailLength), { encoding: decoded.encoding }).text;
            if (isFooterText(plan, tailText)) {
              return await finish(tailText);
            }
          }
        }
        throw stop.error as ImportError;
      }
      if (done) break;
      work.copyWithin(0, stopAt, filled);
      filled -= stopAt;
      const chunk = await next();
      if (chunk !== null) {
        room(filled + chunk.length + 1);
        work.set(chunk, filled);
        filled += chunk.length;
      }
    }
    return await finish(null);
  } finally {
    if (!done) await iterator.return?.();
  }
}

/** Largest array made for the most rows a known size could hold (4 GiB: a file of 3 GB and more); beyond it the
 * arrays start from the head's bytes per row and grow by copying. */
const MAX_RESERVE_BYTES = 2 ** 32;

/** An array of `length` samples, in shared memory or not. */
function newArray(length: number, shared: boolean): Float64Array {
  return shared ? new Float64Array(new SharedArrayBuffer(length * 8)) : new Float64Array(length);
}

/** Makes room for `capacity` rows by copying into bigger arrays. */
function grow(out: ScanOutput, capacity: number): void {
  const resized = (v: Float64Array): Float64Array => {
    const bigger = newArray(capacity, v.buffer instanceof SharedArrayBuffer);
    bigger.set(v);
    return bigger;
  };
  out.values = out.values.map(resized);
  if (out.times !== null) out.times = resized(out.times);
}

function concat(parts: Uint8Array[], length: number): Uint8Array {
  if (parts.length === 1) return parts[0];
  const out = new Uint8Array(length);
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

/** Offset just past the last complete line end in bytes[0, length); a CR as the last byte may be half a CRLF and
 * does not count. */
function lastLineEnd(bytes: Uint8Array, length = bytes.length): number {
  let j = length - 1;
  while (j >= 0 && !(bytes[j] === 10 || (bytes[j] === 13 && j + 1 < length))) j--;
  return j + 1;
}

function formatBytes(n: number): string {
  return n >= 1 << 20 ? `${(n / (1 << 20)).toFixed(0)} MiB` : `${(n / 1024).toFixed(0)} KiB`;
}

