/**
 * `npm run bench:scan`: the byte scanner alone (scanNumericRows) on the 10-million-row capture held in memory, in the
 * disk reader's 4 MiB blocks, with the evenly spaced time column tracked on a TimeGridHull as the disk reader does:
 * the compiled row scanner (shared/import/wasm/) against the JS scanner alone, alternating in one process, CPU time
 * (MB per CPU-second), best of 5 each. No file reading, thread start or assembly of the capture: the scan only.
 */
import { readFileSync } from 'node:fs';
import { availableParallelism, loadavg } from 'node:os';
import { scanNumericRows, SLOT_TIME, type ScanSpec } from '../shared/import/scan-numeric-rows.ts';
import { TimeGridHull } from '../shared/import/time-grid-hull.ts';
import { rowScanner, setRowScannerEnabled } from '../shared/import/wasm/scan-rows-wasm.ts';
import { ensureBigCapture } from './lib/big-capture.ts';

const ROUNDS = 5;
const BLOCK = 4 << 20;
const bytes = readFileSync(await ensureBigCapture());
const start = bytes.indexOf(10) + 1; // after the header row
const mb = (bytes.length - start) / 1e6;
const spec: ScanSpec = {
  delimiter: 44, decimal: 46, slots: [SLOT_TIME, 0, 1], requiredFields: 3, factors: [1, 1], timeFactor: 1,
  textSentinels: [], numericSentinels: [], expected: 3,
};
const rows = bytes.length / 20; // more than enough: the shortest row is over 20 bytes
const values = [new Float64Array(rows), new Float64Array(rows)];

function scanOnce(): { cpu: number; rows: number; hull: string } {
  const out = { values, times: null, hull: new TimeGridHull(-1e-3, 1e-8), invalidCounts: [0, 0] };
  const state = { row: 0, line: 2, lastTime: NaN, nextIndex: NaN };
  const used = process.cpuUsage();
  for (let p = start; p < bytes.length;) {
    let end = Math.min(bytes.length, p + BLOCK);
    while (bytes[end - 1] !== 10) end--;
    const stop = scanNumericRows(bytes, p, end, spec, out, state);
    if (stop !== null) throw new Error(`the scan stopped: ${stop.error?.message ?? stop.kind}`);
    p = end;
  }
  const cpu = process.cpuUsage(used);
  return { cpu: (cpu.user + cpu.system) / 1e6, rows: state.row, hull: JSON.stringify(out.hull.toData()) };
}

const compiled: number[] = [];
const js: number[] = [];
let same = true;
const load = loadavg().map((l) => l.toFixed(1)).join(' ');
for (let r = 0; r < ROUNDS; r++) {
  setRowScannerEnabled(true);
  const a = scanOnce();
  const first = values.map((v) => v.slice(0, a.rows));
  setRowScannerEnabled(false);
  const b = scanOnce();
  compiled.push(a.cpu);
  js.push(b.cpu);
  same &&= a.rows === b.rows && a.hull === b.hull && first.every((v, k) => Buffer.compare(Buffer.from(v.buffer), Buffer.from(values[k].buffer, 0, v.byteLength)) === 0);
}
setRowScannerEnabled(true);
const best = (xs: number[]) => Math.min(...xs);
console.log(`file: ${(bytes.length / 1e6).toFixed(0)} MB held in memory, ${ROUNDS} rounds alternating; load average ${load} on ${availableParallelism()} cores`);
console.log(`compiled row scanner${rowScanner() === null ? ' (UNAVAILABLE: the JS scanner ran)' : ''}: ${best(compiled).toFixed(3)} CPU-s (best of ${ROUNDS}), ${(mb / best(compiled)).toFixed(0)} MB per CPU-second`);
console.log(`JS scanner alone: ${best(js).toFixed(3)} CPU-s, ${(mb / best(js)).toFixed(0)} MB per CPU-second`);
console.log(`compiled / JS: ${(best(compiled) / best(js)).toFixed(2)}× the CPU; same values and hull in both: ${same ? 'yes' : 'NO'}`);
