import { expect } from 'vitest';
import type { ImportedCapture } from '../../../shared/contracts/capture.ts';
import type { Truth } from './fixture-manifest.ts';

/** Compares an imported capture with the values the fixture generator wrote (the generator's truth, not the
 * importer's own output), within the rounding of the printed numbers. */
export function checkAgainstTruth(capture: ImportedCapture, truth: Truth): void {
  expect(capture.length).toBe(truth.length);
  expect(capture.channels.map((c) => c.name)).toEqual(truth.channels.map((c) => c.name));
  expect(capture.channels.map((c) => c.unit)).toEqual(truth.channels.map((c) => c.unit));
  expect(capture.channels.map((c) => c.sourceUnit)).toEqual(truth.channels.map((c) => c.sourceUnit));
  expect(capture.channels.map((c) => c.invalidCount)).toEqual(truth.channels.map((c) => c.invalidCount));
  const time = capture.time;
  const timeAt = (i: number) => (time.kind === 'uniform' ? time.t0 + i * time.dt : time.t[i]);
  expect(time.kind).toBe(truth.uniform ? 'uniform' : 'explicit');
  if (time.kind === 'uniform') {
    expect(Math.abs(time.t0 - truth.t0)).toBeLessThanOrEqual(truth.timeTolerance);
    // dt from the first and last written times: error at most 2 roundings over n − 1 intervals.
    expect(Math.abs(time.dt - truth.dt)).toBeLessThanOrEqual((2 * truth.timeTolerance) / (truth.length - 1) + 1e-12 * truth.dt);
    expect(time.jitter).toBeLessThanOrEqual(2 * truth.timeTolerance + 1e-9 * truth.dt);
  }
  for (const s of truth.samples) {
    expect(Math.abs(timeAt(s.index) - s.time)).toBeLessThanOrEqual(2 * truth.timeTolerance + 1e-9 * truth.dt);
    s.values.forEach((v, k) => {
      const got = capture.channels[k].values[s.index];
      if (v === null) expect(got).toBeNaN();
      else expect(Math.abs(got - v)).toBeLessThanOrEqual(truth.valueTolerance * (1 + 1e-9));
    });
  }
}
