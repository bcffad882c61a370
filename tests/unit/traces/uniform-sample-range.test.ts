// uniformSampleRange at window edges that fall on (or one ulp beside) a sample time, where the division
// (from − t0)/dt rounds to the wrong side. The cases were found by searching for exactly that disagreement; the
// truth is the definition t[i] = t0 + i·dt checked sample by sample.
import { describe, expect, it } from 'vitest';
import { uniformSampleRange } from '../../../shared/traces/uniform-sample-range.ts';
import { bruteUniformIndices } from './brute-force.ts';

const LENGTH = 1000;

describe('uniformSampleRange at rounding edges', () => {
  const cases = [
    // from one ulp after t[24]: division says 24, truth is 25.
    { name: 'start just after a sample', t0: 0.7, dt: 0.3, from: 7.9, to: 100, naive: (r: { t0: number; dt: number; from: number }) => Math.ceil((r.from - r.t0) / r.dt) },
    // from exactly t[6]: division says 7, truth is 6.
    { name: 'start exactly on a sample', t0: 0.1, dt: 0.1, from: 0.7000000000000001, to: 100, naive: (r: { t0: number; dt: number; from: number }) => Math.ceil((r.from - r.t0) / r.dt) },
  ];
  for (const c of cases) {
    it(`When the window ${c.name}, then the first index is the first sample with t ≥ from`, () => {
      const inside = bruteUniformIndices(LENGTH, c.t0, c.dt, c.from, c.to);
      expect(c.naive(c)).not.toBe(inside[0]); // the tricky kind of edge
      expect(uniformSampleRange(LENGTH, c.t0, c.dt, c.from, c.to)).toEqual({ first: inside[0], end: inside.at(-1)! + 1 });
    });
  }

  const ends = [
    // to one ulp before t[12]: division says 12, truth is 11.
    { name: 'ends just before a sample', t0: 0.7, dt: 0.2, to: 3.1 },
    // to exactly t[3]: division says 2, truth is 3.
    { name: 'ends exactly on a sample', t0: -0.001, dt: 1e-7, to: -0.0009997 },
  ];
  for (const c of ends) {
    it(`When the window ${c.name}, then the last index is the last sample with t ≤ to`, () => {
      const from = c.t0 - 1;
      const inside = bruteUniformIndices(LENGTH, c.t0, c.dt, from, c.to);
      expect(Math.floor((c.to - c.t0) / c.dt)).not.toBe(inside.at(-1));
      expect(uniformSampleRange(LENGTH, c.t0, c.dt, from, c.to)).toEqual({ first: 0, end: inside.at(-1)! + 1 });
    });
  }
});
