import { ImportError } from './import-error.ts';
import type { CapturePlan } from './detect-capture-plan.ts';
import { invalidTimeMessage, readSampleField, type ReadSampleFieldOptions } from './read-sample-field.ts';
import { MAX_TIME_SECONDS, timeOutOfRange } from './value-limits.ts';
import type { TimeGridHull } from './time-grid-hull.ts';
import { BLOCK_BYTES, countRowScannerRows, HULL_ROOM, MAX_WASM_COLUMNS, OUTPUT_DOUBLES, rowScanner, WINDOW_BYTES, type RowScanner } from './wasm/scan-rows-wasm.ts';

/** Column roles for the scanner, one per column of the file. */
export const SLOT_IGNORE = -1;
export const SLOT_TIME = -2;
export const SLOT_INDEX = -3;

/** The part of a CapturePlan the byte scanner needs, in a form that can be posted to a worker thread. */
export interface ScanSpec {
  /** Delimiter byte, or -1 for runs of spaces and tabs. */
  delimiter: number;
  /** 46 for ".", 44 for a decimal comma. */
  decimal: number;
  /** Per column: channel number (≥ 0), SLOT_TIME, SLOT_INDEX or SLOT_IGNORE. */
  slots: number[];
  requiredFields: number;
  /** Multipliers to SI, per channel, and for the time column. */
  factors: number[];
  timeFactor: number;
  textSentinels: string[];
  numericSentinels: number[];
  /** Number of numbers a row holds, for messages. */
  expected: number;
}

/** Where the scanner writes; `values[k][row]` for channel k. `times` only when the file has a time column. */
export interface ScanOutput {
  values: Float64Array[];
  times: Float64Array | null;
  /** For a time column whose times are not kept: tracks their deviation from an even grid instead. */
  hull?: TimeGridHull | null;
  invalidCounts: number[];
}

export interface ScanState {
  /** Next row to write (index into the output arrays). */
  row: number;
  /** Line number of the next line to read (1-based, in the whole file). */
  line: number;
  /** Last time written, for the increasing-time check across calls; NaN before the first row. */
  lastTime: number;
  /** Index expected in the index column for the next row; NaN when not known yet. */
  nextIndex: number;
  /** Index read in the first row of this scan, when it started without one expected (a part of a split file). */
  firstIndex?: number;
}

export interface ScanStop {
  /** 'text': a field that is not a number (maybe a footer); the others are errors in the data. */
  kind: 'text' | 'error' | 'full';
  /** Byte offset of the start of the line that stopped the scan. */
  offset: number;
  error: ImportError | null;
}

/** Builds the scanner's spec from a plan. */
export function scanSpecFromPlan(plan: CapturePlan): ScanSpec {
  const slots = plan.columnRoles.map(() => SLOT_IGNORE);
  if (plan.timeColumn !== null) slots[plan.timeColumn] = SLOT_TIME;
  if (plan.indexColumn !== null) slots[plan.indexColumn] = SLOT_INDEX;
  plan.channels.forEach((c, k) => { slots[c.column] = k; });
  return {
    delimiter: plan.delimiter === 'whitespace' ? -1 : plan.delimiter.charCodeAt(0),
    decimal: plan.decimalComma ? 44 : 46,
    slots,
    requiredFields: plan.requiredFields,
    factors: plan.channels.map((c) => c.factor),
    timeFactor: plan.timeFactor,
    textSentinels: [...plan.fieldOptions.textSentinels],
    numericSentinels: [...plan.fieldOptions.numericSentinels],
    expected: plan.channels.length + (plan.timeColumn !== null ? 1 : 0) + (plan.indexColumn !== null ? 1 : 0),
  };
}

// Exact powers of ten up to 1e22 (the largest exactly representable in a double).
const POW10 = Array.from({ length: 23 }, (_, i) => Number(`1e${i}`));
// Largest integer below which every integer is exact in a double: 2^53 − 1.
const MAX_EXACT = 9007199254740991;
const latin1 = new TextDecoder('latin1');

