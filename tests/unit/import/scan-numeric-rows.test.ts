import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readSampleField } from '../../../shared/import/read-sample-field.ts';
import { SLOT_IGNORE, SLOT_TIME, scanNumericRows, type ScanSpec } from '../../../shared/import/scan-numeric-rows.ts';
import { rowScanner, rowScannerRowsTaken, setRowScannerEnabled } from '../../../shared/import/wasm/scan-rows-wasm.ts';

const encoder = new TextEncoder();

function spec(over: Partial<ScanSpec> = {}): ScanSpec {
  return {
    delimiter: 44, decimal: 46, slots: [0], requiredFields: 1, factors: [1], timeFactor: 1,
    textSentinels: ['nan', 'over'], numericSentinels: [], expected: 1, ...over,
  };
}

/** Scans one field per line and returns the numbers read. */
function scanColumn(fields: string[], s: ScanSpec = spec()): Float64Array {
  const bytes = encoder.encode(`${fields.join('\n')}\n`);
  const out = { values: [new Float64Array(fields.length)], times: null, invalidCounts: [0] };
  const state = { row: 0, line: 1, lastTime: NaN, nextIndex: NaN };
  const stop = scanNumericRows(bytes, 0, bytes.length, s, out, state);
  if (stop !== null) throw stop.error;
  expect(state.row).toBe(fields.length);
  return out.values[0];
}

// The reference is JavaScript's own parseFloat (ECMA-262 §21.1.2.12, correctly rounded): the fast path must
// give the very same double for every spelling of every number. A magnitude at or beyond SCPI's ±9.9E+37 infinity
// mark (or a double's range) is no reading: an invalid sample, NaN (shared/import/value-limits.ts, issue 12).
const expected = (text: string) => {
  const v = parseFloat(text.replace(',', '.'));
  return Math.abs(v) < 9.9e37 ? v : NaN;
};

