// Worker-thread side of the parallel disk read (see scan-thread.ts): scans one byte range of a file into shared
// sample arrays; asked after the read, prepares channels of the capture for its analysis (the analyze CLI).
import { closeSync, openSync } from 'node:fs';
import { parentPort, workerData } from 'node:worker_threads';
import { ImportError } from '../../shared/import/import-error.ts';
import { TimeGridHull, type TimeGridHullData } from '../../shared/import/time-grid-hull.ts';
import type { ScanOutput, ScanSpec, ScanState } from '../../shared/import/scan-numeric-rows.ts';
import type { PrepareChannelsReply, PrepareChannelsRequest } from '../../shared/analysis/prepare-channel.ts';
import { scanFileRange } from './scan-file-range.ts';

export interface ScanRangeRequest {
  path: string;
  start: number;
  end: number;
  spec: ScanSpec;
  values: SharedArrayBuffer[];
  times: SharedArrayBuffer | null;
  rowOffset: number;
  /** Line number of the range's first line (the reader passes 1 and adds the first part's lines afterwards). */
  line: number;
  /** Reference grid for tracking the time column's evenness without keeping it; null to keep the times. */
  hull: { t0: number; dtHint: number } | null;
}

export interface ScanRangeReply {
  row: number;
  line: number;
  lastTime: number;
  firstIndex: number | null;
  hull: TimeGridHullData | null;
  stop: { kind: string; offset: number; reason: string; line: number | null; code: 'time-repeats' | null } | null;
  invalidCounts: number[];
  failure: string | null;
}

export type ScanThreadRequest = ({ kind: 'scan' } & ScanRangeRequest) | ({ kind: 'prepare' } & PrepareChannelsRequest);
export type ScanThreadReply = ScanRangeReply | PrepareChannelsReply;

parentPort?.on('message', (request: ScanThreadRequest) => {
  if (request.kind === 'prepare') void prepare(request);
  else scan(request);
});

/** What the thread was made for (see ScanThread): `prepares`, it will be asked to prepare channels after its scan. */
const preparesAfterScan = (workerData as { prepares?: boolean } | null)?.prepares === true;
let analysis: Promise<typeof import('../../shared/analysis/prepare-channel.ts')> | null = null;

/** The analysis modules, loaded once: on the first prepare request, or right after a scan's reply when a prepare
 * request is to follow (they load while the other thread finishes its part instead of delaying this one's
 * analysis: 16–21 ms in the analyze CLI's timeline). The reader's own threads never load them. */
function loadAnalysis(): Promise<typeof import('../../shared/analysis/prepare-channel.ts')> {
  analysis ??= import('../../shared/analysis/prepare-channel.ts');
  return analysis;
}

/** Channels prepared here. */
async function prepare(request: PrepareChannelsRequest): Promise<void> {
  let reply: PrepareChannelsReply;
  try {
    const { prepareChannels } = await loadAnalysis();
    reply = { prepared: prepareChannels(request), failure: null };
  } catch (error) {
    reply = { prepared: null, failure: error instanceof Error ? `${error.name}: ${error.message}` : String(error) };
  }
  parentPort?.postMessage(reply);
}

function scan(request: ScanRangeRequest): void {
  let reply: ScanRangeReply;
  try {
    const out: ScanOutput = {
      values: request.values.map((b) => new Float64Array(b)),
      times: request.times === null ? null : new Float64Array(request.times),
      hull: request.hull === null ? null : new TimeGridHull(request.hull.t0, request.hull.dtHint),
      invalidCounts: request.spec.factors.map(() => 0),
    };
    const state: ScanState = { row: request.rowOffset, line: request.line, lastTime: NaN, nextIndex: NaN };
    const fd = openSync(request.path, 'r');
    try {
      const stop = scanFileRange(fd, request.start, request.end, request.spec, out, state);
      reply = {
        row: state.row,
        line: state.line,
        lastTime: state.lastTime,
        firstIndex: state.firstIndex ?? null,
        hull: out.hull?.toData() ?? null,
        stop: stop === null ? null : { kind: stop.kind, offset: stop.offset, reason: stop.error?.reason ?? '', line: stop.error?.line ?? null, code: stop.error?.code ?? null },
        invalidCounts: out.invalidCounts,
        failure: null,
      };
    } finally {
      closeSync(fd);
    }
  } catch (error) {
    if (error instanceof ImportError) {
      reply = { row: 0, line: 0, lastTime: NaN, firstIndex: null, hull: null, stop: { kind: 'error', offset: 0, reason: error.reason, line: error.line, code: error.code }, invalidCounts: [], failure: null };
      parentPort?.postMessage(reply);
      return;
    }
    reply = { row: 0, line: 0, lastTime: NaN, firstIndex: null, hull: null, stop: null, invalidCounts: [], failure: error instanceof Error ? `${error.name}: ${error.message}` : String(error) };
  }
  parentPort?.postMessage(reply);
  if (preparesAfterScan) loadAnalysis().catch(() => undefined); // a failure is the prepare request's to report
}