/**
 * Reads plain rows of numbers straight from bytes into preallocated typed arrays: the fast path for the body of
 * a deep record, where csv-parse runs at ~19 MB/s (../shared/STACK.md) and this at several hundred.
 *
 * Numbers are parsed without making strings. A decimal with at most 15 significant digits and a power-of-ten
 * exponent of at most 22 is computed as one exact IEEE multiplication or division of two exactly representable
 * doubles, which is correctly rounded and so bit-identical to parseFloat (Clinger, "How to read floating point
 * numbers accurately", PLDI 1990, the fast path). Every other field (more digits, huge exponents, sentinels,
 * text) goes through readSampleField, the same code the text path uses.
 *
 * Reads the complete lines in bytes[start, end) (`end` must be a line end or the end of the file), and stops at
 * the first line it cannot read, returning where; the caller decides whether that is a footer or an error.
 */
export function scanNumericRows(bytes: Uint8Array, start: number, end: number, spec: ScanSpec, out: ScanOutput, state: ScanState): ScanStop | null {
  const { delimiter, decimal, slots, requiredFields, factors, timeFactor } = spec;
  const width = slots.length;
  const whitespace = delimiter === -1;
  const values = out.values;
  const times = out.times;
  const hull = out.hull ?? null;
  const hasTime = slots.includes(SLOT_TIME);
  const capacity = values.length > 0 ? values[0].length : times !== null ? times.length : 0;
  const textSentinels = new Set(spec.textSentinels);
  const numericSentinels = new Set(spec.numericSentinels);
  let minSentinel = Infinity;
  for (const s of spec.numericSentinels) minSentinel = Math.min(minSentinel, Math.abs(s));
  const fieldOptions = { decimalComma: decimal === 44, textSentinels, numericSentinels };
  let row = state.row;
  let line = state.line;
  let lastTime = state.lastTime;
  let nextIndex = state.nextIndex;
  if (end > start && bytes[end - 1] !== 10 && bytes[end - 1] !== 13) {
    throw new RangeError('end must follow a line end (append one after the last line of a file)');
  }
  let p = start;
  // The common row shape (a fixed delimiter, every column a channel or the time) first takes a lean loop below.
  let fastRows = !whitespace && width > 0 && requiredFields <= width;
  for (const slot of slots) if (slot < 0 && slot !== SLOT_TIME) fastRows = false;
  const noSentinels = numericSentinels.size === 0;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  // Runs of such rows go to the compiled scanner (./wasm/scan-rows-wasm.ts) when there is one: it takes the rows
  // this lean loop would take, with the same arithmetic, and stops at the first other row, which the loops below
  // read (and word, if it is wrong). Lines are copied into its memory a window at a time (unless `bytes` is its file
  // block already: rowScannerBlock); its values are copied out.
  const wasm = fastRows && width <= MAX_WASM_COLUMNS ? rowScanner() : null;
  const run: WasmRun = { start: 0, end: 0, base: 0, pause: 0, misses: 0, rows: 0, p: 0, lastTime: NaN, hulled: false };
  if (wasm !== null) setWasmColumns(wasm, slots, factors, timeFactor);

  while (p < end) {
    if (wasm !== null && row < capacity) {
      if (run.pause > 0) run.pause--;
      else {
        const n = scanWithWasm(wasm, run, bytes, p, end, width, delimiter, decimal, row, capacity - row, lastTime, minSentinel, times === null ? hull : null);
        if (n > 0) {
          copyWasmRows(wasm, n, width, slots, row, values, times, run.hulled ? null : hull);
          row += n;
          line += n;
          lastTime = run.lastTime;
          p = run.p;
          run.misses = 0;
        } else if (n === 0) {
          // It took none: this row is the JS loops'. After misses in a row, leave it the next 1, 3, 7, … rows too.
          run.misses++;
          run.pause = Math.min(2 ** run.misses - 1, 1023);
        }
        // Stopped at the window's end or a full output: go round again; else the row at p is the JS loops'.
        if (n < 0 || (n > 0 && (p >= run.end || run.rows === n))) continue;
      }
    }
    const lineStart = p;
    if (fastRows && row < capacity) {
      // A row of plain numbers ([-] digits [. digits] [e [sign] digits], no spaces, exactly `width` fields) with
      // the same arithmetic as the general loop. Anything else (a sign '+', spaces, a blank or short line, text, a sentinel,
      // a time that does not increase) leaves p at the line start for the general loop, which then reads the
      // line and says what is wrong; nothing is counted here before the whole row is taken.
      let q = p;
      let col = 0;
      let fastTime = NaN;
      let taken = false;
      for (;;) {
        let neg = false;
        if (bytes[q] === 45) { neg = true; q++; }
        let c: number;
        // Digits four at a time where four are there (SWAR on a little-endian 32-bit load: all four bytes are
        // '0'-'9' when each high nibble is 3 and adding 6 carries out of none; then two multiply-adds pair them
        // up), the rest one by one. Every partial mantissa is at most the final one, so a final one below 2^53
        // was built exactly.
        let mant = 0;
        const intStart = q;
        for (;;) {
          if (q + 4 <= end) {
            const v = view.getUint32(q, true);
            if (((v & 0xf0f0f0f0) | (((v + 0x06060606) & 0xf0f0f0f0) >>> 4)) === 0x33333333) {
              const d = v - 0x30303030;
              const t = (Math.imul(d, 10) + (d >>> 8)) & 0x00ff00ff;
              mant = mant * 10000 + ((t & 0xffff) * 100 + (t >>> 16));
              q += 4;
              continue;
            }
          }
          c = bytes[q];
          if ((c - 48) >>> 0 >= 10) break;
          mant = mant * 10 + (c - 48);
          q++;
        }
        let digits = q - intStart;
        let exp10 = 0;
        if (c === decimal) {
          const fracStart = ++q;
          // The integer part's digit loop again, written out: it is the hottest code of a deep import, and a helper
          // would have to hand back two numbers (the position and the mantissa) for every field.
          for (;;) {
            if (q + 4 <= end) {
              const v = view.getUint32(q, true);
              if (((v & 0xf0f0f0f0) | (((v + 0x06060606) & 0xf0f0f0f0) >>> 4)) === 0x33333333) {
                const d = v - 0x30303030;
                const t = (Math.imul(d, 10) + (d >>> 8)) & 0x00ff00ff;
                mant = mant * 10000 + ((t & 0xffff) * 100 + (t >>> 16));
                q += 4;
                continue;
              }
            }
            c = bytes[q];
            if ((c - 48) >>> 0 >= 10) break;
            mant = mant * 10 + (c - 48);
            q++;
          }
          exp10 = fracStart - q;
          digits -= exp10;
        }
        if (digits === 0) break;
        if (c === 101 || c === 69) {
          c = bytes[++q];
          let eneg = false;
          if (c === 45) { eneg = true; c = bytes[++q]; } else if (c === 43) { c = bytes[++q]; }
          let e = 0;
          const expStart = q;
          while ((c - 48) >>> 0 < 10) { if (e < 100000) e = e * 10 + (c - 48); c = bytes[++q]; }
          if (q === expStart) break;
          exp10 += eneg ? -e : e;
        }
        if (c !== delimiter && c !== 10 && c !== 13) break;
        if (mant > MAX_EXACT) break;
        let value: number;
        if (mant === 0) value = 0;
        else if (exp10 === 0) value = mant;
        else if (exp10 > 0 && exp10 <= 22) value = mant * POW10[exp10];
        else if (exp10 < 0 && exp10 >= -22) value = mant / POW10[-exp10];
        else break;
        if (neg) value = -value;
        if (!noSentinels && value !== 0 && Math.abs(value) >= minSentinel && numericSentinels.has(value)) break;
        const slot = slots[col];
        if (slot >= 0) values[slot][row] = value * factors[slot];
        else {
          fastTime = value * timeFactor;
          if (!(Math.abs(fastTime) <= MAX_TIME_SECONDS)) break;
        }
        if (c === delimiter) {
          if (++col === width) break;
          q++;
          continue;
        }
        taken = col + 1 === width;
        break;
      }
      if (taken && (!hasTime || lastTime !== lastTime || fastTime > lastTime)) {
        if (hasTime) {
          if (times !== null) times[row] = fastTime;
          else if (hull !== null) hull.push(row, fastTime);
          lastTime = fastTime;
        }
        row++;
        p = skipEol(bytes, q, end);
        line++;
        continue;
      }
    }
    // Blank line (or only spaces/tabs).
    let q = p;
    while (q < end && (bytes[q] === 32 || bytes[q] === 9)) q++;
    if (q >= end || bytes[q] === 10 || bytes[q] === 13) {
      p = skipEol(bytes, q, end);
      line++;
      continue;
    }
    if (row >= capacity) {
      state.row = row; state.line = line; state.lastTime = lastTime; state.nextIndex = nextIndex;
      return { kind: 'full', offset: lineStart, error: null };
    }
    let col = 0;
    let rowTime = NaN;
    let blank = false;
    for (;;) {
      // Skip spaces before a field (and, with whitespace delimiting, the delimiter run itself). No bounds checks
      // inside a line: the byte before `end` is a line end, and every loop below stops at one.
      if (whitespace) while (bytes[p] === 32 || bytes[p] === 9) p++;
      else while (bytes[p] === 32) p++;
      const slot = col < width ? slots[col] : SLOT_IGNORE;
      const fieldStart = p;
      let value = 0;
      let parsed = false;
      if (slot !== SLOT_IGNORE) {
        // Fast parse: [sign] digits [. digits] [e [sign] digits].
        let c = bytes[p];
        let neg = false;
        if (c === 45) { neg = true; c = bytes[++p]; } else if (c === 43) { c = bytes[++p]; }
        let mant = 0;
        let exp10 = 0;
        // Digit counts come from positions, so the digit loops do one multiply-add and one load a byte.
        const intStart = p;
        while ((c - 48) >>> 0 < 10) { mant = mant * 10 + (c - 48); c = bytes[++p]; }
        let digits = p - intStart;
        if (c === decimal) {
          const fracStart = ++p;
          c = bytes[p];
          while ((c - 48) >>> 0 < 10) { mant = mant * 10 + (c - 48); c = bytes[++p]; }
          exp10 = fracStart - p;
          digits -= exp10;
        }
        if ((c === 101 || c === 69) && digits > 0) {
          c = bytes[++p];
          let eneg = false;
          if (c === 45) { eneg = true; c = bytes[++p]; } else if (c === 43) { c = bytes[++p]; }
          let e = 0;
          let edigits = 0;
          while ((c - 48) >>> 0 < 10) { if (e < 100000) e = e * 10 + (c - 48); edigits++; c = bytes[++p]; }
          if (edigits === 0) digits = 0; // "1e" is not a number: let the slow path refuse it
          exp10 += eneg ? -e : e;
        }
        if (!whitespace) while (c === 32) c = bytes[++p];
        // Every partial mantissa is at most the final one, so a final one below 2^53 was built exactly.
        if (digits > 0 && mant <= MAX_EXACT && (c === delimiter || c === 10 || c === 13 || (whitespace && (c === 32 || c === 9)))) {
          if (mant === 0) value = 0;
          else if (exp10 === 0) value = mant;
          else if (exp10 > 0 && exp10 <= 22) value = mant * POW10[exp10];
          else if (exp10 < 0 && exp10 >= -22) value = mant / POW10[-exp10];
          else value = NaN; // outside the exact fast path
          if (value === value) {
            parsed = true;
            if (neg) value = -value;
          }
        }
      }
      // Fields the fast parse did not take: out of line, so the hot loop stays small for the optimizer.
      let fieldEnd = p;
      if (!parsed) {
        const odd = readOddField(bytes, fieldStart, lineStart, end, delimiter, whitespace, slot !== SLOT_IGNORE || col >= width, col >= width, fieldOptions);
        p = fieldEnd = odd.end;
        if (odd.kind === ODD_VALUE) {
          value = odd.value;
          parsed = true;
        } else if (odd.kind === ODD_BLANK) {
          blank = true;
          break;
        } else if (odd.kind === ODD_EXTRA) {
          return failAt(state, row, line, lastTime, nextIndex, lineStart, `expected ${width} columns as in the rows above, found more (extra value '${clip(odd.text)}')`);
        } else if (odd.kind === ODD_TEXT) {
          state.row = row; state.line = line; state.lastTime = lastTime; state.nextIndex = nextIndex;
          return {
            kind: 'text',
            offset: lineStart,
            error: new ImportError(`expected ${spec.expected} numbers, found '${clip(odd.text)}'${slot === SLOT_TIME ? ' in the time column' : slot === SLOT_INDEX ? ' in the index column' : ''}`, line),
          };
        }
      } else if (value !== 0 && Math.abs(value) >= minSentinel && numericSentinels.has(value)) {
        value = NaN;
      }
      if (parsed) {
        if (slot >= 0) {
          if (value !== value) out.invalidCounts[slot]++;
          values[slot][row] = value * factors[slot];
        } else if (slot === SLOT_TIME) {
          if (value !== value) return failAt(state, row, line, lastTime, nextIndex, lineStart, invalidTimeMessage(latin1.decode(bytes.subarray(fieldStart, fieldEnd)), timeFactor));
          rowTime = value * timeFactor;
          const outOfRange = timeOutOfRange(rowTime);
          if (outOfRange !== null) return failAt(state, row, line, lastTime, nextIndex, lineStart, outOfRange);
        } else if (slot === SLOT_INDEX) {
          if (!Number.isInteger(value)) return failAt(state, row, line, lastTime, nextIndex, lineStart, `expected ${spec.expected} numbers, found '${clip(latin1.decode(bytes.subarray(fieldStart, fieldEnd)))}' in the index column`);
          if (nextIndex !== nextIndex) state.firstIndex = value;
          else if (value !== nextIndex) {
            return failAt(state, row, line, lastTime, nextIndex, lineStart, `the sample index ${value} does not follow ${nextIndex - 1} (indices must count up by one)`);
          }
          nextIndex = value + 1;
        }
      }
      // Move past the delimiter, or end the line.
      const c = bytes[p];
      if (c === 10 || c === 13) break;
      if (whitespace) {
        while (bytes[p] === 32 || bytes[p] === 9) p++;
        if (bytes[p] === 10 || bytes[p] === 13) break;
      } else {
        p++;
      }
      col++;
    }
    if (blank) {
      p = skipEol(bytes, p, end);
      line++;
      continue;
    }
    const fields = col + 1;
    if (fields < requiredFields) {
      return failAt(state, row, line, lastTime, nextIndex, lineStart, `expected ${spec.expected} numbers, found ${fields} field${fields === 1 ? '' : 's'} (a short row)`);
    }
    if (hasTime) {
      if (lastTime === lastTime) {
        if (!(rowTime > lastTime)) {
          const what = rowTime === lastTime ? 'repeats the previous time' : 'is earlier than the previous time';
          return failAt(state, row, line, lastTime, nextIndex, lineStart, `the time ${rowTime} s ${what} (times must increase)`, rowTime === lastTime ? 'time-repeats' : null);
        }
      }
      if (times !== null) times[row] = rowTime;
      else if (hull !== null) hull.push(row, rowTime);
      lastTime = rowTime;
    }
    row++;
    p = skipEol(bytes, p, end);
    line++;
  }
  state.row = row; state.line = line; state.lastTime = lastTime; state.nextIndex = nextIndex;
  return null;
}

