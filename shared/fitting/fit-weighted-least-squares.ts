import { invertMatrix } from './invert-matrix.ts';
import { solveLinearSystem } from './solve-linear-system.ts';

export interface WeightedLeastSquaresOptions {
  /** The model's predictions for every observation, given the parameters. */
  model: (params: readonly number[]) => number[];
  /** Observations. */
  y: readonly number[];
  /** Standard uncertainty of each observation (> 0); the weights are 1/σ². */
  sigma: readonly number[];
  /** Starting parameters. */
  initial: readonly number[];
  /** Step of each parameter for the numerical Jacobian (central differences; one-sided beside a bound). */
  step: readonly number[];
  /**
   * Lowest allowed value of each parameter (a step that crosses it is cut back to it).
   * @default no bounds
   */
  lower?: readonly number[];
  /** @default 60 */
  maxIterations?: number;
}

export interface WeightedLeastSquaresFit {
  params: number[];
  /** (Jᵀ·W·J)⁻¹ at the minimum: the parameters' covariance when the σ are right (not scaled by χ²/ν). */
  covariance: number[][];
  /** √ of the covariance's diagonal. */
  standardUncertainties: number[];
  correlation: number[][];
  /** Σ ((yᵢ − fᵢ)/σᵢ)². */
  chiSquare: number;
  /** Observations − parameters. */
  dof: number;
  /** yᵢ − fᵢ. */
  residuals: number[];
  /** Predictions at the minimum. */
  fitted: number[];
  /** Jacobian ∂fᵢ/∂θⱼ at the minimum. */
  jacobian: number[][];
  /** Which parameters ended on their lower bound (their uncertainty is then only a one-sided guide). */
  atLowerBound: boolean[];
  iterations: number;
  converged: boolean;
}

const chiSquareOf = (y: readonly number[], f: readonly number[], sigma: readonly number[]) => {
  let s = 0;
  for (let i = 0; i < y.length; i++) s += ((y[i] - f[i]) / sigma[i]) ** 2;
  return s;
};

/**
 * Weighted non-linear least squares by the Levenberg–Marquardt method with a numerical Jacobian, and the
 * parameters' covariance (Jᵀ·W·J)⁻¹ at the minimum (Press et al., *Numerical Recipes*, 3rd ed., §15.5; Bevington &
 * Robinson, *Data Reduction and Error Analysis*, ch. 8). Meant for a handful of parameters and observations
 * (dense normal equations). Throws RangeError for inputs of the wrong shape, a σ that is not positive or fewer
 * observations than parameters.
 */
export function fitWeightedLeastSquares(options: WeightedLeastSquaresOptions): WeightedLeastSquaresFit {
  const { model, y, sigma, initial, step, maxIterations = 60 } = options;
  const p = initial.length;
  const n = y.length;
  const lower = options.lower ?? new Array<number>(p).fill(-Infinity);
  if (sigma.length !== n) throw new RangeError(`sigma has ${sigma.length} values for ${n} observations`);
  if (step.length !== p || lower.length !== p) throw new RangeError(`step and lower need one value per parameter (${p})`);
  if (n < p) throw new RangeError(`${n} observations cannot fix ${p} parameters`);
  sigma.forEach((s, i) => {
    if (!(s > 0) || !Number.isFinite(s)) throw new RangeError(`sigma[${i}] must be a positive number (got ${s})`);
  });
  y.forEach((v, i) => {
    if (!Number.isFinite(v)) throw new RangeError(`y[${i}] must be a finite number (got ${v})`);
  });

  const jacobianAt = (params: number[], f0: number[]): number[][] => {
    const jac = Array.from({ length: n }, () => new Array<number>(p).fill(0));
    for (let j = 0; j < p; j++) {
      const h = step[j];
      const up = [...params];
      up[j] += h;
      const fUp = model(up);
      if (params[j] - h >= lower[j]) {
        const down = [...params];
        down[j] -= h;
        const fDown = model(down);
        for (let i = 0; i < n; i++) jac[i][j] = (fUp[i] - fDown[i]) / (2 * h);
      } else {
        for (let i = 0; i < n; i++) jac[i][j] = (fUp[i] - f0[i]) / h;
      }
    }
    return jac;
  };
  const normal = (jac: number[][], r: number[]) => {
    const a = Array.from({ length: p }, () => new Array<number>(p).fill(0));
    const g = new Array<number>(p).fill(0);
    for (let i = 0; i < n; i++) {
      const w = 1 / (sigma[i] * sigma[i]);
      for (let j = 0; j < p; j++) {
        g[j] += w * jac[i][j] * r[i];
        for (let k = 0; k < p; k++) a[j][k] += w * jac[i][j] * jac[i][k];
      }
    }
    return { a, g };
  };

  let params = initial.map((v, j) => Math.max(v, lower[j]));
  let fitted = model(params);
  let chi2 = chiSquareOf(y, fitted, sigma);
  let lambda = 1e-3;
  let iterations = 0;
  let converged = false;
  for (; iterations < maxIterations && !converged; iterations++) {
    const jac = jacobianAt(params, fitted);
    const { a, g } = normal(jac, y.map((v, i) => v - fitted[i]));
    let improved = false;
    for (let tries = 0; tries < 12 && !improved; tries++) {
      const damped = a.map((row, j) => row.map((v, k) => (j === k ? v * (1 + lambda) + 1e-30 : v)));
      const delta = solveLinearSystem(damped, g);
      if (!delta) { lambda *= 10; continue; }
      const trial = params.map((v, j) => Math.max(lower[j], v + delta[j]));
      const fTrial = model(trial);
      const chiTrial = chiSquareOf(y, fTrial, sigma);
      if (Number.isFinite(chiTrial) && chiTrial <= chi2) {
        const drop = chi2 - chiTrial;
        const moved = trial.some((v, j) => Math.abs(v - params[j]) > 1e-9 * (Math.abs(v) + step[j]));
        params = trial;
        fitted = fTrial;
        chi2 = chiTrial;
        lambda = Math.max(lambda / 10, 1e-12);
        improved = true;
        if (drop < 1e-10 * Math.max(chi2, 1) || !moved) converged = true;
      } else {
        lambda *= 10;
      }
    }
    if (!improved) converged = true; // no step lowers χ²: at the minimum (to the Jacobian's precision)
  }

  const jac = jacobianAt(params, fitted);
  const { a } = normal(jac, new Array<number>(n).fill(0));
  const covariance = invertMatrix(a) ?? a.map((row) => row.map(() => Number.NaN));
  const standardUncertainties = covariance.map((row, j) => Math.sqrt(row[j]));
  const correlation = covariance.map((row, j) => row.map((v, k) => v / (standardUncertainties[j] * standardUncertainties[k])));
  return {
    params, covariance, standardUncertainties, correlation, chiSquare: chi2, dof: n - p,
    residuals: y.map((v, i) => v - fitted[i]), fitted, jacobian: jac,
    atLowerBound: params.map((v, j) => v <= lower[j]), iterations, converged,
  };
}
