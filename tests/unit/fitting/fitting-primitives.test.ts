// The small numerical pieces under the launcher fit, each against something worked outside the code:
// - χ² upper-tail probabilities at the tabulated 95 % and 99 % points (NIST/SEMATECH e-Handbook of Statistical
//   Methods, §1.3.6.7.4, critical values of the chi-square distribution; values from memory, and they are the
//   well-known 3.841 (ν = 1), 5.991 (ν = 2), 12.592 (ν = 6), 6.635 (ν = 1, 99 %)); for ν = 2 the tail is exactly e^(−χ²/2);
// - the runs test against a brute-force count of every ordering (done here, independently of the formula);
// - the Levenberg–Marquardt fit against the closed-form weighted straight line (Bevington & Robinson, ch. 6:
//   Δ = S·Sxx − Sx², slope = (S·Sxy − Sx·Sy)/Δ, σ²(slope) = S/Δ, σ²(intercept) = Sxx/Δ, cov = −Sx/Δ).
import { describe, expect, it } from 'vitest';
import { chiSquareTail } from '../../../shared/fitting/chi-square-tail.ts';
import { fitWeightedLeastSquares } from '../../../shared/fitting/fit-weighted-least-squares.ts';
import { invertMatrix } from '../../../shared/fitting/invert-matrix.ts';
import { signRunsTest } from '../../../shared/fitting/sign-runs-test.ts';
import { solveLinearSystem } from '../../../shared/fitting/solve-linear-system.ts';

describe('chiSquareTail', () => {
  it('When χ² sits at the tabulated 95 % and 99 % points, then the tail probability is 0.05 and 0.01', () => {
    expect(chiSquareTail(3.841, 1)).toBeCloseTo(0.05, 3);
    expect(chiSquareTail(5.991, 2)).toBeCloseTo(0.05, 3);
    expect(chiSquareTail(12.592, 6)).toBeCloseTo(0.05, 3);
    expect(chiSquareTail(6.635, 1)).toBeCloseTo(0.01, 3);
  });
  it('When ν = 2, then Q = e^(−χ²/2) exactly, on both sides of the series/continued-fraction switch', () => {
    for (const x of [0.1, 1, 3.9, 4.1, 20, 80]) expect(chiSquareTail(x, 2)).toBeCloseTo(Math.exp(-x / 2), 12);
  });
  it('When the arguments are impossible, then it throws with a message', () => {
    expect(() => chiSquareTail(1, 0)).toThrow(new RangeError('dof must be a whole number of 1 or more (got 0)'));
    expect(() => chiSquareTail(-1, 3)).toThrow(new RangeError('chiSquare must be 0 or more (got -1)'));
  });
});

describe('signRunsTest', () => {
  /** P(runs ≤ r) by listing every distinct order of n1 pluses and n2 minuses. */
  function bruteForce(n1: number, n2: number, r: number) {
    let all = 0;
    let few = 0;
    const n = n1 + n2;
    for (let mask = 0; mask < 1 << n; mask++) {
      let ones = 0;
      for (let i = 0; i < n; i++) ones += (mask >> i) & 1;
      if (ones !== n1) continue;
      all++;
      let runs = 1;
      for (let i = 1; i < n; i++) if (((mask >> i) & 1) !== ((mask >> (i - 1)) & 1)) runs++;
      if (runs <= r) few++;
    }
    return few / all;
  }
  it('When residuals come in two blocks, then there are 2 runs and the exact probability matches a full count', () => {
    const t = signRunsTest([1, 2, 1, 3, -1, -2, -1, -4]);
    expect(t.runs).toBe(2);
    expect(t.expected).toBe(5);
    expect(t.probability).toBeCloseTo(bruteForce(4, 4, 2), 12); // 2/70
    expect(t.probability).toBeCloseTo(2 / 70, 12);
  });
  it('When every order of 4 to 9 signs is tried, then the formula matches the full count for each', () => {
    let checked = 0;
    for (let n = 4; n <= 9; n++) {
      for (let mask = 0; mask < 1 << n; mask++) {
        const values = Array.from({ length: n }, (_, i) => ((mask >> i) & 1 ? 0.5 + i : -1 - i));
        const n1 = values.filter((v) => v > 0).length;
        if (n1 === 0 || n1 === n) continue;
        const t = signRunsTest(values);
        expect(t.probability).toBeCloseTo(bruteForce(n1, n - n1, t.runs), 12);
        checked++;
      }
    }
    expect(checked).toBe([4, 5, 6, 7, 8, 9].reduce((a, n) => a + 2 ** n - 2, 0));
  });
  it('When every residual has one sign, then no probability is given', () => {
    expect(signRunsTest([1, 2, 3]).probability).toBeNull();
  });
});