interface WasmRun {
  /** Bytes [start, end) of `bytes` are in the scanner's memory from address `base` (its input window, or where
   * they are when `bytes` is its file block). */
  start: number;
  end: number;
  base: number;
  /** Rows left to the JS loops before the compiled scanner is tried again. */
  pause: number;
  misses: number;
  /** Of the last call: the most rows it could take, where it stopped, the last time. */
  rows: number;
  p: number;
  lastTime: number;
  /** The last call pushed the times on the hull itself. */
  hulled: boolean;
}

function setWasmColumns(wasm: RowScanner, slots: number[], factors: number[], timeFactor: number): void {
  const width = slots.length;
  for (let c = 0; c < width; c++) {
    const slot = slots[c];
    wasm.f64[(wasm.columns >> 3) + c] = slot >= 0 ? factors[slot] : timeFactor;
    wasm.i32[((wasm.columns + width * 8) >> 2) + c] = slot === SLOT_TIME ? 1 : 0;
  }
}

/** Rows the compiled scanner took from p (run.p: where it stopped), or −1 when the window had to move first and
 * holds no complete line (a line longer than the window: the JS loops read it). */
function scanWithWasm(
  wasm: RowScanner, run: WasmRun, bytes: Uint8Array, p: number, end: number, width: number, delimiter: number, decimal: number,
  row: number, room: number, lastTime: number, minSentinel: number, hull: TimeGridHull | null,
): number {
  if (wasm.block !== 0 && bytes.buffer === wasm.u8.buffer && bytes.byteOffset >= wasm.block && bytes.byteOffset + bytes.length <= wasm.block + BLOCK_BYTES) {
    // The bytes are in the scanner's file block already (rowScannerBlock): every complete line up to `end` at once.
    run.start = p;
    run.end = end;
    run.base = bytes.byteOffset + p;
  } else if (p < run.start || p >= run.end || run.base !== wasm.input) {
    // Fill the window with the complete lines from p: up to the last LF, or a CR not followed by an LF, in it.
    const limit = Math.min(end, p + WINDOW_BYTES);
    let j = limit - 1;
    while (j >= p && !(bytes[j] === 10 || (bytes[j] === 13 && (j + 1 >= end || bytes[j + 1] !== 10)))) j--;
    if (j < p) {
      run.start = run.end = 0;
      run.pause = 1;
      return -1;
    }
    wasm.u8.set(bytes.subarray(p, j + 1), wasm.input);
    run.start = p;
    run.end = j + 1;
    run.base = wasm.input;
  }
  const stride = Math.floor(OUTPUT_DOUBLES / width);
  run.rows = Math.min(stride, room);
  // The hull's few vertices go in and out around the call (when they fit; else JS pushes the times).
  run.hulled = hull !== null && hull.saveTo(wasm.f64, wasm.hull >> 3, HULL_ROOM);
  const [upper, lower] = run.hulled ? (hull as TimeGridHull).counts : [0, 0];
  const n = wasm.scan(
    run.base + (p - run.start), run.base + (run.end - run.start), width, delimiter, decimal, wasm.columns, wasm.output, stride, run.rows,
    lastTime, minSentinel, run.hulled ? wasm.hull : 0, HULL_ROOM, upper, lower, row, run.hulled ? (hull as TimeGridHull).t0 : 0, run.hulled ? (hull as TimeGridHull).dtHint : 0,
  );
  if (run.hulled) (hull as TimeGridHull).loadFrom(wasm.f64, wasm.hull >> 3, HULL_ROOM, wasm.upperAfter(), wasm.lowerAfter());
  run.p = run.start + (wasm.stopAt() - run.base);
  run.lastTime = wasm.lastTimeAfter();
  countRowScannerRows(n);
  return n;
}

