// buildMinMaxPyramid against brute force over random arrays (fast-check) and against a ramp, whose block
// extremes are known analytically (block b of size B holds b·B … b·B + B − 1).
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { buildMinMaxPyramid, pyramidShape } from '../../../shared/traces/build-min-max-pyramid.ts';
import { bruteMinMax } from './brute-force.ts';

const sample = fc.oneof(
  { weight: 8, arbitrary: fc.double({ min: -1e6, max: 1e6, noNaN: true }) },
  { weight: 1, arbitrary: fc.constant(NaN) },
);

describe('buildMinMaxPyramid', () => {
  it('When built from a ramp 0…n−1, then block b of level k holds (b·16^k, min(n, (b+1)·16^k) − 1)', () => {
    // Arrange: analytic truth of a ramp.
    const n = 100_000;
    const ramp = new Float64Array(n);
    for (let i = 0; i < n; i++) ramp[i] = i;
    // Act
    const levels = buildMinMaxPyramid(ramp);
    // Assert: 16, 256, 4096 samples per block → 6250, 391, stop (391 ≤ 1024).
    expect(levels.map((l) => l.blockSize)).toEqual([16, 256]);
    expect(levels.map((l) => l.pairs.length / 2)).toEqual([6250, 391]);
    for (const { blockSize, pairs } of levels) {
      for (let b = 0; b < pairs.length / 2; b++) {
        expect(pairs[2 * b]).toBe(b * blockSize);
        expect(pairs[2 * b + 1]).toBe(Math.min(n, (b + 1) * blockSize) - 1);
      }
    }
  });

  it('When samples are random with NaN gaps, then every pair of every level equals brute force over its block', () => {
    fc.assert(
      fc.property(
        fc.array(sample, { maxLength: 2500 }),
        fc.integer({ min: 2, max: 9 }),
        fc.integer({ min: 1, max: 40 }),
        fc.boolean(),
        (list, factor, maxTopPairs, single) => {
          const values = single ? Float32Array.from(list) : Float64Array.from(list);
          const levels = buildMinMaxPyramid(values, { factor, maxTopPairs });
          // Levels continue exactly while the level below is larger than maxTopPairs.
          let below = values.length;
          for (let k = 0; k < levels.length; k++) {
            expect(below).toBeGreaterThan(maxTopPairs);
            const { blockSize, pairs } = levels[k];
            expect(blockSize).toBe(factor ** (k + 1));
            expect(pairs.length / 2).toBe(Math.ceil(values.length / blockSize));
            for (let b = 0; b < pairs.length / 2; b++) {
              const [lo, hi] = bruteMinMax(values, b * blockSize, (b + 1) * blockSize);
              expect(pairs[2 * b]).toBe(lo);
              expect(pairs[2 * b + 1]).toBe(hi);
            }
            below = pairs.length / 2;
          }
          expect(below).toBeLessThanOrEqual(Math.max(maxTopPairs, levels.length === 0 ? values.length : 0));
        },
      ),
      { numRuns: 150 },
    );
  });

  it('When a whole block is NaN, then its pair is (NaN, NaN) on level 1 and the gap does not leak into finite blocks', () => {
    // Arrange: a ramp of 64 samples, factor 4; samples 8..15 (level-1 blocks 2 and 3) are NaN.
    const values = new Float32Array(64).map((_, i) => (i >= 8 && i < 16 ? NaN : i));
    // Act
    const [l1, l2] = buildMinMaxPyramid(values, { factor: 4, maxTopPairs: 2 });
    // Assert
    expect(Array.from(l1.pairs.subarray(2, 8))).toEqual([4, 7, NaN, NaN, NaN, NaN]);
    // Level-2 block 0 covers samples 0..15: only 0..7 are finite.
    expect(Array.from(l2.pairs.subarray(0, 4))).toEqual([0, 7, 16, 31]);
  });

  it('When the trace is no longer than maxTopPairs, then there are no levels; bad options throw RangeError', () => {
    expect(buildMinMaxPyramid(new Float64Array(1024))).toEqual([]);
    expect(buildMinMaxPyramid(new Float64Array(0))).toEqual([]);
    expect(buildMinMaxPyramid(new Float64Array(1))).toEqual([]);
    expect(() => buildMinMaxPyramid(new Float64Array(4), { factor: 1 })).toThrow(new RangeError('factor must be an integer ≥ 2'));
    expect(() => buildMinMaxPyramid(new Float64Array(4), { maxTopPairs: 0 })).toThrow(new RangeError('maxTopPairs must be an integer ≥ 1'));
    expect(() => buildMinMaxPyramid([1, 2] as unknown as Float64Array)).toThrow(new TypeError('values must be a Float32Array or a Float64Array'));
  });
});

describe('pyramidShape', () => {
  it('When asked for any length, factor and top size, then it names the levels buildMinMaxPyramid builds (block sizes and pair counts)', () => {
    // The channel files' descriptor is recorded from pyramidShape before the pyramid exists (a deep upload's
    // result comes before its files): the two must never disagree. Lengths at and around every boundary.
    const lengths = [0, 1, 15, 16, 17, 1023, 1024, 1025, 16 * 1024, 16 * 1024 + 1, 256 * 1024, 256 * 1024 + 1, 100_000, 1_048_577];
    for (const [factor, maxTopPairs] of [[16, 1024], [2, 1], [4, 3], [10, 100]]) {
      for (const n of lengths) {
        const built = buildMinMaxPyramid(new Float32Array(n), { factor, maxTopPairs });
        expect(pyramidShape(n, { factor, maxTopPairs }), `n=${n}, factor=${factor}, top=${maxTopPairs}`)
          .toEqual(built.map((l) => ({ blockSize: l.blockSize, pairs: l.pairs.length / 2 })));
      }
    }
  });
});

