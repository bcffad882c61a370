import { closeSync, openSync, readSync, statSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import type { ImportedCapture } from '../../shared/contracts/capture.ts';
import { decodeCaptureBytes } from '../../shared/import/decode-capture-bytes.ts';
import { detectCapturePlan } from '../../shared/import/detect-capture-plan.ts';
import { ImportError, isRepeatedTime } from '../../shared/import/import-error.ts';
import { scanSpecFromPlan, type ScanOutput, type ScanState } from '../../shared/import/scan-numeric-rows.ts';
import { splitLines } from '../../shared/import/split-lines.ts';
import { TimeGridHull, type TimeGridHullData } from '../../shared/import/time-grid-hull.ts';
import { countLineEnds } from '../../shared/import/count-line-ends.ts';
import { headTimeHint } from './head-time-hint.ts';
import { finishCapture, isFooterText } from './finish-capture.ts';
import { lineStartOffset } from '../../shared/import/line-start-offset.ts';
import { readCaptureStream, type ReadCaptureStreamOptions } from './read-capture-stream.ts';
import { scanFileRange } from './scan-file-range.ts';
import type { ScanRangeReply, ScanRangeRequest } from './scan-range-worker.ts';
import { ScanThread } from './scan-thread.ts';
import { checkChannelCount, checkSampleCount } from './capture-limits.ts';

export interface ReadCaptureFileOptions extends ReadCaptureStreamOptions {
  /** Threads for the scan of a large plain file (1 or 2). @default 2 when the file exceeds `parallelFromBytes` and 2+ cores exist, else 1 */
  threads?: number;
  /** Smallest file worth a second thread (a worker takes ~0.3 s to start under tsx). @default 64 MiB */
  parallelFromBytes?: number;
  /** The second thread to scan in, made and closed by the caller (who has more work for it); else one is made
   * for the read and closed after it. */
  thread?: ScanThread;
}

const BLOCK = 4 << 20;
/** Default of `parallelFromBytes`. */
const PARALLEL_FROM_BYTES = 64 << 20;

/** Whether a file of `bytes` bytes is read in two threads when the caller does not say (the reader's default). */
export function readsInTwoThreads(bytes: number, parallelFromBytes = PARALLEL_FROM_BYTES): boolean {
  return bytes >= parallelFromBytes && availableParallelism() >= 2;
}

/**
 * Reads a scope export from disk into an ImportedCapture: the layout from the file's head, then the plain numeric
 * body with the byte scanner straight into typed arrays. A large file is split at a line boundary and its second
 * part scanned by a worker thread into the same shared arrays (measured in bench/import.ts). Throws ImportError
 * with an actionable message (and the line) for a file it cannot read, including one that cannot be opened.
 */
export async function readCaptureFile(path: string, options: ReadCaptureFileOptions = {}): Promise<ImportedCapture> {
  try {
    return await readCaptureFileOnce(path, options);
  } catch (error) {
    // Times printed too coarsely may only start to repeat past the head the plan saw: plan again for that.
    if (!isRepeatedTime(error) || options.coarseTime === true) throw error;
    return readCaptureFileOnce(path, { ...options, coarseTime: true });
  }
}

async function readCaptureFileOnce(path: string, options: ReadCaptureFileOptions): Promise<ImportedCapture> {
  if (typeof path !== 'string' || path === '') throw new TypeError('path must be a non-empty string');
  let size: number;
  try {
    // Synchronous: from here to the wait for the scan thread nothing pauses, so that work a caller starts after
    // calling this (the analyze CLI loads its engine) is done in that wait rather than before the thread starts.
    const s = statSync(path);
    if (s.isDirectory()) throw new ImportError(`${path} is a folder, not a file`);
    size = s.size;
  } catch (error) {
    if (error instanceof ImportError) throw error;
    const code = (error as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'no such file' : code === 'EACCES' ? 'permission denied' : (error as Error).message;
    throw new ImportError(`cannot open ${path}: ${why}`);
  }
  if (size === 0) throw new ImportError('the file is empty: there is no text in it');
  const threads = options.threads ?? (readsInTwoThreads(size, options.parallelFromBytes) ? 2 : 1);
  if (threads !== 1 && threads !== 2) throw new RangeError('threads must be 1 or 2');
  if (threads === 2) {
    let capture = await readInTwoParts(path, size, options);
    if (capture === RECOUNT) capture = await readInTwoParts(path, size, options, true);
    if (capture !== null && capture !== RECOUNT) return capture;
    return readSequentially(path, size, options, false);
  }
  return readSequentially(path, size, options, true);
}

async function readSequentially(path: string, size: number, options: ReadCaptureFileOptions, trackTimes: boolean): Promise<ImportedCapture> {
  const open = () => fileChunks(path);
  return readCaptureStream(open(), { ...options, sizeHint: size, reopen: trackTimes ? open : undefined });
}

/** The file's bytes in 1 MiB blocks read into one reused buffer (each block is valid until the next is asked for).
 * Reads are synchronous on purpose: from the page cache a block takes ~0.2 ms, and an awaited read left the
 * thread idle for a fifth of the run (measured with --cpu-prof on the 10 M-row capture). */
async function* fileChunks(path: string): AsyncGenerator<Uint8Array> {
  const fd = openSync(path, 'r');
  try {
    const buffer = new Uint8Array(1 << 20);
    for (;;) {
      const bytesRead = readSync(fd, buffer, 0, buffer.length, null);
      if (bytesRead === 0) return;
      yield buffer.subarray(0, bytesRead);
    }
  } finally {
    closeSync(fd);
  }
}

/** Time of the first row of a part: the first point pushed stays the first vertex of its hulls. */
function firstTimeOfPart(hull: TimeGridHullData): number {
  return hull.t0 + hull.lower[0][0] * hull.dtHint + hull.lower[1][0];
}

/** Bytes of the shortest row of samples (its line end included) among the complete lines in bytes[from, to);
 * lines of only spaces and tabs hold no row and do not count. Infinity when there is none. */
export function shortestRowBytes(bytes: Uint8Array, from: number, to: number, eol: number): number {
  let shortest = Infinity;
  let start = from;
  for (;;) {
    const end = bytes.indexOf(eol, start);
    if (end < 0 || end >= to) return shortest;
    let q = start;
    while (q < end && (bytes[q] === 32 || bytes[q] === 9 || bytes[q] === 10 || bytes[q] === 13)) q++;
    if (q < end && end + 1 - start < shortest) shortest = end + 1 - start;
    start = end + 1;
  }
}

/** Rows the arrays of a part of `bytes` bytes are sized for, when no line was counted: its bytes over 4/5 of the
 * shortest row seen (a later row may lose a sign or a digit). A part that still fills up is read again counted. */
export function rowsUpperBound(bytes: number, shortestRow: number): number {
  return Math.ceil(bytes / Math.max(2, Math.floor(shortestRow * 0.8))) + 1;
}

const RECOUNT = 'recount';

/** The parallel path; null when the file is not a plain numeric one (the stream path then takes it). Both parts
 * are scanned at once into arrays sized from an upper bound on their rows (`counted`: from the lines counted in a
 * pass over the file first, the way taken again when a part outgrows its bound). */
async function readInTwoParts(path: string, size: number, options: ReadCaptureFileOptions, counted = false): Promise<ImportedCapture | null | typeof RECOUNT> {
  // Start the worker first: it boots while this thread reads the head.
  const thread = options.thread ?? new ScanThread();
  const fd = openSync(path, 'r');
  try {
    const head = new Uint8Array(Math.min(size, options.headBytes ?? 256 << 10));
    readSync(fd, head, 0, head.length, 0);
    let cut = head.length;
    while (cut > 0 && head[cut - 1] !== 10 && head[cut - 1] !== 13) cut--;
    if (cut === 0) return null;
    const decoded = decodeCaptureBytes(head.subarray(0, cut), { encoding: options.encoding });
    if (decoded.encoding === 'utf-16le' || decoded.encoding === 'utf-16be') return null;
    const lines = splitLines(decoded.text);
    const plan = detectCapturePlan(lines, { ...options, encoding: decoded.encoding, partial: true });
    checkChannelCount(plan.channels.length, options);
    if (lines.slice(plan.dataStartLine - 1).some((l) => l.includes('"'))) return null;
    const eol = head.subarray(0, cut).includes(10) ? 10 : 13;
    const dataOffset = lineStartOffset(head, plan.dataStartLine);

    // Split at the line start nearest the middle of the data.
    let split = dataOffset + Math.floor((size - dataOffset) / 2);
    const probe = new Uint8Array(Math.min(1 << 20, size - split));
    readSync(fd, probe, 0, probe.length, split);
    const nl = probe.indexOf(eol);
    if (nl < 0) return null;
    split += nl + 1;
    let cap0: number;
    let capacity: number;
    if (counted) {
      const block = new Uint8Array(BLOCK);
      const count = (from: number, to: number) => {
        let n = 0;
        for (let at = from; at < to; at += BLOCK) {
          const got = readSync(fd, block, 0, Math.min(BLOCK, to - at), at);
          n += countLineEnds(block, 0, got, eol);
        }
        return n;
      };
      const lines0 = count(dataOffset, split);
      const lines1 = count(split, size);
      // Before any array is made: a footer of a few lines may count here too, which no limit worth setting notices.
      checkSampleCount(lines0 + lines1, options);
      cap0 = lines0 + 1;
      capacity = cap0 + lines1 + 1;
    } else {
      // The shortest row in the head, after the split and at the end bounds the rows; untouched pages of the
      // arrays' slack cost no memory, and the second part's rows are moved down to follow the first part's.
      const tail = new Uint8Array(Math.min(64 << 10, size - split));
      readSync(fd, tail, 0, tail.length, size - tail.length);
      const shortest = Math.min(
        shortestRowBytes(head, dataOffset, cut, eol),
        shortestRowBytes(probe, nl + 1, probe.length, eol),
        shortestRowBytes(tail, Math.max(0, tail.indexOf(eol) + 1), tail.length, eol),
      );
      if (shortest === Infinity) return RECOUNT;
      cap0 = rowsUpperBound(split - dataOffset, shortest);
      capacity = cap0 + rowsUpperBound(size - split, shortest);
      // Over a limit only by the bound's slack, perhaps: the counted read decides.
      if (options.maxSamples !== undefined && capacity > options.maxSamples) return RECOUNT;
    }
    // An evenly spaced time column is checked on the fly (TimeGridHull) instead of being kept.
    const hint = headTimeHint(plan, lines);
    const shared = plan.channels.map(() => new SharedArrayBuffer(capacity * 8));
    const sharedTimes = plan.timeMode === 'column' && hint === null ? new SharedArrayBuffer(capacity * 8) : null;
    const spec = scanSpecFromPlan(plan);
    // The second part numbers its lines from 1 (the first part's count is not known yet): see lineAt.
    const request: ScanRangeRequest = {
      path, start: split, end: size, spec, values: shared, times: sharedTimes, rowOffset: cap0, line: 1, hull: hint,
    };
    const ready = thread.request<ScanRangeReply>({ kind: 'scan', ...request });
    // The first part writes only rows [0, cap0): past that the other thread writes at the same time, so a first
    // part that outgrows its bound stops 'full' (and the read is done again counted) instead of running on.
    const out: ScanOutput = {
      values: shared.map((b) => new Float64Array(b, 0, cap0)),
      times: sharedTimes === null ? null : new Float64Array(sharedTimes, 0, cap0),
      hull: hint === null ? null : new TimeGridHull(hint.t0, hint.dtHint),
      invalidCounts: plan.channels.map(() => 0),
    };
    const state: ScanState = { row: 0, line: plan.dataStartLine, lastTime: NaN, nextIndex: NaN };
    const stop0 = scanFileRange(fd, dataOffset, split, spec, out, state);
    if (stop0 !== null) {
      if (stop0.kind === 'full' && !counted) return RECOUNT;
      throw stop0.error ?? new Error('the first part of the file held more rows than lines');
    }
    out.values = shared.map((b) => new Float64Array(b));
    if (sharedTimes !== null) out.times = new Float64Array(sharedTimes);
    // Line number in the file of the second part's line `line`.
    const splitLine = state.line;
    const lineAt = (line: number): number => splitLine + line - 1;
    const reply = await ready;
    // The reader's own thread goes now (its heap and the scanner's memory, ~25 MB), before this one finishes the
    // capture: that is when the read's memory peaks.
    if (options.thread === undefined) void thread.close();
    if (reply.failure !== null) throw new Error(`the import worker failed: ${reply.failure}`);
    let footerText: string | null = null;
    if (reply.stop !== null) {
      if (reply.stop.kind === 'full' && !counted) return RECOUNT;
      const error = new ImportError(reply.stop.reason, reply.stop.line === null ? null : lineAt(reply.stop.line), reply.stop.code);
      if (reply.stop.kind !== 'text' || size - reply.stop.offset > (options.footerBytes ?? 64 << 10)) throw error;
      const tail = new Uint8Array(size - reply.stop.offset);
      readSync(fd, tail, 0, tail.length, reply.stop.offset);
      footerText = decodeCaptureBytes(tail, { encoding: decoded.encoding }).text;
      if (!isFooterText(plan, footerText)) throw error;
    }
    const rows0 = state.row;
    const rows1 = reply.row - cap0;
    const rows = rows0 + rows1;
    reply.invalidCounts.forEach((c, k) => { out.invalidCounts[k] += c; });
    if (rows0 < cap0) {
      for (const v of out.values) v.copyWithin(rows0, cap0, cap0 + rows1);
      out.times?.copyWithin(rows0, cap0, cap0 + rows1);
    }
    if (out.times !== null && rows0 > 0 && rows1 > 0 && !(out.times[rows0] > out.times[rows0 - 1])) {
      throw new ImportError(`the time ${out.times[rows0]} s is not after the previous ${out.times[rows0 - 1]} s (times must increase)`, splitLine, out.times[rows0] === out.times[rows0 - 1] ? 'time-repeats' : null);
    }
    if (reply.firstIndex !== null && rows0 > 0 && reply.firstIndex !== state.nextIndex) {
      throw new ImportError(`the sample index ${reply.firstIndex} does not follow ${state.nextIndex - 1} (indices must count up by one)`, splitLine);
    }
    const source = { encoding: decoded.encoding, bom: decoded.bom, lineEnding: eol === 13 ? 'CR' : head.includes(13) ? 'CRLF' : 'LF', reader: 'two threads' };
    if (out.hull === null || out.hull === undefined || rows < 2) return finishCapture({ plan, out, rows, footerText, source });
    if (reply.hull !== null && rows1 > 0) {
      // The second part numbered its rows from cap0; shift them to follow the first part's rows0.
      if (rows0 > 0 && !(firstTimeOfPart(reply.hull) > state.lastTime)) {
        throw new ImportError(`the times do not increase across line ${splitLine} (times must increase)`, splitLine);
      }
      out.hull.merge(TimeGridHull.fromData(reply.hull), cap0 - rows0);
    }
    const t0 = out.hull.t0;
    const tLast = rows1 > 0 ? reply.lastTime : state.lastTime;
    const dt = (tLast - t0) / (rows - 1);
    const jitter = out.hull.jitter(t0, dt);
    if (jitter > plan.uniformTolerance * dt) return null; // unevenly spaced: the sequential path keeps the times
    return finishCapture({ plan, out, rows, footerText, source, time: { kind: 'uniform', t0, dt, jitter } });
  } finally {
    closeSync(fd);
    if (options.thread === undefined) await thread.close();
  }
}