function copyWasmRows(wasm: RowScanner, n: number, width: number, slots: number[], row: number, values: Float64Array[], times: Float64Array | null, hull: TimeGridHull | null): void {
  const stride = Math.floor(OUTPUT_DOUBLES / width);
  const base = wasm.output >> 3;
  for (let c = 0; c < width; c++) {
    const from = base + c * stride;
    const slot = slots[c];
    if (slot >= 0) values[slot].set(wasm.f64.subarray(from, from + n), row);
    else if (times !== null) times.set(wasm.f64.subarray(from, from + n), row);
    else if (hull !== null) for (let i = 0; i < n; i++) hull.push(row + i, wasm.f64[from + i]);
  }
}

const ODD_SKIP = 0;
const ODD_VALUE = 1;
const ODD_BLANK = 2;
const ODD_EXTRA = 3;
const ODD_TEXT = 4;

/** Finds the end of a field the fast parse did not take and says what it is: skipped (an ignored column), a
 * value (long mantissas, huge exponents, sentinels: through readSampleField, as the text path), the first empty
 * field of a line of only delimiters (blank), a non-empty field past the row's width, or text. */
function readOddField(
  bytes: Uint8Array, fieldStart: number, lineStart: number, end: number, delimiter: number, whitespace: boolean,
  read: boolean, extra: boolean, fieldOptions: ReadSampleFieldOptions,
): { end: number; kind: number; value: number; text: string } {
  let fieldEnd = fieldStart;
  for (;;) {
    const c = bytes[fieldEnd];
    if (c === 10 || c === 13 || (whitespace ? c === 32 || c === 9 : c === delimiter)) break;
    fieldEnd++;
  }
  if (!read) return { end: fieldEnd, kind: ODD_SKIP, value: 0, text: '' };
  const text = latin1.decode(bytes.subarray(fieldStart, fieldEnd));
  if (extra) return { end: fieldEnd, kind: text.trim() === '' ? ODD_SKIP : ODD_EXTRA, value: 0, text };
  // A line of only delimiters counts as blank, as in the text path; an empty field among numbers is a gap.
  if (text.trim() === '' && restIsEmpty(bytes, lineStart, end, delimiter)) return { end: skipToEol(bytes, fieldStart, end), kind: ODD_BLANK, value: 0, text };
  const v = readSampleField(text, fieldOptions);
  if (v !== undefined) return { end: fieldEnd, kind: ODD_VALUE, value: v, text };
  return { end: fieldEnd, kind: ODD_TEXT, value: 0, text };
}

// Outside the scan loop on purpose: a closure over row/line would move them out of registers in V8.
function failAt(state: ScanState, row: number, line: number, lastTime: number, nextIndex: number, lineStart: number, message: string, code: 'time-repeats' | null = null): ScanStop {
  state.row = row;
  state.line = line;
  state.lastTime = lastTime;
  state.nextIndex = nextIndex;
  return { kind: 'error', offset: lineStart, error: new ImportError(message, line, code) };
}

function skipEol(bytes: Uint8Array, p: number, end: number): number {
  if (p < end && bytes[p] === 13) p++;
  if (p < end && bytes[p] === 10) p++;
  return p;
}

function skipToEol(bytes: Uint8Array, p: number, end: number): number {
  while (p < end && bytes[p] !== 10 && bytes[p] !== 13) p++;
  return p;
}

function restIsEmpty(bytes: Uint8Array, p: number, end: number, delimiter: number): boolean {
  for (; p < end && bytes[p] !== 10 && bytes[p] !== 13; p++) {
    const c = bytes[p];
    if (c !== 32 && c !== 9 && c !== delimiter) return false;
  }
  return true;
}

function clip(text: string): string {
  const t = text.trim();
  return t.length > 40 ? `${t.slice(0, 40)}…` : t;
}
