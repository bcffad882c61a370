import type { ImportedCapture, TimeBase } from '../contracts/capture.ts';
import { assembleCapture } from './assemble-capture.ts';
import { countLineEnds } from './count-line-ends.ts';
import { decodeCaptureBytes } from './decode-capture-bytes.ts';
import { detectCapturePlan, type CapturePlan } from './detect-capture-plan.ts';
import { fitTimeBase } from './fit-time-base.ts';
import { lineStartOffset } from './line-start-offset.ts';
import type { ParseScopeCsvOptions } from './parse-scope-csv-options.ts';
import { scanNumericRows, scanSpecFromPlan, type ScanOutput, type ScanState } from './scan-numeric-rows.ts';
import { splitLines } from './split-lines.ts';

/** Bytes of the head the layout is detected from, as the disk reader does (worker/import/read-capture-stream.ts). */
const HEAD_BYTES = 256 << 10;

/**
 * parseScopeCsv's fast path for a file held in memory (the browser, a script): the layout from the head, then the
 * numeric body with the disk reader's byte scanner straight into typed arrays, without decoding the file into text
 * or splitting it into lines. It gives exactly what the text path gives, or null whenever it would not be sure to:
 * UTF-16, quotes in the data, a footer, any row the scanner stops at (a bad row, repeated times, text) and a layout
 * the head cannot settle. parseScopeCsv then reads the file as text, with its messages naming the line and why.
 */
export function scanCaptureBytes(bytes: Uint8Array, options: ParseScopeCsvOptions, headBytes = HEAD_BYTES): ImportedCapture | null {
  const size = bytes.length;
  let cut = Math.min(size, headBytes);
  if (cut < size) {
    while (cut > 0 && bytes[cut - 1] !== 10 && bytes[cut - 1] !== 13) cut--;
    if (cut === 0) return null;
  }
  const partial = cut < size;
  const decoded = decodeCaptureBytes(bytes.subarray(0, cut), { encoding: options.encoding });
  if (decoded.encoding === 'utf-16le' || decoded.encoding === 'utf-16be') return null;
  const lines = splitLines(decoded.text);
  let plan: CapturePlan;
  try {
    plan = detectCapturePlan(lines, { ...options, encoding: decoded.encoding, partial });
  } catch {
    return null;
  }
  if (plan.dataEndLine !== null && plan.dataEndLine < lines.length) return null; // a footer, or blank lines at the end
  // From the head alone, a column empty (or of side notes) in the first rows might hold numbers further down, which
  // the text path, seeing every row, would read. Only a head of time, index and channel columns is taken: then every
  // byte of the data is scanned, and a scan to the end also shows the rest is plain ASCII, so the text path would
  // decode the file as the head was decoded.
  if (partial && !plan.columnRoles.every((role) => role === 'time' || role === 'index' || role === 'channel')) return null;
  const dataOffset = lineStartOffset(bytes, plan.dataStartLine);
  if (bytes.indexOf(34, dataOffset) >= 0) return null; // quoted fields
  const cr = bytes.indexOf(13) >= 0;
  const lf = bytes.indexOf(10) >= 0;
  const eol = lf ? 10 : 13;
  const capacity = countLineEnds(bytes, dataOffset, size, eol) + 1;
  const spec = scanSpecFromPlan(plan);
  const out: ScanOutput = {
    values: plan.channels.map(() => new Float64Array(capacity)),
    times: plan.timeMode === 'column' ? new Float64Array(capacity) : null,
    invalidCounts: plan.channels.map(() => 0),
  };
  const state: ScanState = { row: 0, line: plan.dataStartLine, lastTime: NaN, nextIndex: NaN };
  let end = size;
  while (end > dataOffset && bytes[end - 1] !== 10 && bytes[end - 1] !== 13) end--;
  if (scanNumericRows(bytes, dataOffset, end, spec, out, state) !== null) return null;
  if (end < size) {
    // The scanner wants every line ended: the last line, without its line end, is scanned from a copy with one.
    const last = new Uint8Array(size - end + 1);
    last.set(bytes.subarray(end));
    last[last.length - 1] = 10;
    if (scanNumericRows(last, 0, last.length, spec, out, state) !== null) return null;
  }
  const rows = state.row;
  if (rows < 2) return null;
  let time: TimeBase;
  const warnings: string[] = [];
  if (out.times !== null) {
    const fitted = fitTimeBase(out.times, rows, { tolerance: plan.uniformTolerance });
    time = fitted.time;
    if (fitted.warning !== null) warnings.push(fitted.warning);
  } else {
    time = { kind: 'uniform', t0: plan.t0 as number, dt: plan.dt as number, jitter: 0 };
  }
  const lineEnding = hasCrLf(bytes) ? 'CRLF' : lf ? 'LF' : cr ? 'CR' : 'none';
  const source = { encoding: decoded.encoding, bom: decoded.bom, lineEnding, reader: 'text' };
  return assembleCapture(plan, { length: rows, values: out.values, invalidCounts: out.invalidCounts, time, warnings }, source);
}

function hasCrLf(bytes: Uint8Array): boolean {
  for (let i = bytes.indexOf(13); i >= 0; i = bytes.indexOf(13, i + 1)) if (bytes[i + 1] === 10) return true;
  return false;
}
