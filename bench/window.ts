/**
 * `npm run bench:window`: time of one trace-window request (readWindow on the LocalDiskStore plus the JSON the
 * route sends) at random zooms and positions, on a 10-million-sample channel and on a 100 000-sample one. The
 * baseline, measured in the same run, is reading each whole raw channel once. Target: p95 ≤ 20 ms on the deep
 * record, and about the same figure on both records (window time independent of record length).
 * Figures only, no pass/fail. The channel files are written once and cached under .cache/bench/.
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { performance } from 'node:perf_hooks';
import type { ImportedCapture } from '../shared/contracts/capture.ts';
import { channelFilesSchema, type ChannelFiles } from '../server/traces/channel-files.ts';
import { readWindow, recordExtent } from '../server/traces/read-window.ts';
import { writeChannelFiles } from '../server/traces/write-channel-files.ts';
import { LocalDiskStore } from '../server/storage/local-disk-store.ts';

const REQUESTS = 500;
const POINTS = 1000;
const root = resolve(import.meta.dirname, '..');
const cacheDir = join(root, '.cache', 'bench', 'window');
const store = new LocalDiskStore(join(cacheDir, 'blobs'));

/** A gate record: 4.8 V idle, a 0.2 V pulse, noise; 10 ns sampling. Deterministic, so the cache stays valid. */
function gateRecord(length: number): ImportedCapture {
  const values = new Float32Array(length);
  let s = 20261201;
  for (let i = 0; i < length; i++) {
    s = (s * 48271) % 2147483647;
    const inPulse = i > length * 0.4 && i < length * 0.45;
    values[i] = (inPulse ? 0.2 : 4.8) + (s / 2147483647 - 0.5) * 0.05;
  }
  return {
    channels: [{ name: 'Gate A', unit: 'V', sourceUnit: 'V', values, invalidCount: 0 }],
    time: { kind: 'uniform', t0: -0.02, dt: 1e-8, jitter: 0 },
    length,
    metadata: {},
    layout: {},
    warnings: [],
  };
}

async function channelFiles(length: number): Promise<ChannelFiles> {
  const descriptorPath = join(cacheDir, `capture-${length}.json`);
  if (existsSync(descriptorPath)) {
    const files = channelFilesSchema.parse(JSON.parse(readFileSync(descriptorPath, 'utf8')));
    if (await store.exists(files.channels[0].samplesKey)) return files;
  }
  mkdirSync(cacheDir, { recursive: true });
  console.log(`writing a ${length.toLocaleString('en')}-sample channel with its pyramid to ${cacheDir} (once, then cached)…`);
  const started = performance.now();
  const files = await writeChannelFiles(store, 'bench', `capture-${length}`, gateRecord(length));
  console.log(`  written in ${((performance.now() - started) / 1000).toFixed(1)} s`);
  writeFileSync(descriptorPath, JSON.stringify(files));
  return files;
}

function percentile(sorted: number[], p: number): number {
  return sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))];
}

/** The same relative zooms and positions for both records: span from 100 samples to the whole record, log-uniform. */
function windows(seed: number): { zoom: number; position: number }[] {
  let s = seed;
  const rand = () => (s = (s * 48271) % 2147483647) / 2147483647;
  return Array.from({ length: REQUESTS }, () => ({ zoom: rand(), position: rand() }));
}

/** `maxSpanSamples`: widest window in samples (default: the whole record). */
async function run(length: number, maxSpanSamples = length) {
  const files = await channelFiles(length);
  const extent = recordExtent(files)!;
  const duration = extent.last - extent.first;
  const dt = files.time.kind === 'uniform' ? files.time.dt : 0;
  const channel = files.channels[0];

  // Baseline: the whole raw channel read once (what a window would cost without the pyramid, before any work).
  await store.readRange(channel.samplesKey, 0, length * 4); // warm the page cache, as for the windows
  const baseStart = performance.now();
  const all = await store.readRange(channel.samplesKey, 0, length * 4);
  const baselineMs = performance.now() - baseStart;
  if (all.byteLength !== length * 4) throw new Error('short read');

  const plan = windows(7);
  for (const w of plan.slice(0, 20)) await readWindow(store, files, 0, extent.first, extent.first + duration * w.zoom, POINTS);
  const times: number[] = [];
  let raw = 0;
  let bytes = 0;
  for (const { zoom, position } of plan) {
    const minSpan = 100 * dt;
    const span = minSpan * (Math.min(duration, maxSpanSamples * dt) / minSpan) ** zoom;
    const from = extent.first + position * (duration - span);
    const started = performance.now();
    const window = await readWindow(store, files, 0, from, from + span, POINTS);
    const body = JSON.stringify(window);
    times.push(performance.now() - started);
    if (window.raw) raw++;
    bytes += body.length;
  }
  times.sort((a, b) => a - b);
  return {
    length,
    levels: channel.levels.length,
    median: percentile(times, 0.5),
    p95: percentile(times, 0.95),
    max: times[times.length - 1],
    baselineMs,
    raw,
    meanKiB: bytes / REQUESTS / 1024,
  };
}

const deep = await run(10_000_000);
const short = await run(100_000);
// Same absolute spans (100 … 100 000 samples) on both records: identical work per window, only the length differs.
const deepSame = await run(10_000_000, 100_000);
const shortSame = await run(100_000, 100_000);
function report(title: string, rows: Awaited<ReturnType<typeof run>>[]) {
  console.log(title);
  for (const r of rows) {
  console.log(
    `  ${r.length.toLocaleString('en').padStart(10)} samples (${r.levels} pyramid levels): median ${r.median.toFixed(2)} ms, p95 ${r.p95.toFixed(2)} ms, max ${r.max.toFixed(2)} ms` +
      ` | baseline whole-channel read ${r.baselineMs.toFixed(2)} ms → p95 = ${((100 * r.p95) / r.baselineMs).toFixed(1)} % of it` +
      ` | ${r.raw} raw answers, ${r.meanKiB.toFixed(1)} KiB JSON each on average`,
    );
  }
  console.log(`  p95 on 10 M ÷ p95 on 100 k = ${(rows[0].p95 / rows[1].p95).toFixed(2)} (record 100× longer)`);
}
console.log('');
report(`bench:window — ${REQUESTS} windows of ${POINTS} points, random zooms from 100 samples to the whole record, random positions, LocalDiskStore`, [deep, short]);
report('same windows by absolute span (100 … 100 000 samples) on both records', [deepSame, shortSame]);
console.log(`target p95 ≤ 20 ms on the 10 M record: ${Math.max(deep.p95, deepSame.p95) <= 20 ? 'met' : 'NOT met'}`);
