// planWindow + reduceWindow against brute force: for random traces (NaN gaps included), random time bases,
// windows and column counts, every column must equal the min/max of exactly the samples it claims to cover,
// the columns must cover every sample in the window, and the raw path must return exactly the samples with
// from ≤ t0 + i·dt ≤ to.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { buildMinMaxPyramid } from '../../../shared/traces/build-min-max-pyramid.ts';
import { planWindow, type ColumnsWindowPlan } from '../../../shared/traces/plan-window.ts';
import { reduceWindow } from '../../../shared/traces/reduce-window.ts';
import { bruteMinMax, bruteUniformIndices } from './brute-force.ts';

/** The entries a plan asks for, cut from the in-memory pyramid (what read-window does with byte ranges). */
function entriesFor(values: Float64Array, levels: { pairs: Float64Array }[], plan: ColumnsWindowPlan): Float64Array {
  return plan.level === 0 ? values.subarray(plan.first, plan.end) : levels[plan.level - 1].pairs.subarray(2 * plan.first, 2 * plan.end);
}

function checkColumns(values: Float64Array, levels: { pairs: Float64Array }[], plan: ColumnsWindowPlan, t0: number, dt: number) {
  const { min, max } = reduceWindow(entriesFor(values, levels, plan), plan);
  for (let j = 0; j < plan.columns; j++) {
    const start = plan.firstSample + j * plan.samplesPerColumn;
    const [lo, hi] = bruteMinMax(values, start, start + plan.samplesPerColumn);
    expect(min[j]).toBe(lo);
    expect(max[j]).toBe(hi);
  }
  expect(plan.t0).toBe(t0 + plan.firstSample * dt);
  expect(plan.dt).toBeCloseTo(plan.samplesPerColumn * dt, 12);
}

/**
 * Traces long enough to need pyramid levels (fast-check's own arrays stay short): a seeded pseudo-random walk
 * with a few spikes and one NaN gap of random position and length (possibly several whole blocks).
 */
const traceArb = fc
  .record({
    length: fc.noBias(fc.integer({ min: 0, max: 20_000 })),
    seed: fc.integer({ min: 1, max: 2 ** 31 - 2 }),
    gapAt: fc.double({ min: 0, max: 1, noNaN: true }),
    gapLength: fc.integer({ min: 0, max: 3000 }),
  })
  .map(({ length, seed, gapAt, gapLength }) => {
    const values = new Float64Array(length);
    let state = seed;
    let walk = 0;
    for (let i = 0; i < length; i++) {
      state = (state * 48271) % 2147483647; // Park–Miller minimal standard generator
      const u = state / 2147483647;
      walk += u - 0.5;
      values[i] = u > 0.999 ? walk + 50 * (u - 0.9995) * 2000 : walk;
    }
    const start = Math.floor(gapAt * length);
    values.fill(NaN, start, Math.min(length, start + gapLength));
    return values;
  });

