import { readFileSync } from 'node:fs';
import { scanNumericRows, type ScanSpec } from '../../shared/import/scan-numeric-rows.ts';
const b = new Uint8Array(readFileSync('.cache/bench/big-capture-10000000.csv').subarray(0, 100_000_000));
const start = b.indexOf(10) + 1;
const end = b.lastIndexOf(10) + 1;
const spec: ScanSpec = { delimiter: 44, decimal: 46, slots: [-2, 0, 1], requiredFields: 3, factors: [1, 1], timeFactor: 1, textSentinels: ['nan'], numericSentinels: [9.91e37], expected: 3 };
const n = 3_100_000;
for (let r = 0; r < 4; r++) {
  const out = { values: [new Float64Array(n), new Float64Array(n)], times: new Float64Array(n), invalidCounts: [0, 0] };
  const state = { row: 0, line: 2, lastTime: NaN, nextIndex: NaN };
  const t = performance.now();
  const stop = scanNumericRows(b, start, end, spec, out, state);
  const s = (performance.now() - t) / 1000;
  console.log(stop?.error?.message, state.row, ((end - start) / 1e6 / s).toFixed(0), 'MB/s');
}
function simple(b: Uint8Array, start: number, end: number, out: Float64Array[]) {
  let p = start, row = 0, col = 0;
  while (p < end) {
    let c = b[p]; let neg = false;
    if (c === 45) { neg = true; c = b[++p]; }
    let m = 0, e = 0;
    while (c >= 48 && c <= 57) { m = m * 10 + (c - 48); c = b[++p]; }
    if (c === 46) { c = b[++p]; while (c >= 48 && c <= 57) { m = m * 10 + (c - 48); e--; c = b[++p]; } }
    if (c === 101 || c === 69) { c = b[++p]; let en = false; if (c === 45) { en = true; c = b[++p]; } else if (c === 43) c = b[++p]; let x = 0; while (c >= 48 && c <= 57) { x = x * 10 + (c - 48); c = b[++p]; } e += en ? -x : x; }
    let v = e === 0 ? m : e > 0 ? m * POW[e] : m / POW[-e];
    if (neg) v = -v;
    out[col][row] = v;
    if (c === 44) { col++; p++; } else { col = 0; row++; p++; }
  }
  return row;
}
const POW = Array.from({ length: 23 }, (_, i) => Number(`1e${i}`));
for (let r = 0; r < 3; r++) {
  const o = [new Float64Array(n), new Float64Array(n), new Float64Array(n)];
  const t = performance.now(); const rows = simple(b, start, end, o); const s = (performance.now() - t) / 1000;
  console.log('simple', rows, ((end - start) / 1e6 / s).toFixed(0), 'MB/s');
}
for (let r = 0; r < 3; r++) { const t = performance.now(); let x = 0; for (let i = start; i < end; i++) x += b[i]; const s = (performance.now() - t) / 1000; console.log('sum loop', x > 0, ((end - start) / 1e6 / s).toFixed(0), 'MB/s'); }
