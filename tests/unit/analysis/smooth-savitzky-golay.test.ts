import { describe, expect, it } from 'vitest';
import { smoothSavitzkyGolay } from '../../../shared/analysis/smooth-savitzky-golay.ts';

/** Response to a unit impulse at the centre: the filter's convolution coefficients (symmetric, so order is moot). */
function impulseResponse(windowSize: number, polynomial: number): number[] {
  const n = 41;
  const x = new Float64Array(n);
  x[20] = 1;
  const y = smoothSavitzkyGolay(x, { windowSize, polynomial });
  const half = (windowSize - 1) / 2;
  return Array.from(y.subarray(20 - half, 20 + half + 1));
}

describe('smoothSavitzkyGolay', () => {
  // Coefficients: Savitzky & Golay 1964, as corrected by Steinier et al. 1972 (Anal. Chem. 44(11) 1906).
  const published: [number, number, number[], number][] = [
    [5, 2, [-3, 12, 17, 12, -3], 35],
    [7, 2, [-2, 3, 6, 7, 6, 3, -2], 21],
    [9, 2, [-21, 14, 39, 54, 59, 54, 39, 14, -21], 231],
    [7, 4, [5, -30, 75, 131, 75, -30, 5], 231],
  ];
  for (const [windowSize, polynomial, numerators, norm] of published) {
    it(`reproduces the published ${windowSize}-point degree-${polynomial} coefficients`, () => {
      const got = impulseResponse(windowSize, polynomial);
      got.forEach((c, i) => expect(c).toBeCloseTo(numerators[i] / norm, 12));
    });
  }

  it('is exact on a polynomial up to its order (defining property of the filter)', () => {
    const x = new Float64Array(200);
    for (let i = 0; i < 200; i++) x[i] = 0.3 + 0.02 * i - 1e-4 * i * i;
    const y = smoothSavitzkyGolay(x, { windowSize: 11, polynomial: 2 });
    for (let i = 5; i < 195; i++) expect(y[i]).toBeCloseTo(x[i], 10);
  });

  it('keeps NaN samples NaN, keeps the raw array unchanged, and rejects even windows', () => {
    const x = new Float64Array(50).fill(1);
    x[25] = Number.NaN;
    const y = smoothSavitzkyGolay(x, { windowSize: 5, polynomial: 2 });
    expect(Number.isNaN(y[25])).toBe(true);
    expect(y[24]).toBeCloseTo(1, 12);
    expect(Number.isNaN(x[25])).toBe(true);
    expect(() => smoothSavitzkyGolay(x, { windowSize: 6 })).toThrow(new RangeError('windowSize must be an odd integer ≥ 5'));
  });
});
