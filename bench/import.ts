/**
 * Import benchmark: reads the 10-million-row capture (bench/lib/big-capture.ts) from disk into typed arrays and
 * prints MB/s, rows/s, peak RSS against the size of the output arrays, and the time as a ratio to `wc -l` on the
 * same file in the same run (the baseline: the fastest anything can walk the file's lines).
 * Each reading runs in a fresh child process so its peak RSS is its own. Run: npm run bench:import
 * With `--in-memory`: the reader for bytes already in memory (parseScopeCsv, the browser's and scripts' reader) on
 * the same file, against its text path (parseScopeCsvText, the reader before issue 13) on the file's first 20 MB
 * in the same run. Target (issue 13): ≥ 100 MB/s.
 * Both modes also read with the compiled row scanner off (shared/import/wasm/: in-process for --in-memory; for the
 * disk reader the child runs with `--no-expose-wasm`, as where WebAssembly is unavailable, so its thread reads with
 * the JS scanner too), alternating, and print the compiled scanner's time as a ratio to the JS scanner's.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { readFileSync, statSync } from 'node:fs';
import { availableParallelism, loadavg } from 'node:os';
import { fileURLToPath } from 'node:url';
import { parseScopeCsv, parseScopeCsvText } from '../shared/import/parse-scope-csv.ts';
import { rowScanner, setRowScannerEnabled } from '../shared/import/wasm/scan-rows-wasm.ts';
import { readCaptureFile } from '../worker/import/read-capture-file.ts';
import { ensureBigCapture } from './lib/big-capture.ts';

interface Measurement {
  seconds: number;
  rows: number;
  channels: number;
  outputBytes: number;
  peakRssBytes: number;
  startRssBytes: number;
  timeKind: string;
  cpuSeconds: number;
  compiled: boolean;
}

async function measure(path: string, threads: number): Promise<void> {
  const startRssBytes = process.memoryUsage().rss;
  const cpu = process.cpuUsage();
  const t = performance.now();
  const capture = await readCaptureFile(path, { threads });
  const seconds = (performance.now() - t) / 1000;
  const used = process.cpuUsage(cpu);
  let outputBytes = capture.channels.reduce((sum, c) => sum + c.values.byteLength, 0);
  if (capture.time.kind === 'explicit') outputBytes += capture.time.t.byteLength;
  const m: Measurement = {
    seconds, rows: capture.length, channels: capture.channels.length, outputBytes,
    peakRssBytes: process.resourceUsage().maxRSS * 1024, startRssBytes, timeKind: capture.time.kind,
    cpuSeconds: (used.user + used.system) / 1e6, compiled: rowScanner() !== null,
  };
  process.stdout.write(`${JSON.stringify(m)}\n`);
}

function run(path: string, threads: number, compiled = true): Measurement {
  const flags = compiled ? [] : ['--no-expose-wasm'];
  const child = spawnSync(process.execPath, [...flags, ...process.execArgv, fileURLToPath(import.meta.url), '--measure', path, String(threads)], { encoding: 'utf8' });
  if (child.status !== 0) throw new Error(`measurement failed: ${child.stderr}`);
  return JSON.parse(child.stdout.trim().split('\n').pop() as string);
}

function timeWc(path: string): number {
  const t = performance.now();
  execFileSync('wc', ['-l', path], { encoding: 'utf8' });
  return (performance.now() - t) / 1000;
}

async function main(): Promise<void> {
  const path = await ensureBigCapture();
  const bytes = statSync(path).size;
  const mb = bytes / 1e6;
  execFileSync('cat', [path], { maxBuffer: 1 << 30, stdio: ['ignore', 'ignore', 'ignore'] }); // into the page cache
  const wc = Math.min(timeWc(path), timeWc(path), timeWc(path));
  console.log(`file: ${path} (${mb.toFixed(0)} MB), page cache warm`);
  console.log(`baseline wc -l: ${wc.toFixed(3)} s (${(mb / wc).toFixed(0)} MB/s); load average ${loadavg().map((l) => l.toFixed(1)).join(' ')} on ${availableParallelism()} cores`);
  for (const threads of [1, 2]) {
    const runs: Measurement[] = [];
    const jsRuns: Measurement[] = [];
    for (let r = 0; r < 3; r++) {
      runs.push(run(path, threads));
      jsRuns.push(run(path, threads, false));
    }
    if (!runs.every((r) => r.compiled) || jsRuns.some((r) => r.compiled)) throw new Error('the compiled scanner was not on and off as asked');
    const best = runs.reduce((a, b) => (b.seconds < a.seconds ? b : a));
    const jsBest = jsRuns.reduce((a, b) => (b.seconds < a.seconds ? b : a));
    const peak = Math.max(...runs.map((r) => r.peakRssBytes));
    const minCpu = (rs: Measurement[]) => Math.min(...rs.map((r) => r.cpuSeconds));
    console.log(
      `readCaptureFile, ${threads} thread${threads > 1 ? 's' : ''}, compiled row scanner: ${best.seconds.toFixed(3)} s (best of ${runs.length}), `
      + `${(mb / best.seconds).toFixed(0)} MB/s, ${(best.rows / best.seconds / 1e6).toFixed(2)} M rows/s, `
      + `peak RSS ${(peak / 1e6).toFixed(0)} MB = ${(peak / best.outputBytes).toFixed(2)}× the output arrays `
      + `(${(best.outputBytes / 1e6).toFixed(0)} MB: ${best.channels} channels × ${best.rows} rows, time ${best.timeKind}; `
      + `process at start ${(best.startRssBytes / 1e6).toFixed(0)} MB), ${(best.seconds / wc).toFixed(1)}× wc -l; `
      + `CPU ${minCpu(runs).toFixed(2)} s, least of ${runs.length} (${(mb / minCpu(runs)).toFixed(0)} MB per CPU-second)`,
    );
    console.log(
      `  JS scanner alone (--no-expose-wasm), same runs alternating: ${jsBest.seconds.toFixed(3)} s (best of ${jsRuns.length}), `
      + `${(mb / jsBest.seconds).toFixed(0)} MB/s, peak RSS ${(Math.max(...jsRuns.map((r) => r.peakRssBytes)) / jsBest.outputBytes).toFixed(2)}× the output arrays, CPU ${minCpu(jsRuns).toFixed(2)} s (${(mb / minCpu(jsRuns)).toFixed(0)} MB per CPU-second); `
      + `compiled / JS: ${(best.seconds / jsBest.seconds).toFixed(2)}× the time, ${(minCpu(runs) / minCpu(jsRuns)).toFixed(2)}× the CPU`,
    );
  }
}

async function inMemory(): Promise<void> {
  const path = await ensureBigCapture();
  const bytes = new Uint8Array(readFileSync(path));
  let cut = 20e6;
  while (bytes[cut - 1] !== 10) cut--;
  const head = bytes.slice(0, cut);
  const time = (read: () => { length: number }) => {
    const t = performance.now();
    const rows = read().length;
    return { seconds: (performance.now() - t) / 1000, rows };
  };
  const load = loadavg().map((l) => l.toFixed(1)).join(' ');
  const fast: number[] = [];
  const jsFast: number[] = [];
  const text: number[] = [];
  let rows = 0;
  for (let r = 0; r < 3; r++) {
    const f = time(() => parseScopeCsv(bytes));
    fast.push(f.seconds);
    rows = f.rows;
    setRowScannerEnabled(false);
    jsFast.push(time(() => parseScopeCsv(bytes)).seconds);
    setRowScannerEnabled(true);
    text.push(time(() => parseScopeCsvText(head)).seconds);
  }
  const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[1];
  const fastMbs = bytes.length / 1e6 / median(fast);
  const textMbs = head.length / 1e6 / median(text);
  console.log(`file: ${path} (${(bytes.length / 1e6).toFixed(0)} MB, ${rows} rows) held in memory; load average ${load} on ${availableParallelism()} cores`);
  console.log(`parseScopeCsv (byte scanner, compiled row scanner${rowScanner() === null ? ' UNAVAILABLE' : ''}), whole file, median of 3: ${median(fast).toFixed(2)} s, ${fastMbs.toFixed(0)} MB/s (target ≥ 100 MB/s)`);
  console.log(`parseScopeCsv with the JS scanner alone, alternating: ${median(jsFast).toFixed(2)} s, ${(bytes.length / 1e6 / median(jsFast)).toFixed(0)} MB/s; compiled / JS: ${(median(fast) / median(jsFast)).toFixed(2)}× the time`);
  console.log(`parseScopeCsvText (text path, the reader before), first ${(head.length / 1e6).toFixed(0)} MB, median of 3: ${median(text).toFixed(2)} s, ${textMbs.toFixed(1)} MB/s`);
  console.log(`ratio scanner / text path: ${(fastMbs / textMbs).toFixed(1)}× the throughput; load average after ${loadavg().map((l) => l.toFixed(1)).join(' ')}`);
}

if (process.argv[2] === '--measure') await measure(process.argv[3], Number(process.argv[4]));
else if (process.argv.includes('--in-memory')) await inMemory();
else await main();
