// Issue 12, item 12: a scope file with samples of ±1e308 or a sample interval of 1e300 s made the analysis hold
// infinities and NaN (levels, slopes) and the report 500 (pdfkit: "unsupported number: -Infinity"), or gave a speed
// of 6e-305 m/s with an uncertainty of exactly 0. The importer now keeps only numbers the arithmetic after it can
// bear (shared/import/value-limits.ts): samples at or beyond SCPI's ±9.9E+37 infinity mark are invalid samples, and
// a time base beyond ±1e12 s or finer than 1 fs is refused with the line and the reason. Every path is checked:
// the text path, the disk fast path and the stream path.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { analyzeShot } from '../../../shared/analysis/analyze-shot.ts';
import type { ImportedCapture } from '../../../shared/contracts/capture.ts';
import { ImportError } from '../../../shared/import/import-error.ts';
import { parseScopeCsv } from '../../../shared/import/parse-scope-csv.ts';
import { simulateShot } from '../../../shared/simulate/simulate-shot.ts';
import { simulatedShotToCapture } from '../../../shared/simulate/simulated-shot-to-capture.ts';
import { readCaptureFile } from '../../../worker/import/read-capture-file.ts';
import { readCaptureStream } from '../../../worker/import/read-capture-stream.ts';

const dir = mkdtempSync(path.join(tmpdir(), 'gatepost-limits-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The shot model's three gates (300 m/s, 200 ns a sample), written as a CSV with a time column. */
const model = simulatedShotToCapture(simulateShot({
  speed: 300, diameter: 0.04, sampleInterval: 2e-7, length: 4000, t0: -1e-4, arrivalTime: 1e-4, noiseRms: 0.01,
  responseTime: 1e-6, seed: 5, gatePositions: [0, 0.15, 0.3], channelNames: ['A', 'B', 'C'],
}));
const GATES = { gates: [{ channel: 'A', position: 0 }, { channel: 'B', position: 0.15 }, { channel: 'C', position: 0.3 }] };

function csv(options: { time?: (i: number) => string; sample?: (v: number) => string; preamble?: string } = {}): string {
  const { time = (i) => (-1e-4 + i * 2e-7).toPrecision(8), sample = (v) => v.toFixed(5), preamble = '' } = options;
  const lines = [`${preamble}Time (s),A (V),B (V),C (V)`];
  for (let i = 0; i < model.length; i++) lines.push([time(i), ...model.channels.map((c) => sample(c.values[i]))].join(','));
  return `${lines.join('\n')}\n`;
}

/** The same file through the three readers: pure text, the disk fast path, the upload stream. */
async function readAllWays(text: string): Promise<Array<{ how: string; capture?: ImportedCapture; error?: ImportError }>> {
  const bytes = new TextEncoder().encode(text);
  const file = path.join(dir, `f-${Math.random().toString(36).slice(2)}.csv`);
  writeFileSync(file, bytes);
  const ways: Array<[string, () => Promise<ImportedCapture> | ImportedCapture]> = [
    ['text', () => parseScopeCsv(bytes)],
    ['disk', () => readCaptureFile(file)],
    ['stream', () => readCaptureStream((async function* () { yield bytes; })(), { headBytes: 1024 })],
  ];
  const out = [];
  for (const [how, read] of ways) {
    try {
      out.push({ how, capture: await read() });
    } catch (error) {
      if (!(error instanceof ImportError)) throw error;
      out.push({ how, error });
    }
  }
  return out;
}

/** Paths of every number in `value` that is not finite (what JSON would turn into null). */
function nonFinite(value: unknown, at = ''): string[] {
  if (typeof value === 'number') return Number.isFinite(value) ? [] : [`${at}=${value}`];
  if (value === null || typeof value !== 'object' || ArrayBuffer.isView(value)) return [];
  return Object.entries(value).flatMap(([k, v]) => nonFinite(v, `${at}.${k}`));
}

describe('numbers the importer keeps are numbers the analysis can bear', () => {
  it('When a channel holds ±1e308, then those samples are invalid (NaN gaps, counted, named) and the analysis holds no infinity', async () => {
    // Channel A is +1e308 while the beam is clear and -1e308 while it is cut: the probe's file.
    const text = csv({ sample: (v) => v.toFixed(5) }).split('\n').map((line, i) => {
      if (i === 0 || line === '') return line;
      const [t, a, b, c] = line.split(',');
      return [t, Number(a) > 0.5 ? '1e308' : '-1e308', b, c].join(',');
    }).join('\n');
    for (const { how, capture, error } of await readAllWays(text)) {
      expect(error, how).toBeUndefined();
      const a = capture!.channels[0];
      expect(a.invalidCount, how).toBe(model.length);
      expect(Array.from(a.values).every(Number.isNaN), how).toBe(true);
      expect(capture!.warnings, how).toContain(`${model.length} invalid or empty samples (empty cells, NaN, overrange or clip marks, values at or beyond ±9.9e37) in A; kept as NaN gaps`);
      const results = analyzeShot(capture!, GATES);
      expect(nonFinite(results), how).toEqual([]);
    }
  });

  it('When samples sit just inside the bound (±9.8e37 V), then they are kept and the analysis still holds only finite numbers', async () => {
    const text = csv({ sample: (v) => (v > 0.5 ? '9.8e37' : '-9.8e37') });
    for (const { how, capture, error } of await readAllWays(text)) {
      expect(error, how).toBeUndefined();
      expect(capture!.channels[0].invalidCount, how).toBe(0);
      expect(nonFinite(analyzeShot(capture!, GATES)), how).toEqual([]);
    }
  });

  it('When the time column steps 1e300 s, then the file is refused at the first row beyond ±1e12 s, with the reason', async () => {
    const text = csv({ time: (i) => `${i}e300` });
    for (const { how, error } of await readAllWays(text)) {
      expect(error, how).toBeInstanceOf(ImportError);
      // Line 1 is the header, line 2 the time 0, line 3 the time 1e300.
      expect(error!.message, how).toBe('line 3: the time 1e+300 s is beyond ±1e12 s (about 31 700 years) from the trigger, which no recording spans; check the time column and its unit');
    }
  });

  it('When the metadata gives a sample interval of 1e300 s or 1e-300 s, then the file is refused naming that line', async () => {
    const body = (dt: string) => `Sample interval,${dt}\nCH1 (V),CH2 (V)\n${Array.from({ length: 50 }, (_, i) => `${i % 3},${i % 5}`).join('\n')}\n`;
    for (const { how, error } of await readAllWays(body('1e300'))) {
      expect(error!.message, how).toBe('line 1: the sample interval 1e+300 s is beyond 1e12 s (about 31 700 years), which no recording spans; check the interval and its unit');
    }
    for (const { how, error } of await readAllWays(body('1e-300'))) {
      expect(error!.message, how).toBe('line 1: the sample interval 1e-300 s is below 1e-15 s (1 fs), shorter than any digitiser samples; check the interval and its unit');
    }
  });

  it('When the time column is evenly spaced but 1e-300 s apart, then the file is refused: a step finer than 1 fs', async () => {
    const text = csv({ time: (i) => `${i}e-300` });
    for (const { how, error } of await readAllWays(text)) {
      expect(error!.message, how).toMatch(/^line 2: the sample interval [\d.]+e-300 s is below 1e-15 s \(1 fs\)/);
    }
  });

  it('When a logger writes Unix times (1.8e9 s) or a scope picoseconds, then the file is still read', async () => {
    for (const { how, capture, error } of await readAllWays(csv({ time: (i) => (1_796_000_000 + i * 0.001).toFixed(3) }))) {
      expect(error, how).toBeUndefined();
      expect(capture!.length, how).toBe(model.length);
    }
    for (const { how, capture, error } of await readAllWays(csv({ time: (i) => `${i * 5}e-12` }))) {
      expect(error, how).toBeUndefined();
      expect(capture!.time, how).toMatchObject({ kind: 'uniform' });
    }
  });
});