// Every test below runs twice: with the compiled row scanner (shared/import/wasm/, which takes the runs of plain
// rows) and with the JS scanner alone (where WebAssembly is unavailable). Both must give parseFloat's doubles.
describe.each([['compiled', true], ['JS', false]] as const)('with the %s row scanner', (_name, compiled) => {
  let was = true;
  let rowsBefore = 0;
  beforeAll(() => {
    was = setRowScannerEnabled(compiled);
    rowsBefore = rowScannerRowsTaken();
  });
  afterAll(() => {
    setRowScannerEnabled(was);
  });

  it('When the suite runs, then the compiled scanner is there (or deliberately off)', () => {
    expect(rowScanner() !== null).toBe(compiled);
  });

  describe('scanNumericRows number parsing', () => {
    it('When random doubles are printed in many formats, then every one reads back bit-identical to parseFloat', () => {
      const printed = fc.tuple(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 9 }), fc.integer({ min: 1, max: 21 }))
        .map(([x, which, digits]) => {
          switch (which) {
            case 0: return String(x);
            case 1: return x.toExponential(Math.min(digits, 20));
            case 2: return Math.abs(x) < 1e21 ? x.toFixed(Math.min(digits, 20)) : String(x);
            case 3: return x.toPrecision(digits);
            case 4: return x.toExponential(Math.min(digits, 20)).toUpperCase();
            case 5: return x.toExponential(Math.min(digits, 20)).replace(/e([0-9])/, 'e+0$1');
            case 6: return (x >= 0 ? '+' : '') + x.toPrecision(Math.min(digits, 17));
            case 7: return x.toPrecision(Math.min(digits, 17)).replace(/^(-?)0\./, '$1.');
            case 8: return `00${Math.abs(x).toExponential(6)}`;
            default: return `${x.toFixed(3)}000000`;
          }
        });
      fc.assert(fc.property(fc.array(printed, { minLength: 1, maxLength: 20 }), (fields) => {
        const got = scanColumn(fields);
        fields.forEach((f, i) => expect(Object.is(got[i], expected(f)), `${f}: ${got[i]} vs ${expected(f)}`).toBe(true));
      }), { numRuns: 400 });
    });

    it('When random digit strings (long mantissas, big exponents) are read, then they equal parseFloat to the bit', () => {
      const text = fc.stringMatching(/^[-+]?(\d{1,25}(\.\d{0,25})?|\.\d{1,25})([eE][-+]?\d{1,3})?$/);
      fc.assert(fc.property(fc.array(text, { minLength: 1, maxLength: 20 }), (fields) => {
        const got = scanColumn(fields);
        fields.forEach((f, i) => expect(Object.is(got[i], expected(f)), `${f}`).toBe(true));
      }), { numRuns: 400 });
    });

    it('When rows hold several numbers with any delimiter, then each field reads back bit-identical to parseFloat', () => {
      const delimiters = [[',', 44], [';', 59], ['\t', 9], [' ', -1]] as const;
      const field = fc.oneof(
        fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => x.toExponential(9)),
        fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }).map((x) => x.toFixed(7)),
        fc.stringMatching(/^-?\d{1,12}\.\d{1,18}$/),
      );
      fc.assert(fc.property(fc.constantFrom(...delimiters), fc.array(fc.tuple(field, field, field), { minLength: 1, maxLength: 8 }), ([text, byte], rows) => {
        const bytes = encoder.encode(rows.map((r) => r.join(text)).join('\n') + '\n');
        const out = { values: [new Float64Array(rows.length), new Float64Array(rows.length), new Float64Array(rows.length)], times: null, invalidCounts: [0, 0, 0] };
        const stop = scanNumericRows(bytes, 0, bytes.length, spec({ delimiter: byte, slots: [0, 1, 2], requiredFields: 3, factors: [1, 1, 1], expected: 3 }), out, { row: 0, line: 1, lastTime: NaN, nextIndex: NaN });
        expect(stop).toBeNull();
        rows.forEach((r, i) => r.forEach((f, k) => expect(Object.is(out.values[k][i], expected(f)), `${f}`).toBe(true)));
      }), { numRuns: 300 });
    });

    it('When numbers use a decimal comma, then they read as parseFloat of the same number with a point', () => {
      const s = spec({ delimiter: 59, decimal: 44 });
      fc.assert(fc.property(fc.array(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }), { minLength: 1, maxLength: 10 }), (xs) => {
        const fields = xs.map((x) => x.toPrecision(9).replace('.', ','));
        const got = scanColumn(fields, s);
        fields.forEach((f, i) => expect(Object.is(got[i], expected(f))).toBe(true));
      }), { numRuns: 200 });
    });

    it('When the scanner and the text path read the same field, then they agree (sentinels included)', () => {
      const options = { textSentinels: new Set(['nan', 'over']), numericSentinels: new Set<number>() };
      for (const f of ['-0', '0.000', '1e-400', '1e400', 'NaN', 'OVER', ' 2.5 ', '7.', '.5e1', '-.5E-1']) {
        const v = readSampleField(f, options) as number;
        expect(Object.is(scanColumn([f])[0], v), f).toBe(true);
      }
    });

    it('When a field is not a number, then the scan stops at its line with the exact message', () => {
      const bytes = encoder.encode('0,1,2\n1,2,3\n2,ERR,4\n');
      const out = { values: [new Float64Array(3), new Float64Array(3)], times: new Float64Array(3), invalidCounts: [0, 0] };
      const state = { row: 0, line: 2040, lastTime: NaN, nextIndex: NaN };
      const stop = scanNumericRows(bytes, 0, bytes.length, spec({ slots: [SLOT_TIME, 0, 1], requiredFields: 3, factors: [1, 1], expected: 3 }), out, state);
      expect(stop?.kind).toBe('text');
      expect(stop?.error?.message).toBe("line 2,042: expected 3 numbers, found 'ERR'");
      expect(stop?.offset).toBe(12);
      expect(state.row).toBe(2);
    });

    it('When a column is ignored, then its text is not read', () => {
      const bytes = encoder.encode('note,1.5\nmore text,2.5\n');
      const out = { values: [new Float64Array(2)], times: null, invalidCounts: [0] };
      const stop = scanNumericRows(bytes, 0, bytes.length, spec({ slots: [SLOT_IGNORE, 0], requiredFields: 2 }), out, { row: 0, line: 1, lastTime: NaN, nextIndex: NaN });
      expect(stop).toBeNull();
      expect(Array.from(out.values[0])).toEqual([1.5, 2.5]);
    });

    it('When the range does not end at a line end, then it refuses (the caller must end the last line)', () => {
      const bytes = encoder.encode('1.5');
      expect(() => scanNumericRows(bytes, 0, 3, spec(), { values: [new Float64Array(1)], times: null, invalidCounts: [0] }, { row: 0, line: 1, lastTime: NaN, nextIndex: NaN }))
        .toThrow(new RangeError('end must follow a line end (append one after the last line of a file)'));
    });
  });

  describe('scanNumericRows on rows of plain numbers (the lean loop, four digits at a time)', () => {
    const rowSpec = spec({ slots: [SLOT_TIME, 0, 1], requiredFields: 3, factors: [1, 1e-3], expected: 3 });
    const scanRows = (text: string, s: ScanSpec = rowSpec, rows = 64) => {
      const bytes = encoder.encode(text);
      const out = { values: [new Float64Array(rows), new Float64Array(rows)], times: new Float64Array(rows), invalidCounts: [0, 0] };
      const state = { row: 0, line: 1, lastTime: NaN, nextIndex: NaN };
      const stop = scanNumericRows(bytes, 0, bytes.length, s, out, state);
      return { out, state, stop };
    };

    it('When rows hold digit runs of every length around the four-byte steps, at the very end of the range too, then each field equals parseFloat to the bit', () => {
      const field = fc.stringMatching(/^-?\d{0,19}(\.\d{0,19})?([eE][-+]?\d{1,3})?$/).filter((f) => /\d/.test(f.replace(/[eE].*/, '')));
      fc.assert(fc.property(fc.array(fc.tuple(field, field), { minLength: 1, maxLength: 12 }), fc.boolean(), (rows, crlf) => {
        // The time column counts up; the channels carry the random spellings (the last row's last field ends the range).
        const text = rows.map(([a, b], i) => `${i}.5e-6,${a},${b}`).join(crlf ? '\r\n' : '\n') + (crlf ? '\r\n' : '\n');
        const { out, state, stop } = scanRows(text);
        expect(stop).toBeNull();
        expect(state.row).toBe(rows.length);
        rows.forEach(([a, b], i) => {
          expect(Object.is(out.times[i], parseFloat(`${i}.5e-6`))).toBe(true);
          expect(Object.is(out.values[0][i], expected(a)), a).toBe(true);
          expect(Object.is(out.values[1][i], expected(b) * 1e-3), b).toBe(true);
        });
      }), { numRuns: 500 });
    });

    it('When a byte just outside 0-9 sits inside a run of digits, then the row is not read as a number', () => {
      // '/' is just below '0' and ':' just above '9'; 0xff and 0xfa would carry in a careless four-byte test.
      for (const odd of ['/', ':', ' ', '\u00ff', '\u00fa', 'e', '+']) {
        for (let at = 0; at <= 8; at++) {
          const digits = '12345678';
          const f = `${digits.slice(0, at)}${odd}${digits.slice(at)}`;
          const { out, state, stop } = scanRows(`0,1.25,2\n1e-6,${f},3\n`, spec({ ...rowSpec, textSentinels: [] }));
          const v = readSampleField(f, { textSentinels: new Set(), numericSentinels: new Set() });
          if (v === undefined) {
            expect(stop?.kind, f).toBe('text');
            expect(state.row).toBe(1);
          } else {
            expect(stop, f).toBeNull();
            expect(Object.is(out.values[0][1], v), f).toBe(true);
          }
        }
      }
    });

    it('When a row is short, repeats a time or holds a sentinel, then the general loop still says so', () => {
      expect(scanRows('0,1,2\n1e-6,2\n').stop?.error?.message).toBe('line 2: expected 3 numbers, found 2 fields (a short row)');
      expect(scanRows('0,1,2\n0,2,3\n').stop?.error?.code).toBe('time-repeats');
      const sentinel = scanRows('0,1,2\n1e-6,9999,3\n2e-6,4,5\n', spec({ ...rowSpec, numericSentinels: [9999] }));
      expect(sentinel.stop).toBeNull();
      expect(Array.from(sentinel.out.values[0].subarray(0, 3))).toEqual([1, NaN, 4]);
      expect(sentinel.out.invalidCounts).toEqual([1, 0]);
    });
  });

  it('When the suite has run, then the compiled scanner took rows only when on', () => {
    if (compiled) expect(rowScannerRowsTaken() - rowsBefore).toBeGreaterThan(1000);
    else expect(rowScannerRowsTaken()).toBe(rowsBefore);
  });
});
