import { closeSync, openSync, readSync } from 'node:fs';
import { stat } from 'node:fs/promises';
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
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
import { checkChannelCount, checkSampleCount } from './capture-limits.ts';

export interface ReadCaptureFileOptions extends ReadCaptureStreamOptions {
  /** Threads for the scan of a large plain file (1 or 2). @default 2 when the file exceeds `parallelFromBytes` and 2+ cores exist, else 1 */
  threads?: number;
  /** Smallest file worth a second thread (a worker takes ~0.3 s to start under tsx). @default 64 MiB */
  parallelFromBytes?: number;
}

const BLOCK = 4 << 20;

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
  const { parallelFromBytes = 64 << 20 } = options;
  let size: number;
  try {
    const s = await stat(path);
    if (s.isDirectory()) throw new ImportError(`${path} is a folder, not a file`);
    size = s.size;
  } catch (error) {
    if (error instanceof ImportError) throw error;
    const code = (error as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'no such file' : code === 'EACCES' ? 'permission denied' : (error as Error).message;
    throw new ImportError(`cannot open ${path}: ${why}`);
  }
  if (size === 0) throw new ImportError('the file is empty: there is no text in it');
  const threads = options.threads ?? (size >= parallelFromBytes && availableParallelism() >= 2 ? 2 : 1);
  if (threads !== 1 && threads !== 2) throw new RangeError('threads must be 1 or 2');
  if (threads === 2) {
    const capture = await readInTwoParts(path, size, options);
    if (capture !== null) return capture;
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

/** The parallel path; null when the file is not a plain numeric one (the stream path then takes it). */
async function readInTwoParts(path: string, size: number, options: ReadCaptureFileOptions): Promise<ImportedCapture | null> {
  // Start the worker first: it boots (~0.3 s) while this thread reads the head and counts lines.
  const worker = new Worker(new URL('./scan-range-worker-boot.mjs', import.meta.url));
  const ready = new Promise<ScanRangeReply>((resolve, reject) => {
    worker.once('message', resolve);
    worker.once('error', reject);
  });
  ready.catch(() => undefined);
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

    // Split at the line start nearest the middle of the data, and count lines on each side to size the arrays.
    let split = dataOffset + Math.floor((size - dataOffset) / 2);
    const probe = new Uint8Array(Math.min(1 << 20, size - split));
    readSync(fd, probe, 0, probe.length, split);
    const nl = probe.indexOf(eol);
    if (nl < 0) return null;
    split += nl + 1;
    const block = new Uint8Array(BLOCK);
    const count = (from: number, to: number) => {
      let lines = 0;
      for (let at = from; at < to; at += BLOCK) {
        const got = readSync(fd, block, 0, Math.min(BLOCK, to - at), at);
        lines += countLineEnds(block, 0, got, eol);
      }
      return lines;
    };
    const lines0 = count(dataOffset, split);
    const lines1 = count(split, size);
    // Before any array is made: a footer of a few lines may count here too, which no limit worth setting notices.
    checkSampleCount(lines0 + lines1, options);
    const cap0 = lines0 + 1;
    const capacity = cap0 + lines1 + 1;
    // An evenly spaced time column is checked on the fly (TimeGridHull) instead of being kept.
    const hint = headTimeHint(plan, lines);
    const shared = plan.channels.map(() => new SharedArrayBuffer(capacity * 8));
    const sharedTimes = plan.timeMode === 'column' && hint === null ? new SharedArrayBuffer(capacity * 8) : null;
    const spec = scanSpecFromPlan(plan);
    const request: ScanRangeRequest = {
      path, start: split, end: size, spec, values: shared, times: sharedTimes, rowOffset: cap0, line: plan.dataStartLine + lines0, hull: hint,
    };
    worker.postMessage(request);
    const out: ScanOutput = {
      values: shared.map((b) => new Float64Array(b)),
      times: sharedTimes === null ? null : new Float64Array(sharedTimes),
      hull: hint === null ? null : new TimeGridHull(hint.t0, hint.dtHint),
      invalidCounts: plan.channels.map(() => 0),
    };
    const state: ScanState = { row: 0, line: plan.dataStartLine, lastTime: NaN, nextIndex: NaN };
    const stop0 = scanFileRange(fd, dataOffset, split, spec, out, state);
    if (stop0 !== null) throw stop0.error ?? new Error('the first part of the file held more rows than lines');
    const reply = await ready;
    if (reply.failure !== null) throw new Error(`the import worker failed: ${reply.failure}`);
    let footerText: string | null = null;
    if (reply.stop !== null) {
      const error = new ImportError(reply.stop.reason, reply.stop.line);
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
      throw new ImportError(`the time ${out.times[rows0]} s is not after the previous ${out.times[rows0 - 1]} s (times must increase)`, plan.dataStartLine + lines0, out.times[rows0] === out.times[rows0 - 1] ? 'time-repeats' : null);
    }
    if (reply.firstIndex !== null && rows0 > 0 && reply.firstIndex !== state.nextIndex) {
      throw new ImportError(`the sample index ${reply.firstIndex} does not follow ${state.nextIndex - 1} (indices must count up by one)`, plan.dataStartLine + lines0);
    }
    const source = { encoding: decoded.encoding, bom: decoded.bom, lineEnding: eol === 13 ? 'CR' : head.includes(13) ? 'CRLF' : 'LF', reader: 'two threads' };
    if (out.hull === null || out.hull === undefined || rows < 2) return finishCapture({ plan, out, rows, footerText, source });
    if (reply.hull !== null && rows1 > 0) {
      // The second part numbered its rows from cap0; shift them to follow the first part's rows0.
      if (rows0 > 0 && !(firstTimeOfPart(reply.hull) > state.lastTime)) {
        throw new ImportError(`the times do not increase across line ${plan.dataStartLine + lines0} (times must increase)`, plan.dataStartLine + lines0);
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
    await worker.terminate();
  }
}
