import { SCAN_ROWS_WASM_BASE64 } from './scan-rows-wasm.generated.ts';

/**
 * The compiled row scanner (WebAssembly, from AssemblyScript: scan-rows.as.ts beside this file) that scanNumericRows hands
 * runs of plain rows to.
 *
 * Why the project has its own compiled code here, against the rule "prefer well-known packages": a measured need,
 * speed. Reading a deep record's numbers is most of a deep import and of the analyze CLI (issue 13: the CLI is to
 * run in 0.2× numpy's time on the 10-million-sample capture, and the JS byte scanner ran at ~300 MB per
 * CPU-second); no package on the registry parses delimited decimal text into typed arrays bit-identically to
 * parseFloat with the importer's line-numbered refusals. The figures are in shared/import/README.md.
 *
 * The bytes are compiled in, base64 (a generated module, committed; `npm run build:wasm` rebuilds it and a unit
 * test checks it matches its source), so the same import works unchanged under tsx, in the esbuild bundle of
 * dist/node, in worker threads and in the Vite bundle of the browser, without a file lookup or a loader plugin.
 * The module is about 5.7 KB: over the 4 KB that browsers compile synchronously on a page's main thread, where
 * rowScanner() then compiles it in the background and the JS scanner reads until it is ready (workers and Node
 * compile it at once). Squeezed under 4 KB (shrinkLevel 1, less inlining) it read 4–7 % slower in an A/B run.
 */
export interface RowScanner {
  /** Rows taken; see the AssemblyScript source for the arguments. */
  scan(
    start: number, end: number, width: number, delimiter: number, decimal: number, columns: number, out: number, stride: number, maxRows: number,
    lastTime: number, minSentinel: number, hull: number, hullRoom: number, upper: number, lower: number, firstRow: number, t0: number, dtHint: number,
  ): number;
  stopAt(): number;
  lastTimeAfter(): number;
  upperAfter(): number;
  lowerAfter(): number;
  /** The module's memory as bytes, doubles and 32-bit integers (made again when rowScannerBlock grows it, once). */
  u8: Uint8Array;
  f64: Float64Array;
  i32: Int32Array;
  /** Byte offsets of the input window (WINDOW_BYTES, then padding), the column parameters, the output and the
   * time grid's hull vertices (4 × HULL_ROOM doubles). */
  input: number;
  columns: number;
  output: number;
  hull: number;
  /** Byte offset of the file block (see rowScannerBlock), 0 until one is asked for. */
  block: number;
}

/** Largest file block a reader can have the bytes read straight into (see rowScannerBlock). */
export const BLOCK_BYTES = (4 << 20) + 1;
/** Input window: complete lines are copied here a window at a time. */
export const WINDOW_BYTES = 1 << 20;
/** Output doubles (row values, column after column): rows per call = OUTPUT_DOUBLES / columns. */
export const OUTPUT_DOUBLES = 1 << 17;
/** Widest row handed to the compiled scanner; wider files take the JS scanner. */
export const MAX_WASM_COLUMNS = 1024;
/** Vertices of each time-grid hull the compiled scanner can hold (a few for rounding noise; more make JS take over). */
export const HULL_ROOM = 4096;
const PADDING = 64;

let scanner: RowScanner | null | undefined;
let enabled = true;
let rowsTaken = 0;

function setUp(instance: WebAssembly.Instance): RowScanner {
  const exports = instance.exports as unknown as {
    memory: WebAssembly.Memory; heapBase(): number; scan: RowScanner['scan']; stopAt(): number; lastTimeAfter(): number;
    upperAfter(): number; lowerAfter(): number;
  };
  const input = (exports.heapBase() + 63) & ~63;
  const columns = input + WINDOW_BYTES + PADDING;
  const output = columns + MAX_WASM_COLUMNS * 12 + PADDING;
  const hull = output + OUTPUT_DOUBLES * 8 + PADDING;
  const top = hull + HULL_ROOM * 32;
  const pages = Math.ceil(top / 65536) - exports.memory.buffer.byteLength / 65536;
  if (pages > 0) exports.memory.grow(pages);
  const buffer = exports.memory.buffer;
  memory = exports.memory;
  return {
    scan: exports.scan, stopAt: exports.stopAt, lastTimeAfter: exports.lastTimeAfter, upperAfter: exports.upperAfter, lowerAfter: exports.lowerAfter,
    u8: new Uint8Array(buffer), f64: new Float64Array(buffer), i32: new Int32Array(buffer), input, columns, output, hull, block: 0,
  };
}

let memory: WebAssembly.Memory | null = null;

/**
 * A block of `bytes` bytes (at most BLOCK_BYTES) inside the scanner's memory, for a reader to read a file's bytes
 * straight into: scanNumericRows then hands its lines to the scanner where they are, without copying them into the
 * input window (the disk reader's 330 MB capture: one memory copy less of every byte). Null without a scanner.
 * The memory grows once, on the first call in a thread; the same block is returned to every later call, so one
 * reader at a time may use it (the disk reader's scan is synchronous).
 */
export function rowScannerBlock(bytes: number): Uint8Array | null {
  if (!(Number.isInteger(bytes) && bytes > 0 && bytes <= BLOCK_BYTES)) throw new RangeError(`a block holds 1 to ${BLOCK_BYTES} bytes`);
  const s = rowScanner();
  if (s === null || memory === null) return null;
  if (s.block === 0) {
    const block = (s.hull + HULL_ROOM * 32 + PADDING + 63) & ~63;
    const top = block + BLOCK_BYTES + PADDING;
    const pages = Math.ceil(top / 65536) - memory.buffer.byteLength / 65536;
    if (pages > 0) memory.grow(pages);
    // Growing replaced the buffer: the views are made again (no view of the old one is held elsewhere).
    const buffer = memory.buffer;
    s.u8 = new Uint8Array(buffer);
    s.f64 = new Float64Array(buffer);
    s.i32 = new Int32Array(buffer);
    s.block = block;
  }
  return s.u8.subarray(s.block, s.block + bytes);
}

function decode(base64: string): Uint8Array {
  const text = atob(base64);
  const bytes = new Uint8Array(text.length);
  for (let i = 0; i < text.length; i++) bytes[i] = text.charCodeAt(i);
  return bytes;
}

/**
 * The scanner of this thread, or null: turned off (tests), or WebAssembly unavailable or refused here (then the JS
 * scanner does all, with the same results). Compiled on first use, synchronously; where that is refused it is
 * compiled in the background and used from when it is ready.
 */
export function rowScanner(): RowScanner | null {
  if (!enabled) return null;
  if (scanner !== undefined) return scanner;
  scanner = null;
  if (typeof WebAssembly !== 'object') return null;
  const bytes = decode(SCAN_ROWS_WASM_BASE64);
  try {
    scanner = setUp(new WebAssembly.Instance(new WebAssembly.Module(bytes as BufferSource), {}));
  } catch {
    WebAssembly.instantiate(bytes as BufferSource, {}).then((r) => { scanner = setUp(r.instance); }, () => { /* the JS scanner stays */ });
  }
  return scanner;
}

/** Turns the compiled scanner off or on in this thread (tests run both paths); returns the previous setting. */
export function setRowScannerEnabled(on: boolean): boolean {
  const was = enabled;
  enabled = on;
  return was;
}

/** Rows the compiled scanner has taken in this thread, for tests that must know it ran. */
export function rowScannerRowsTaken(): number {
  return rowsTaken;
}

export function countRowScannerRows(rows: number): void {
  rowsTaken += rows;
}
