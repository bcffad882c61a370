import type { ImportedCapture, TimeBase } from '../contracts/capture.ts';
import { assembleCapture } from './assemble-capture.ts';
import { decodeCaptureBytes } from './decode-capture-bytes.ts';
import { detectCapturePlan, type CapturePlan } from './detect-capture-plan.ts';
import { fitTimeBase } from './fit-time-base.ts';
import { ImportError, isRepeatedTime } from './import-error.ts';
import type { ParseScopeCsvOptions } from './parse-scope-csv-options.ts';
import { invalidTimeMessage, readSampleField } from './read-sample-field.ts';
import { timeOutOfRange } from './value-limits.ts';
import { scanCaptureBytes } from './scan-capture-bytes.ts';
import { splitFields } from './split-fields.ts';
import { splitLines } from './split-lines.ts';

export type { ParseScopeCsvOptions } from './parse-scope-csv-options.ts';

/**
 * Reads a whole scope CSV export held in memory (browser preview, small files, the disk reader's fallback for
 * irregular files): detects the layout, reads every data row, converts times to seconds and values to SI units,
 * and returns the capture with its warnings. Throws ImportError, naming the line, for a file it cannot read.
 */
export function parseScopeCsv(bytes: Uint8Array, options: ParseScopeCsvOptions = {}): ImportedCapture {
  if (!(bytes instanceof Uint8Array)) throw new TypeError('bytes must be a Uint8Array');
  // The plain numeric body goes through the disk reader's byte scanner; anything else (and every refusal, so its
  // message names the line) through the text reader below, which gives the same capture, only slower.
  return scanCaptureBytes(bytes, options) ?? parseScopeCsvText(bytes, options);
}

/** parseScopeCsv without the byte scanner: the whole file decoded, split into lines and read line by line. */
export function parseScopeCsvText(bytes: Uint8Array, options: ParseScopeCsvOptions = {}): ImportedCapture {
  if (!(bytes instanceof Uint8Array)) throw new TypeError('bytes must be a Uint8Array');
  const decoded = decodeCaptureBytes(bytes, { encoding: options.encoding });
  const lines = splitLines(decoded.text);
  const lineEnding = decoded.text.includes('\r\n') ? 'CRLF' : decoded.text.includes('\n') ? 'LF' : decoded.text.includes('\r') ? 'CR' : 'none';
  const source = { encoding: decoded.encoding, bom: decoded.bom, lineEnding, reader: 'text' };
  try {
    return readBodyLines(lines, detectCapturePlan(lines, options), source);
  } catch (error) {
    // Times printed too coarsely may only start to repeat past the rows the plan looked at: plan again for that.
    if (!isRepeatedTime(error) || options.coarseTime === true) throw error;
    return readBodyLines(lines, detectCapturePlan(lines, { ...options, coarseTime: true }), source);
  }
}

function readBodyLines(lines: string[], plan: CapturePlan, source: Record<string, unknown>): ImportedCapture {
  const first = plan.dataStartLine - 1;
  const last = (plan.dataEndLine ?? lines.length) - 1;
  const capacity = last - first + 1;
  const nChannels = plan.channels.length;
  const values = plan.channels.map(() => new Float64Array(capacity));
  const invalidCounts = new Array<number>(nChannels).fill(0);
  const times = plan.timeMode === 'column' ? new Float64Array(capacity) : null;
  const width = plan.columnRoles.length;
  const expected = plan.channels.length + (plan.timeColumn !== null ? 1 : 0) + (plan.indexColumn !== null ? 1 : 0);
  const { fieldOptions } = plan;
  let n = 0;
  let firstIndex = 0;
  for (let i = first; i <= last; i++) {
    const line = lines[i];
    if (line.trim() === '') continue;
    const fields = splitFields(line, plan.delimiter);
    if (fields.every((f) => f.trim() === '')) continue;
    const lineNo = i + 1;
    if (fields.length < plan.requiredFields) {
      throw new ImportError(`expected ${expected} numbers, found ${fields.length} field${fields.length === 1 ? '' : 's'} (a short row)`, lineNo);
    }
    for (let col = width; col < fields.length; col++) {
      if (fields[col].trim() !== '') {
        throw new ImportError(`expected ${width} columns as in the rows above, found ${fields.length} (extra value '${clip(fields[col])}')`, lineNo);
      }
    }
    if (times !== null) {
      const col = plan.timeColumn as number;
      const t = readSampleField(fields[col], fieldOptions);
      if (t === undefined) throw new ImportError(`expected ${expected} numbers, found '${clip(fields[col])}' in the time column`, lineNo);
      if (Number.isNaN(t)) throw new ImportError(invalidTimeMessage(fields[col], plan.timeFactor), lineNo);
      const ts = t * plan.timeFactor;
      const outOfRange = timeOutOfRange(ts);
      if (outOfRange !== null) throw new ImportError(outOfRange, lineNo);
      if (n > 0 && !(ts > times[n - 1])) {
        const what = ts === times[n - 1] ? 'repeats the previous time' : 'is earlier than the previous time';
        throw new ImportError(`the time ${fields[col].trim()} ${what} (times must increase)`, lineNo, ts === times[n - 1] ? 'time-repeats' : null);
      }
      times[n] = ts;
    }
    if (plan.indexColumn !== null) {
      const col = plan.indexColumn;
      const k = readSampleField(fields[col], fieldOptions);
      if (k === undefined || Number.isNaN(k) || !Number.isInteger(k)) {
        throw new ImportError(`expected ${expected} numbers, found '${clip(fields[col])}' in the index column`, lineNo);
      }
      if (n === 0) firstIndex = k;
      else if (k !== firstIndex + n) {
        throw new ImportError(`the sample index ${k} does not follow ${firstIndex + n - 1} (indices must count up by one)`, lineNo);
      }
    }
    for (let c = 0; c < nChannels; c++) {
      const ch = plan.channels[c];
      const field = fields[ch.column];
      const v = readSampleField(field, fieldOptions);
      if (v === undefined) throw new ImportError(`expected ${expected} numbers, found '${clip(field)}'`, lineNo);
      if (Number.isNaN(v)) invalidCounts[c]++;
      values[c][n] = v * ch.factor;
    }
    n++;
  }
  if (n < 2) {
    throw new ImportError('the file holds only one row of samples; at least two are needed for a time base', plan.dataStartLine);
  }
  let time: TimeBase;
  const warnings: string[] = [];
  if (times !== null) {
    const fitted = fitTimeBase(times, n, { tolerance: plan.uniformTolerance });
    time = fitted.time;
    if (fitted.warning !== null) warnings.push(fitted.warning);
  } else {
    time = { kind: 'uniform', t0: plan.t0 as number, dt: plan.dt as number, jitter: 0 };
  }
  return assembleCapture(plan, { length: n, values, invalidCounts, time, warnings }, source);
}

function clip(field: string): string {
  const t = field.trim();
  return t.length > 40 ? `${t.slice(0, 40)}…` : t;
}
