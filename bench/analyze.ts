/**
 * `npm run bench:analyze`: analysis time per channel on a 10-million-sample capture, as a ratio to the time the
 * importer takes to read the same file in this same run (target: analysis ≤ 25 % of import). Figures only, no
 * pass/fail. The capture is the import benchmark's (bench/lib/big-capture.ts) when that module is present;
 * otherwise an equivalent one is simulated and cached under .cache/.
 * With `--vs-numpy`: the CLI against a numpy script instead (bench/vs-numpy.ts).
 */
import { createWriteStream, existsSync, mkdirSync } from 'node:fs';
import { once } from 'node:events';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { analyzeShot } from '../shared/analysis/analyze-shot.ts';
import type { ImportedCapture } from '../shared/contracts/capture.ts';
import { simulateShot } from '../shared/simulate/simulate-shot.ts';
import { readCaptureFile } from '../worker/import/read-capture-file.ts';
import { runVsNumpy } from './vs-numpy.ts';

const SAMPLES = 10_000_000;
const RUNS = 3;
const root = resolve(import.meta.dirname, '..');

async function simulatedCapturePath(): Promise<string> {
  const dir = join(root, '.cache');
  const path = join(dir, 'bench-analyze-10M.csv');
  if (existsSync(path)) return path;
  mkdirSync(dir, { recursive: true });
  console.log(`writing ${path} (simulated shot, ${SAMPLES} samples × 2 channels; once, then cached)…`);
  // 10 ns sampling of a 600 m/s shot through gates 0.1 m apart: both pulses inside a 0.1 s-long record.
  const shot = simulateShot({ length: SAMPLES, sampleInterval: 1e-8, t0: -2e-2, arrivalTime: 2e-2, speed: 600, noiseRms: 0.02, humAmplitude: 0.02, seed: 42 });
  const out = createWriteStream(path);
  out.write('Time (s),Gate A (V),Gate B (V)\n');
  const [a, b] = shot.channels.map((c) => c.values);
  let chunk = '';
  for (let i = 0; i < SAMPLES; i++) {
    chunk += `${(shot.time.t0 + i * shot.time.dt).toExponential(8)},${a[i].toFixed(5)},${b[i].toFixed(5)}\n`;
    if (chunk.length > 1 << 20) {
      if (!out.write(chunk)) await once(out, 'drain');
      chunk = '';
    }
  }
  out.end(chunk);
  await once(out, 'finish');
  return path;
}

async function capturePath(): Promise<{ path: string; source: string; trueSpeed: number | null }> {
  const lib = join(root, 'bench', 'lib', 'big-capture.ts');
  if (existsSync(lib)) {
    const mod = (await import(pathToFileURL(lib).href)) as { ensureBigCapture?: () => unknown; BIG_CAPTURE_SHOT?: { speed?: unknown } };
    if (typeof mod.ensureBigCapture === 'function') {
      const got = (await mod.ensureBigCapture()) as unknown;
      const path = typeof got === 'string' ? got : (got as { path?: unknown })?.path;
      const speed = mod.BIG_CAPTURE_SHOT?.speed;
      if (typeof path === 'string') {
        return { path, source: 'the import benchmark capture (bench/lib/big-capture.ts)', trueSpeed: typeof speed === 'number' ? speed : null };
      }
    }
  }
  return { path: await simulatedCapturePath(), source: 'a simulated capture (bench/lib/big-capture.ts not found)', trueSpeed: 600 };
}

const median = (xs: number[]): number => [...xs].sort((p, q) => p - q)[Math.floor(xs.length / 2)];

async function main(): Promise<void> {
  const { path, source, trueSpeed } = await capturePath();
  console.log(`capture: ${path}\n  from ${source}`);
  const importTimes: number[] = [];
  let capture: ImportedCapture | null = null;
  for (let r = 0; r < RUNS; r++) {
    const t = performance.now();
    capture = await readCaptureFile(path);
    importTimes.push(performance.now() - t);
  }
  const cap = capture as ImportedCapture;
  const importMs = median(importTimes);
  console.log(`import (readCaptureFile): ${importMs.toFixed(0)} ms median of ${RUNS}; ${cap.length} samples × ${cap.channels.length} channels`);

  let perChannelTotal = 0;
  for (const ch of cap.channels) {
    const single: ImportedCapture = { ...cap, channels: [ch] };
    const times: number[] = [];
    let status = '';
    for (let r = 0; r < RUNS; r++) {
      const t = performance.now();
      const a = analyzeShot(single, { gates: [{ channel: ch.name, position: 0 }] });
      times.push(performance.now() - t);
      status = `${a.channels[0].status}, ${a.channels[0].pulses.length} pulse(s)`;
    }
    const ms = median(times);
    perChannelTotal += ms;
    console.log(`analysis of ${ch.name}: ${ms.toFixed(0)} ms median (${status}); ${(100 * ms / importMs).toFixed(1)} % of import`);
  }
  const full: number[] = [];
  let speed = '';
  for (let r = 0; r < RUNS; r++) {
    const t = performance.now();
    const a = analyzeShot(cap, { spacing: 0.1 });
    full.push(performance.now() - t);
    speed = a.speed === null ? 'no speed' : `${a.speed.value.toFixed(2)} ± ${a.speed.uncertainty.toFixed(2)} m/s`;
  }
  const fullMs = median(full);
  const truth = trueSpeed === null ? '' : ` (simulated truth ${trueSpeed} m/s)`;
  console.log(`whole shot (all channels, gates 0.1 m apart): ${fullMs.toFixed(0)} ms median → ${speed}${truth}`);
  console.log(`ratio analysis / import: ${(fullMs / importMs).toFixed(3)} (target ≤ 0.25); sum of per-channel runs ${(perChannelTotal / importMs).toFixed(3)}`);
}

if (process.argv.includes('--vs-numpy')) await runVsNumpy();
else await main();
