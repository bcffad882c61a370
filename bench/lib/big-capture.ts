/**
 * The deep record the benchmarks read: 10 million rows of time and two gate channels (~390 MB of CSV), written
 * once with the fixture generator's plain-time layout from the shot model and cached in .cache/bench/
 * (git-ignored). Shared by bench/import.ts and bench/analyze.ts.
 */
import { createWriteStream, existsSync, mkdirSync, renameSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeCaptureLayout } from '../../fixtures/lib/write-capture-layout.ts';
import { simulateShot } from '../../shared/simulate/simulate-shot.ts';

export interface BigCaptureOptions {
  /** Rows (samples per channel). @default 10_000_000 */
  rows?: number;
  /** Folder of the cached file. @default <repo>/.cache/bench */
  dir?: string;
}

/** What the big capture holds, for checks by the benchmarks. */
export const BIG_CAPTURE_SHOT = { speed: 305, gatePositions: [0, 0.1], t0: -1e-3, dt: 1e-8, noiseRms: 0.02, seed: 2026 } as const;

/**
 * Returns the path of the big capture, writing it first if it is not cached yet (about a minute).
 * The file name carries the row count so a different size never reuses a stale file.
 */
export async function ensureBigCapture(options: BigCaptureOptions = {}): Promise<string> {
  const { rows = 10_000_000, dir = join(dirname(fileURLToPath(import.meta.url)), '../../.cache/bench') } = options;
  if (!Number.isInteger(rows) || rows < 2) throw new RangeError('rows must be an integer >= 2');
  const path = join(dir, `big-capture-${rows}.csv`);
  if (existsSync(path) && statSync(path).size > 0) return path;
  mkdirSync(dir, { recursive: true });
  const { speed, gatePositions, t0, dt, noiseRms, seed } = BIG_CAPTURE_SHOT;
  const shot = simulateShot({
    speed, gatePositions: [...gatePositions], channelNames: ['Gate A', 'Gate B'], arrivalTime: 2e-4,
    sampleInterval: dt, length: rows, t0, noiseRms, responseTime: 1e-6, seed,
  });
  const partial = `${path}.partial`;
  const out = createWriteStream(partial);
  const chunk = 100_000;
  for (let start = 0; start < rows; start += chunk) {
    const end = Math.min(rows, start + chunk);
    const written = writeCaptureLayout('plain-time', {
      t0: t0 + start * dt,
      dt,
      channels: shot.channels.map((c) => ({ name: c.name, values: c.values.subarray(start, end) })),
    }, { sampleIndices: [] });
    let bytes = written.bytes;
    if (start > 0) bytes = bytes.subarray(bytes.indexOf(10) + 1); // the header once only
    if (!out.write(bytes)) await new Promise<void>((resolve) => out.once('drain', () => resolve()));
  }
  await new Promise<void>((resolve, reject) => out.end((error?: Error | null) => (error ? reject(error) : resolve())));
  renameSync(partial, path);
  return path;
}