describe('solveLinearSystem and invertMatrix', () => {
  it('When a system needs pivoting, then it is solved; a singular one gives null', () => {
    expect(solveLinearSystem([[0, 1], [2, 0]], [3, 4])).toEqual([2, 3]);
    expect(solveLinearSystem([[1, 2], [2, 4]], [1, 2])).toBeNull();
    const inv = invertMatrix([[4, 7], [2, 6]])!; // by hand: 1/10·[[6, −7], [−2, 4]]
    expect(inv[0][0]).toBeCloseTo(0.6, 12);
    expect(inv[0][1]).toBeCloseTo(-0.7, 12);
    expect(inv[1][0]).toBeCloseTo(-0.2, 12);
    expect(inv[1][1]).toBeCloseTo(0.4, 12);
  });
});

describe('fitWeightedLeastSquares', () => {
  it('When it fits a weighted straight line, then parameters, covariance and χ² equal the closed form', () => {
    const x = [0, 1, 2, 3, 4, 5];
    const y = [1.1, 2.9, 5.2, 6.8, 9.1, 11.2];
    const sigma = [0.1, 0.2, 0.1, 0.3, 0.2, 0.1];
    let S = 0, Sx = 0, Sy = 0, Sxx = 0, Sxy = 0;
    x.forEach((xi, i) => {
      const w = 1 / sigma[i] ** 2;
      S += w; Sx += w * xi; Sy += w * y[i]; Sxx += w * xi * xi; Sxy += w * xi * y[i];
    });
    const delta = S * Sxx - Sx * Sx;
    const slope = (S * Sxy - Sx * Sy) / delta;
    const intercept = (Sxx * Sy - Sx * Sxy) / delta;
    const fit = fitWeightedLeastSquares({ model: ([a, b]) => x.map((xi) => a + b * xi), y, sigma, initial: [0, 0], step: [0.01, 0.01] });
    expect(fit.params[0]).toBeCloseTo(intercept, 8);
    expect(fit.params[1]).toBeCloseTo(slope, 8);
    expect(fit.covariance[0][0]).toBeCloseTo(Sxx / delta, 10);
    expect(fit.covariance[1][1]).toBeCloseTo(S / delta, 10);
    expect(fit.covariance[0][1]).toBeCloseTo(-Sx / delta, 10);
    const chi2 = x.reduce((a, xi, i) => a + ((y[i] - intercept - slope * xi) / sigma[i]) ** 2, 0);
    expect(fit.chiSquare).toBeCloseTo(chi2, 8);
    expect(fit.dof).toBe(4);
    expect(fit.converged).toBe(true);
  });
  it('When the best value lies below a bound, then the parameter stops on the bound and says so', () => {
    const fit = fitWeightedLeastSquares({ model: ([a]) => [a, a], y: [-1, -2], sigma: [1, 1], initial: [3], step: [0.01], lower: [0] });
    expect(fit.params[0]).toBe(0);
    expect(fit.atLowerBound).toEqual([true]);
  });
  it('When inputs are of the wrong shape, then it throws with a message', () => {
    const model = ([a]: readonly number[]) => [a];
    expect(() => fitWeightedLeastSquares({ model, y: [1], sigma: [0], initial: [0], step: [1] })).toThrow(new RangeError('sigma[0] must be a positive number (got 0)'));
    expect(() => fitWeightedLeastSquares({ model, y: [1], sigma: [1, 1], initial: [0], step: [1] })).toThrow(new RangeError('sigma has 2 values for 1 observations'));
    expect(() => fitWeightedLeastSquares({ model: ([a, b]) => [a + b], y: [1], sigma: [1], initial: [0, 0], step: [1, 1] })).toThrow(new RangeError('1 observations cannot fix 2 parameters'));
  });
});