describe('planWindow and reduceWindow', () => {
  it('When windows, zooms and column counts are random, then columns match brute force and cover the window', () => {
    const seen = { raw: 0, samples: 0, pyramid: 0 };
    fc.assert(
      fc.property(
        traceArb,
        fc.double({ min: -1e-3, max: 1e-3, noNaN: true }),
        fc.double({ min: 1e-9, max: 1e-3, noNaN: true }),
        fc.noBias(fc.integer({ min: -200, max: 1200 })).map((x) => x / 1000),
        fc.oneof(fc.noBias(fc.integer({ min: 0, max: 1400 })).map((x) => x / 1000), fc.double({ min: 0, max: 0.01, noNaN: true })),
        fc.integer({ min: 2, max: 120 }),
        fc.integer({ min: 2, max: 16 }),
        fc.integer({ min: 1, max: 64 }),
        (values, t0, dt, a, width, points, factor, maxTopPairs) => {
          const n = values.length;
          const span = Math.max(1, n) * dt;
          const from = t0 + a * span;
          const to = from + width * span;
          const levels = buildMinMaxPyramid(values, { factor, maxTopPairs });
          const plan = planWindow({ length: n, t0, dt, from, to, points, factor, levels: levels.length });
          const inside = bruteUniformIndices(n, t0, dt, from, to);
          if (inside.length <= points) {
            seen.raw++;
            expect(plan).toEqual({ kind: 'raw', first: inside[0] ?? plan.first, end: (inside.at(-1) ?? plan.first - 1) + 1 });
            if (inside.length === 0) expect(plan).toMatchObject({ kind: 'raw' });
            return;
          }
          if (plan.kind !== 'columns') throw new Error('expected columns');
          expect(plan.columns).toBeLessThanOrEqual(points);
          // Every sample in the window is inside one of the columns; the overhang is less than one column each side.
          const firstInside = inside[0];
          const lastInside = inside.at(-1)!;
          expect(plan.firstSample).toBeLessThanOrEqual(firstInside);
          expect(firstInside - plan.firstSample).toBeLessThan(plan.samplesPerColumn);
          const coverEnd = plan.firstSample + plan.columns * plan.samplesPerColumn;
          expect(coverEnd).toBeGreaterThan(lastInside);
          expect(coverEnd - 1 - lastInside).toBeLessThan(plan.samplesPerColumn);
          // Grid anchored at sample 0.
          expect(plan.firstSample % plan.samplesPerColumn).toBe(0);
          expect(plan.blockSize).toBe(factor ** plan.level);
          // Columns are not wasted: at least (points − 1)/2 whenever the chosen level has ≥ points blocks inside.
          const blocks = Math.floor(lastInside / plan.blockSize) - Math.floor(firstInside / plan.blockSize) + 1;
          if (blocks >= points) expect(plan.columns).toBeGreaterThanOrEqual((points - 1) / 2);
          // Read cost is bounded: a finer level was refused only because it had more than factor·points blocks.
          if (plan.level > 0) {
            const finer = plan.blockSize / factor;
            expect(Math.floor(lastInside / finer) - Math.floor(firstInside / finer) + 1).toBeGreaterThan(factor * points);
          }
          checkColumns(values, levels, plan, t0, dt);
          seen[plan.level > 0 ? 'pyramid' : 'samples']++;
        },
      ),
      { numRuns: 300 },
    );
    // The random cases must have exercised all three paths, or this test proves little.
    expect(seen.raw).toBeGreaterThan(5);
    expect(seen.samples).toBeGreaterThan(5);
    expect(seen.pyramid).toBeGreaterThan(5);
  });

  it('When a 1 000 000-sample ramp is viewed whole in 1000 columns, then level 2 (256-sample blocks) is read and column j spans its analytic sample range', () => {
    // Arrange: ramp values[i] = i, t0 = −1 ms, dt = 1 µs. 1e6 samples / 1000 points: level 1 has 62 500 blocks
    // (> 16 000), level 2 has 3907 (≤ 16 000) → m = 4 blocks = 1024 samples per column, 977 columns.
    const n = 1_000_000;
    const values = new Float64Array(n);
    for (let i = 0; i < n; i++) values[i] = i;
    const levels = buildMinMaxPyramid(values);
    // Act
    const plan = planWindow({ length: n, t0: -1e-3, dt: 1e-6, from: -1, to: 1, points: 1000, levels: levels.length });
    if (plan.kind !== 'columns') throw new Error('expected columns');
    const { min, max } = reduceWindow(levels[1].pairs.subarray(2 * plan.first, 2 * plan.end), plan);
    // Assert
    expect(plan).toMatchObject({ level: 2, blockSize: 256, bucketsPerColumn: 4, columns: 977, firstSample: 0, samplesPerColumn: 1024 });
    expect(plan.t0).toBe(-1e-3);
    for (let j = 0; j < plan.columns; j++) {
      expect(min[j]).toBe(j * 1024);
      expect(max[j]).toBe(Math.min(n, (j + 1) * 1024) - 1);
    }
  });

  it('When the window is empty, before the start, past the end, narrower than one sample, or the trace has one sample, then the raw range is exact', () => {
    const base = { length: 10, t0: 0, dt: 1e-3, points: 4, levels: 0 };
    // Window before the record and past its end: nothing.
    expect(planWindow({ ...base, from: -5, to: -1e-9 })).toEqual({ kind: 'raw', first: 0, end: 0 });
    expect(planWindow({ ...base, from: 0.0091, to: 3 })).toEqual({ kind: 'raw', first: 10, end: 10 });
    // Between samples 3 and 4 (3 ms, 4 ms): narrower than one sample interval.
    expect(planWindow({ ...base, from: 0.0031, to: 0.0039 })).toEqual({ kind: 'raw', first: 4, end: 4 });
    // Zero-width window exactly on a sample: that one sample.
    expect(planWindow({ ...base, from: 0.003, to: 0.003 })).toEqual({ kind: 'raw', first: 3, end: 4 });
    // Edges inclusive: 2 ms … 5 ms is samples 2..5, which is 4 ≤ points.
    expect(planWindow({ ...base, from: 0.002, to: 0.005 })).toEqual({ kind: 'raw', first: 2, end: 6 });
    // One-sample trace, window around it.
    expect(planWindow({ ...base, length: 1, from: -1, to: 1 })).toEqual({ kind: 'raw', first: 0, end: 1 });
    // Empty trace.
    expect(planWindow({ ...base, length: 0, from: -1, to: 1 })).toEqual({ kind: 'raw', first: 0, end: 0 });
  });

  it('When the window extends before t0 and past the end with more samples than points, then columns cover the whole trace only', () => {
    // 10 samples 0..9, 3 columns wanted, no pyramid: m = ceil(10/3) = 4 → columns [0..3], [4..7], [8..9].
    const values = Float64Array.from([5, 1, 7, NaN, NaN, NaN, NaN, NaN, 2, 9]);
    const plan = planWindow({ length: 10, t0: 0, dt: 1, from: -100, to: 100, points: 3 });
    if (plan.kind !== 'columns') throw new Error('expected columns');
    const { min, max } = reduceWindow(values.subarray(plan.first, plan.end), plan);
    expect(plan).toMatchObject({ level: 0, first: 0, end: 10, columns: 3, samplesPerColumn: 4, t0: 0, dt: 4 });
    expect(Array.from(min)).toEqual([1, NaN, 2]);
    expect(Array.from(max)).toEqual([7, NaN, 9]);
  });

  it('When arguments are bad, then RangeError names the argument', () => {
    const ok = { length: 10, t0: 0, dt: 1, from: 0, to: 5, points: 4 };
    expect(() => planWindow({ ...ok, from: 6 })).toThrow(new RangeError('from must not be later than to'));
    expect(() => planWindow({ ...ok, to: NaN })).toThrow(new RangeError('from and to must be finite numbers of seconds'));
    expect(() => planWindow({ ...ok, points: 1 })).toThrow(new RangeError('points must be an integer ≥ 2'));
    expect(() => planWindow({ ...ok, dt: 0 })).toThrow(new RangeError('dt must be a finite number of seconds > 0'));
    expect(() => planWindow({ ...ok, length: -1 })).toThrow(new RangeError('length must be an integer ≥ 0'));
    const plan = planWindow({ ...ok, to: 9, points: 2 }) as ColumnsWindowPlan;
    expect(() => reduceWindow(new Float64Array(3), plan)).toThrow(/^entries must hold 10 values for entries 0\.\.9 of level 0, got 3$/);
  });
});
