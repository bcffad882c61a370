import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterEach, describe, expect, it } from 'vitest';
import { SLOT_TIME, scanNumericRows, type ScanSpec, type ScanState, type ScanStop } from '../../../shared/import/scan-numeric-rows.ts';
import { TimeGridHull } from '../../../shared/import/time-grid-hull.ts';
import { BLOCK_BYTES, HULL_ROOM, OUTPUT_DOUBLES, rowScanner, rowScannerBlock, rowScannerRowsTaken, setRowScannerEnabled, WINDOW_BYTES } from '../../../shared/import/wasm/scan-rows-wasm.ts';
import { compileScanWasm, renderGenerated, repoRoot, SCAN_WASM_GENERATED } from '../../../scripts/lib/compile-scan-wasm.ts';

const encoder = new TextEncoder();

function spec(over: Partial<ScanSpec> = {}): ScanSpec {
  return {
    delimiter: 44, decimal: 46, slots: [SLOT_TIME, 0, 1], requiredFields: 3, factors: [1, 1e-3], timeFactor: 1e-6,
    textSentinels: ['nan', 'over'], numericSentinels: [], expected: 3, ...over,
  };
}

interface Result {
  values: Float64Array[];
  times: Float64Array | null;
  hull: TimeGridHull | null;
  invalidCounts: number[];
  state: ScanState;
  stops: (Omit<ScanStop, 'error'> & { message: string | null; code: string | null; line: number | null })[];
  wasmRows: number;
}

/** Scans `text` in blocks of `block` bytes (cut at line ends, as the disk reader does), resuming after stops
 * that are text or errors the way a caller that skips a bad line would, with the compiled scanner on or off. */
function scan(text: string | Uint8Array, s: ScanSpec, compiled: boolean, options: { block?: number; capacity?: number; hull?: boolean; inScannerBlock?: boolean } = {}): Result {
  let bytes = typeof text === 'string' ? encoder.encode(text) : text;
  if (options.inScannerBlock) {
    // The bytes where the disk reader reads them: in the scanner's own memory (rowScannerBlock), scanned in place.
    const block = rowScannerBlock(bytes.length);
    expect(block).not.toBeNull();
    (block as Uint8Array).set(bytes);
    bytes = block as Uint8Array;
  }
  const capacity = options.capacity ?? bytes.length;
  const channels = s.factors.length;
  const hasTime = s.slots.includes(SLOT_TIME);
  const out = {
    values: Array.from({ length: channels }, () => new Float64Array(capacity)),
    times: hasTime && !options.hull ? new Float64Array(capacity) : null,
    hull: hasTime && options.hull ? new TimeGridHull(0, 1e-6) : null,
    invalidCounts: Array.from({ length: channels }, () => 0),
  };
  const state: ScanState = { row: 0, line: 1, lastTime: NaN, nextIndex: NaN };
  const stops: Result['stops'] = [];
  const was = setRowScannerEnabled(compiled);
  const before = rowScannerRowsTaken();
  try {
    let p = 0;
    while (p < bytes.length) {
      let end = Math.min(bytes.length, p + (options.block ?? bytes.length));
      while (end > p && bytes[end - 1] !== 10) end--;
      if (end === p) end = bytes.length;
      let at = p;
      for (;;) {
        const stop = scanNumericRows(bytes, at, end, s, out, state);
        if (stop === null) break;
        stops.push({ kind: stop.kind, offset: stop.offset, message: stop.error?.message ?? null, code: stop.error?.code ?? null, line: stop.error?.line ?? null });
        if (stop.kind === 'full') return { ...out, state, stops, wasmRows: rowScannerRowsTaken() - before };
        // Skip the line it stopped at, as a reader that reports and goes on would.
        at = stop.offset;
        while (at < end && bytes[at] !== 10 && bytes[at] !== 13) at++;
        if (bytes[at] === 13) at++;
        if (at < end && bytes[at] === 10) at++;
        state.line++;
        if (at >= end) break;
      }
      p = end;
    }
  } finally {
    setRowScannerEnabled(was);
  }
  return { ...out, state, stops, wasmRows: rowScannerRowsTaken() - before };
}

/** The two scans agree to the bit: every value, the state, every stop with its message, line and code. */
function expectSame(a: Result, b: Result): void {
  expect(b.state).toEqual(a.state);
  expect(b.stops).toEqual(a.stops);
  expect(b.invalidCounts).toEqual(a.invalidCounts);
  const same = (x: Float64Array, y: Float64Array) => {
    expect(x.length).toBe(y.length);
    for (let i = 0; i < a.state.row; i++) if (!Object.is(x[i], y[i])) expect(`row ${i}: ${y[i]}`).toBe(`row ${i}: ${x[i]}`);
  };
  a.values.forEach((v, k) => same(v, b.values[k]));
  if (a.times !== null && b.times !== null) same(a.times, b.times);
  if (a.hull !== null && b.hull !== null) expect(b.hull.toData()).toEqual(a.hull.toData());
}

