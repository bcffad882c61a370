// Explicit (uneven) time bases: binary-search range and per-time-column min/max, against brute force.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { explicitSampleRange } from '../../../shared/traces/explicit-sample-range.ts';
import { reduceExplicitWindow } from '../../../shared/traces/reduce-explicit-window.ts';

function timesFrom(steps: number[]): Float64Array {
  const t = new Float64Array(steps.length);
  let acc = -1e-3;
  for (let i = 0; i < steps.length; i++) {
    acc += steps[i];
    t[i] = acc;
  }
  return t;
}

describe('explicitSampleRange and reduceExplicitWindow', () => {
  it('When times are random and increasing, then the range holds exactly the samples with from ≤ t ≤ to', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 1e-9, max: 1e-4, noNaN: true }), { maxLength: 500 }),
        fc.double({ min: -2e-3, max: 0.06, noNaN: true }),
        fc.double({ min: 0, max: 0.06, noNaN: true }),
        (steps, from, width) => {
          const t = timesFrom(steps);
          const to = from + width;
          const { first, end } = explicitSampleRange(t, from, to);
          const inside = Array.from(t.keys()).filter((i) => t[i] >= from && t[i] <= to);
          expect(end - first).toBe(inside.length);
          if (inside.length) expect(first).toBe(inside[0]);
        },
      ),
      { numRuns: 200 },
    );
  });

  it('When samples are reduced to time columns, then each column holds the min/max of the samples whose time falls in it', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: 1e-6, max: 1e-4, noNaN: true }), fc.oneof(fc.double({ min: -5, max: 5, noNaN: true }), fc.constant(NaN))), { minLength: 1, maxLength: 400 }),
        fc.integer({ min: 1, max: 50 }),
        (pairs, points) => {
          const t = timesFrom(pairs.map((p) => p[0]));
          const v = Float64Array.from(pairs.map((p) => p[1]));
          const from = t[0];
          const to = t[t.length - 1];
          const r = reduceExplicitWindow(t, v, from, to, points);
          const dt = (to - from) / points;
          for (let j = 0; j < points; j++) {
            const members = Array.from(t.keys()).filter((i) => {
              const col = dt > 0 ? Math.min(points - 1, Math.floor((t[i] - from) / dt)) : 0;
              return col === j && !Number.isNaN(v[i]);
            });
            const vals = members.map((i) => v[i]);
            expect(r.min[j]).toBe(vals.length ? Math.min(...vals) : NaN);
            expect(r.max[j]).toBe(vals.length ? Math.max(...vals) : NaN);
          }
        },
      ),
      { numRuns: 150 },
    );
  });

  it('When the window is outside the record or narrower than one sample gap, then the range is empty', () => {
    const t = Float64Array.from([0, 1e-6, 3e-6, 7e-6]);
    expect(explicitSampleRange(t, -1, -0.5)).toEqual({ first: 0, end: 0 });
    expect(explicitSampleRange(t, 1, 2)).toEqual({ first: 4, end: 4 });
    expect(explicitSampleRange(t, 4e-6, 6e-6)).toEqual({ first: 3, end: 3 });
    expect(explicitSampleRange(t, 1e-6, 3e-6)).toEqual({ first: 1, end: 3 });
    expect(explicitSampleRange(new Float64Array(0), 0, 1)).toEqual({ first: 0, end: 0 });
    expect(() => explicitSampleRange(t, 2, 1)).toThrow(new RangeError('from must not be later than to'));
  });
});