function both(text: string | Uint8Array, s: ScanSpec, options: Parameters<typeof scan>[3] = {}): { js: Result; wasm: Result } {
  const js = scan(text, s, false, options);
  const wasm = scan(text, s, true, options);
  expectSame(js, wasm);
  // And with the bytes in the scanner's file block (no copy into its window), when they fit in one.
  const length = typeof text === 'string' ? encoder.encode(text).length : text.length;
  if (length > 0 && length <= BLOCK_BYTES) {
    const inPlace = scan(text, s, true, { ...options, inScannerBlock: true });
    expectSame(js, inPlace);
    expect(inPlace.wasmRows).toBe(wasm.wasmRows);
  }
  return { js, wasm };
}

afterEach(() => {
  setRowScannerEnabled(true);
});

describe('compiled row scanner (shared/import/wasm)', () => {
  it('When the committed module is compared with its AssemblyScript source compiled again, then the bytes are the same', async () => {
    const binary = await compileScanWasm();
    expect(readFileSync(join(repoRoot, SCAN_WASM_GENERATED), 'utf8'), 'run npm run build:wasm and commit the result').toBe(renderGenerated(binary));
  }, 60_000);

  it('When WebAssembly is there, then the scanner loads and takes plain rows', () => {
    expect(rowScanner()).not.toBeNull();
    const { wasm } = both('0,1.5,2\n1,2.5,3\n2,3.5,4\n', spec());
    expect(wasm.wasmRows).toBe(3);
  });

  // Edges of the exact fast path (Clinger 1990: mantissa below 2^53, power of ten up to 1e22, the largest exact
  // double power of ten) and of the forms it reads; the JS scanner and parseFloat are the reference.
  const edges = [
    '9007199254740991', '9007199254740992', '9007199254740993', '900719925474099.1', '90071992547409.93', '12345678901234567',
    '1.2345678901234567', '0.1', '0.3', '1e22', '1e23', '1e-22', '1e-23', '9007199254740991e22', '9007199254740991e-22', '4.9e-324',
    '1.7976931348623157e308', '-0', '-0.0', '-0e5', '0e-400', '.5', '5.', '-.5', '1.e3', '1E+3', '1e+0003', '1e-0003', '1e00004',
    '00000000000000000001.5', '000000000000000000000000001', '0.00000000000000000000000000012', '12345678', '123456789',
    '1234567.8', '12345678.9', '1.23456789012345', '-9.999900000e-4', '4.783753', '99999999999999999999',
  ];

  it('When fields sit at the edges of the exact fast path, then both scanners give the same doubles as parseFloat', () => {
    const rows = edges.map((f, i) => `${i},${f},${f}`).join('\n') + '\n';
    const { wasm } = both(rows, spec({ factors: [1, 1], timeFactor: 1 }));
    expect(wasm.stops).toEqual([]);
    // At or beyond SCPI's ±9.9e37 infinity mark a value is no reading: NaN (shared/import/value-limits.ts).
    const expected = (f: string) => (Math.abs(parseFloat(f)) < 9.9e37 ? parseFloat(f) : NaN);
    edges.forEach((f, i) => {
      expect(Object.is(wasm.values[0][i], expected(f)), f).toBe(true);
      expect(Object.is(wasm.values[1][i], expected(f)), f).toBe(true);
    });
    expect(wasm.wasmRows).toBeGreaterThan(10); // the others (more digits, exponents out of range) are read by JS
  });

  // A grammar of rows: mostly plain numbers, sometimes every odd form a capture holds (signs, spaces, sentinels,
  // text, short and long rows, blank lines, CRLF, repeated or falling times).
  const digits = (n: number) => fc.stringMatching(new RegExp(`^\\d{0,${n}}$`));
  const plain = fc.tuple(fc.boolean(), digits(18), fc.option(digits(18), { nil: undefined }), fc.option(fc.tuple(fc.constantFrom('e', 'E'), fc.constantFrom('', '-', '+'), fc.integer({ min: 0, max: 400 })), { nil: undefined }))
    .map(([neg, int, frac, exp]) => `${neg ? '-' : ''}${int}${frac !== undefined ? `.${frac}` : ''}${exp ? `${exp[0]}${exp[1]}${exp[2]}` : ''}`);
  const odd = fc.constantFrom('', ' 1.5', '+2', '1.5 ', 'NaN', 'OVER', '9.91E+37', '1e', '-', '.', 'e5', '1,5', 'x', '1.2.3', '\u00ff1', '1:', '0/');
  const field = fc.oneof({ weight: 12, arbitrary: plain }, { weight: 1, arbitrary: odd });
  const row = fc.tuple(fc.integer({ min: -1, max: 3 }), field, field, fc.oneof({ weight: 20, arbitrary: fc.constant('') }, { weight: 1, arbitrary: fc.constantFrom(',', ',7', '\n', ',\n') }));

  it('When random rows mix plain numbers with odd forms, then both scanners give the same values, stops, messages, lines and codes', () => {
    fc.assert(fc.property(fc.array(row, { minLength: 1, maxLength: 40 }), fc.constantFrom('\n', '\r\n', '\r'), fc.integer({ min: 8, max: 200 }), fc.boolean(), (rows, eol, block, hull) => {
      let t = 0;
      const text = rows.map(([step, a, b, tail]) => {
        t += step;
        return `${t}e-1,${a},${b}${tail}`;
      }).join(eol) + eol;
      both(text, spec({ numericSentinels: [9.91e37] }), { block, hull });
      both(text, spec({ slots: [0, SLOT_TIME, 1], numericSentinels: [9.91e37] }), { hull });
    }), { numRuns: 400 });
  });

  // Rows printed with one format, as a scope writes them: the compiled scanner reads a row laid out as the one before
  // it from that row's layout (its "shape"). Mostly the same layout with random digits, now and then another
  // (a sign that comes or goes, one digit more, an odd form, an exponent out of the exact range, a sentinel,
  // a time that repeats or goes back, a blank line, a sentinel, another line end): every such row must end up where
  // the field-by-field reading puts it.
  const layout = fc.record({
    neg: fc.constantFrom('', '-', '?'),
    int: fc.integer({ min: 0, max: 9 }),
    frac: fc.option(fc.integer({ min: 0, max: 9 }), { nil: undefined }),
    exp: fc.option(fc.tuple(fc.constantFrom('e', 'E'), fc.constantFrom('', '-', '+'), fc.integer({ min: 1, max: 4 })), { nil: undefined }),
  }).filter((l) => l.int + (l.frac ?? 0) > 0 && l.int + (l.frac ?? 0) + (l.frac === undefined ? 0 : 1) + (l.exp ? 2 + l.exp[2] : 0) < 15);
  const printed = (l: { neg: string; int: number; frac?: number; exp?: [string, string, number] }, digit: () => string, big: boolean) => {
    const run = (n: number) => Array.from({ length: n }, digit).join('');
    const neg = l.neg === '?' ? (digit() < '5' ? '-' : '') : l.neg;
    // Exponents of one digit but for the leading zeros (always within the exact range), or all nines (beyond it, mostly).
    const exp = l.exp ? `${l.exp[0]}${l.exp[1]}${big ? '9'.repeat(l.exp[2]) : '0'.repeat(l.exp[2] - 1) + digit()}` : '';
    return `${neg}${run(l.int)}${l.frac === undefined ? '' : `.${run(l.frac)}`}${exp}`;
  };
  it('When runs of rows share one printed layout, then reading them by layout gives what reading field by field gives', () => {
    fc.assert(fc.property(
      fc.array(layout, { minLength: 2, maxLength: 4 }), fc.integer({ min: 0, max: 2 ** 31 - 1 }), fc.constantFrom('\n', '\r\n', '\r'), fc.boolean(), fc.integer({ min: 8, max: 400 }), fc.boolean(),
      (layouts, seed, eol, hull, block, smallSentinel) => {
        let state = seed >>> 0;
        const rand = () => (state = (Math.imul(state, 1103515245) + 12345) >>> 0) / 2 ** 32;
        const digit = () => String(Math.floor(rand() * 10));
        const lines: string[] = [];
        let t = 100000;
        for (let i = 0; i < 300; i++) {
          const odd = rand();
          t += odd < 0.01 ? 0 : odd < 0.02 ? -1 : 1;
          const fields = layouts.map((l, k) => printed(odd < 0.05 && k === 1 ? layouts[(k + 1) % layouts.length] : l, digit, odd >= 0.05 && odd < 0.06));
          let line = `${t},${fields.join(',')}`;
          if (odd >= 0.06 && odd < 0.07) line = line.replace(',', ', ');
          else if (odd >= 0.07 && odd < 0.075) line = `${t},9.91E+37${line.slice(line.indexOf(',', line.indexOf(',') + 1))}`;
          else if (odd >= 0.075 && odd < 0.08) line = '';
          else if (odd >= 0.08 && odd < 0.085) line = `${line},1`;
          // Now and then another line end (a CRLF after lone CRs, where the LF must not start a row of its own).
          lines.push(line + (odd >= 0.085 && odd < 0.1 ? ['\n', '\r\n', '\r'][Math.floor(rand() * 3)] : eol));
        }
        const text = lines.join('');
        // A sentinel of 5 makes every value from 5 up one the compiled scanner must leave to JS to decide.
        const sentinels = smallSentinel ? [9.91e37, 5] : [9.91e37];
        const s = spec({ slots: [SLOT_TIME, ...layouts.map((_, k) => k)], factors: layouts.map(() => 1), requiredFields: layouts.length + 1, expected: layouts.length + 1, numericSentinels: sentinels });
        const { wasm } = both(text, s, { block, hull });
        if (eol !== '\r' && !smallSentinel) expect(wasm.wasmRows).toBeGreaterThan(0);
      },
    ), { numRuns: 300 });
  });

  it('When a row laid out as the one before holds a sentinel or a time out of range, then it is left to JS as field by field', () => {
    // "5" is laid out as "3": only its value makes it the sentinel (NaN, counted). A time of 1.5e+12 s is laid out
    // as 1.4e+12 s but beyond the ±1e12 s the importer accepts (shared/import/value-limits.ts): an error on its line.
    const sentinel = both('1,3,1\n2,3,1\n3,5,1\n4,3,1\n', spec({ factors: [1, 1], timeFactor: 1, numericSentinels: [5] }));
    expect(Array.from(sentinel.wasm.values[0].subarray(0, 4))).toEqual([3, 3, NaN, 3]);
    expect(sentinel.wasm.invalidCounts).toEqual([1, 0]);
    const time = both('1.1e+11,1,1\n1.2e+11,1,1\n1.5e+12,1,1\n', spec({ factors: [1, 1], timeFactor: 1 }));
    expect(time.wasm.stops.map((x) => x.line)).toEqual([3]);
    expect(time.wasm.wasmRows).toBe(2);
  });

  it('When a long run of one layout breaks at or near the edge of a batch, then every row ends up where the field-by-field reading puts it', () => {
    // The compiled scanner reads up to 256 rows of one shape as a batch, column after column, then checks their
    // times; a row that breaks the run (a value only its digits make odd) must end the batch just before it.
    const rows = 1100;
    const at = [0, 1, 254, 255, 256, 257, 511, 512, 513, 1099];
    // Exponents of two digits, as many scopes print them ("1.500000e+12", "1.250000e+00").
    const exp2 = (x: number) => x.toExponential(6).replace(/e([+-])(\d)$/, 'e$10$2');
    const line = (i: number, t: number, a: string) => `${exp2(t)},${a},${(-4 - (i % 5) * 0.001).toFixed(6)},${exp2(1.25 + (i % 3))}`;
    const breaks: Record<string, (i: number, t: number) => string> = {
      'a sentinel': (i, t) => line(i, t, '5.000000'),
      'a repeated time': (i, t) => line(i, t - 1e-4, '1.000000'),
      'a time that goes back': (i, t) => line(i, t - 2e-4, '1.000000'),
      'an exponent beyond the exact range': (i, t) => line(i, t, '1.000000').replace(/e\+0\d$/, 'e+99'),
      'a time beyond ±1e12 s': (i) => line(i, 1.5e12, '1.000000'),
    };
    for (const [what, broken] of Object.entries(breaks)) {
      // A sentinel of 5 only where it is the break: any value from 5 up would otherwise end the batch first.
      const s = spec({ slots: [SLOT_TIME, 0, 1, 2], factors: [1, 1e-3, 1], timeFactor: 1, requiredFields: 4, expected: 4, numericSentinels: what === 'a sentinel' ? [5] : [] });
      for (const i0 of at) {
        const text = Array.from({ length: rows }, (_, i) => {
          const t = 1 + i * 1e-4;
          return i === i0 ? broken(i, t) : line(i, t, (0.1 + (i % 7) * 0.1).toFixed(6));
        }).join('\n') + '\n';
        for (const hull of [false, true]) {
          const { js, wasm } = both(text, s, { hull });
          expect(js.state.row, `${what} at row ${i0}`).toBeGreaterThan(rows - 2);
          expect(wasm.wasmRows, `${what} at row ${i0}`).toBeGreaterThan(rows - 5);
        }
      }
    }
  });

  it('When the time grid hull fills up in the middle of a batch, then the compiled scanner stops there and JS carries on', () => {
    // Times bent away from the even grid (r_i = −i²·1e-12 s, concave): every sample is a vertex of the upper hull,
    // so the module's HULL_ROOM (4096) vertices fill at row 4096. Row 4000 is printed otherwise (a wider value), so
    // a batch starts at 4001 and the hull fills in its middle.
    const n = 6000;
    const text = Array.from({ length: n }, (_, i) => `${(i * 1e-6 - i * i * 1e-12).toExponential(9)},${i === 4000 ? '12.25' : (i % 9) * 0.5 + 0.25},1.5`).join('\n') + '\n';
    const { wasm } = both(text, spec({ factors: [1, 1], timeFactor: 1 }), { hull: true });
    expect(wasm.state.row).toBe(n);
    expect(wasm.hull?.counts[0]).toBe(n);
    // The module itself, called once on all the rows: it stops before the row that would overflow the hull.
    const bytes = encoder.encode(text);
    const module = rowScanner() as NonNullable<ReturnType<typeof rowScanner>>;
    module.u8.set(bytes, module.input);
    [1, 1, 1].forEach((f, c) => { module.f64[(module.columns >> 3) + c] = f; module.i32[((module.columns + 24) >> 2) + c] = c === 0 ? 1 : 0; });
    const rows = module.scan(module.input, module.input + bytes.length, 3, 44, 46, module.columns, module.output, Math.floor(OUTPUT_DOUBLES / 3), n, NaN, Infinity, module.hull, HULL_ROOM, 0, 0, 0, 0, 1e-6);
    expect([rows, module.upperAfter()]).toEqual([HULL_ROOM, HULL_ROOM]);
  });

  it('When the rows run past the input window and the output block, then nothing is lost or doubled at the seams', () => {
    // Lines of 27 to 40-odd bytes, ~1.6 MiB: several refills of the 1 MiB window, and output blocks of
    // OUTPUT_DOUBLES / 3 rows; a CRLF line end may fall on the window's last byte.
    const n = Math.ceil((WINDOW_BYTES * 1.6) / 30);
    expect(n).toBeGreaterThan(OUTPUT_DOUBLES / 3);
    const lines: string[] = [];
    let seed = 12345;
    const next = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) / 2 ** 32;
    for (let i = 0; i < n; i++) lines.push(`${(i * 1e-3).toExponential(9)},${(next() * 10 - 5).toFixed(6)},${(next() * 2e4 - 1e4).toPrecision(1 + Math.floor(next() * 16))}`);
    for (const eol of ['\n', '\r\n']) {
      const text = lines.join(eol) + eol;
      const { wasm } = both(text, spec({ factors: [1, 1], timeFactor: 1 }));
      expect(wasm.state.row).toBe(n);
      // All but the rows with a 16-digit mantissa above 2^53 (left to the JS scanner's exact reader).
      expect(wasm.wasmRows).toBeGreaterThan(n * 0.95);
      lines.forEach((l, i) => {
        const [t, a, b] = l.split(',').map(Number);
        if (!Object.is(wasm.times?.[i], t) || !Object.is(wasm.values[0][i], a) || !Object.is(wasm.values[1][i], b)) expect(l).toBe(`row ${i} as read`);
      });
      // The same rows in the disk reader's blocks, and with a bad row every so often: line numbers stay right.
      both(text, spec({ factors: [1, 1], timeFactor: 1 }), { block: 300_000, hull: true });
      const bad = lines.map((l, i) => (i % 50_001 === 50_000 ? l.replace(',', ',ERR') : l)).join(eol) + eol;
      const { wasm: w2 } = both(bad, spec({ factors: [1, 1], timeFactor: 1 }));
      expect(w2.stops.map((s) => s.line)).toEqual([50_001]);
      expect(w2.stops[0].message).toMatch(/^line 50,001: expected 3 numbers, found 'ERR/);
    }
  });

  it('When the output is about to be full, then the compiled scanner stops at the capacity and the JS scanner says so', () => {
    const text = Array.from({ length: 10 }, (_, i) => `${i},${i}.5,${i}.25`).join('\n') + '\n';
    const { wasm } = both(text, spec(), { capacity: 7 });
    expect(wasm.state.row).toBe(7);
    expect(wasm.stops.map((s) => s.kind)).toEqual(['full']);
  });

  it('When every row is one the compiled scanner leaves to JS, then the results are the same and it soon stops trying', () => {
    const text = Array.from({ length: 5000 }, (_, i) => `${i}, +${i}.5,${i}`).join('\n') + '\n';
    const { wasm } = both(text, spec());
    expect(wasm.state.row).toBe(5000);
    expect(wasm.wasmRows).toBe(0);
  });
});
