import { chiSquareTail } from '../fitting/chi-square-tail.ts';
import { fitWeightedLeastSquares } from '../fitting/fit-weighted-least-squares.ts';
import { signRunsTest, type SignRunsTest } from '../fitting/sign-runs-test.ts';
import { simulateLauncherShot } from './simulate-launcher-shot.ts';

/** The launcher a fit describes (SI). */
export interface LauncherGeometry {
  tubeLength: number;
  boreDiameter: number;
  projectileDiameter: number;
  mass: number;
}

/** One measured shot for the fit (SI). */
export interface LauncherFitShot {
  tubePressure: number;
  ambientPressure: number;
  ambientTemperature: number;
  /** Measured exit speed, m/s. */
  speed: number;
  /** Its expanded uncertainty U, m/s. */
  expandedUncertainty: number;
  /** Coverage factor of U. */
  coverageFactor: number;
}

export interface FitLauncherLossesOptions extends LauncherGeometry {
  shots: LauncherFitShot[];
  /**
   * Runge–Kutta steps per reference transit time (see `simulateLauncherShot`); 200 keeps the integration error
   * of the speed near 10⁻⁴ m/s (against 20 000 steps), far below any shot's U.
   * @default 200
   */
  steps?: number;
}

export interface FittedQuantity { value: number; standardUncertainty: number }

export interface LauncherFit {
  geometry: LauncherGeometry;
  steps: number;
  /** Outside air the curves and the inverse question use: the median of the shots', Pa and K. */
  reference: { ambientPressure: number; ambientTemperature: number };
  /** Effective sliding friction, N. */
  frictionForce: FittedQuantity;
  /** Effective leak area past the projectile, m². */
  leakArea: FittedQuantity;
  /** Correlation coefficient of friction and leak area. */
  correlation: number;
  /** Covariance of [friction N, leak area m²], as used (already multiplied by `uncertaintyScale`²). */
  covariance: [[number, number], [number, number]];
  /** 1, or √(χ²/ν) when the shots scatter significantly more than their U say (then every uncertainty is widened). */
  uncertaintyScale: number;
  chiSquare: number;
  dof: number;
  reducedChiSquare: number;
  /** P(χ² ≥ observed) for ν degrees of freedom. */
  chiSquareProbability: number;
  /** Runs of residual signs ordered by tube pressure. */
  runs: SignRunsTest;
  /** False when χ²/ν is far from 1 or the residuals come in blocks: the model does not describe these shots. */
  describesData: boolean;
  /** Plain sentences on how well the model describes the shots. */
  findings: string[];
  /** Root mean square of the shots' standard uncertainties, m/s (a new shot's own scatter in the prediction band). */
  typicalShotUncertainty: number;
  shots: (LauncherFitShot & { fitted: number; residual: number; normalizedResidual: number })[];
  /** Both parameters ended at 0: shown as an upper limit only. */
  atLowerBound: { frictionForce: boolean; leakArea: boolean };
  converged: boolean;
  iterations: number;
}

/** Fit parameters are kept in N and mm² so both steps are of order one. */
const MM2 = 1e-6;

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
};

/**
 * Fits the two effective losses of an evacuated-tube launcher, sliding friction and leak area, to a campaign's
 * measured exit speeds, weighted by each shot's standard uncertainty U/k, by least squares through the launcher
 * model of `simulateLauncherShot` (each shot with its own tube pressure and outside air). Returns the parameters
 * with standard uncertainties and correlation ((Jᵀ·W·J)⁻¹, `fitWeightedLeastSquares`), χ²/ν with its probability,
 * and a runs test on the residuals ordered by tube pressure. The model is judged not to describe the shots when
 * P(χ²) < 0.01 or > 0.999 (scatter too large, or U far too large), or when the residuals have so few sign runs
 * that random order gives as few in under 5 % of cases. When P(χ²) < 0.05 every uncertainty is widened by
 * √(χ²/ν) (the Birge ratio, Birge, Phys. Rev. 40, 207 (1932)), so the band covers the scatter actually seen.
 */
export function fitLauncherLosses(options: FitLauncherLossesOptions): LauncherFit {
  const { shots, steps = 200, ...geometry } = options;
  if (shots.length < 3) throw new RangeError(`A fit of two losses needs at least 3 shots with a speed, U and tube pressure (got ${shots.length})`);
  shots.forEach((s, i) => {
    if (!(s.expandedUncertainty > 0) || !(s.coverageFactor > 0)) throw new RangeError(`shot ${i + 1} needs a positive U and coverage factor`);
  });
  const order = shots.map((_, i) => i).sort((a, b) => shots[a].tubePressure - shots[b].tubePressure);
  const sorted = order.map((i) => shots[i]);
  const sigma = sorted.map((s) => s.expandedUncertainty / s.coverageFactor);
  const model = ([friction, leakMm2]: readonly number[]) =>
    sorted.map((s) => simulateLauncherShot({
      ...geometry, tubePressure: s.tubePressure, ambientPressure: s.ambientPressure, ambientTemperature: s.ambientTemperature,
      frictionForce: friction, leakArea: leakMm2 * MM2, steps,
    }).exitSpeed);
  const fit = fitWeightedLeastSquares({
    model, y: sorted.map((s) => s.speed), sigma, initial: [1, 1], step: [0.05, 0.05], lower: [0, 0],
  });

  const dof = fit.dof;
  const reduced = dof > 0 ? fit.chiSquare / dof : Number.NaN;
  const probability = dof > 0 ? chiSquareTail(fit.chiSquare, dof) : Number.NaN;
  const runs = signRunsTest(fit.residuals);
  const findings: string[] = [];
  let describes = true;
  if (dof <= 0) {
    findings.push('As many parameters as shots: the fit passes through every point and cannot show whether the model describes them.');
    describes = false;
  } else if (probability < 0.01) {
    findings.push(`χ²/ν = ${reduced.toFixed(2)}: the shots scatter about the model far more than their U allow (P = ${probability.toExponential(1)}). The model leaves something out, or U is understated.`);
    describes = false;
  } else if (probability > 0.999) {
    findings.push(`χ²/ν = ${reduced.toFixed(2)}: the shots sit closer to the model than their U suggest; U may be overstated.`);
    describes = false;
  } else if (probability < 0.05) {
    findings.push(`χ²/ν = ${reduced.toFixed(2)} (P = ${probability.toFixed(2)}): the shots scatter about the model somewhat more than their U alone explain (shot-to-shot differences the model does not know about).`);
  } else {
    findings.push(`χ²/ν = ${reduced.toFixed(2)} (P = ${probability.toFixed(2)}): the scatter about the model is what the shots' U lead one to expect.`);
  }
  if (runs.probability != null && runs.probability < 0.05) {
    findings.push(`The residuals come in blocks (${runs.runs} runs of one sign against ${runs.expected.toFixed(1)} expected; P = ${runs.probability.toFixed(3)}): the model's trend with tube pressure differs from the shots'.`);
    describes = false;
  } else if (sorted.length < 8) {
    findings.push(`With ${sorted.length} shots the pattern of the residuals says little.`);
  }
  if (!fit.converged) {
    findings.push('The fit stopped before it settled; treat the parameters as rough.');
    describes = false;
  }
  const scale = dof > 0 && probability < 0.05 ? Math.sqrt(reduced) : 1;
  if (scale > 1) findings.push(`Every uncertainty below is widened by √(χ²/ν) = ${scale.toFixed(2)} to cover the scatter seen.`);
  if (fit.atLowerBound[0]) findings.push('Friction came out at 0 N: the shots do not show any; its uncertainty is an upper guide only.');
  if (fit.atLowerBound[1]) findings.push('Leak area came out at 0 mm²: the shots do not show any; its uncertainty is an upper guide only.');

  const c = fit.covariance;
  const s2 = scale * scale;
  const covariance: [[number, number], [number, number]] = [[c[0][0] * s2, c[0][1] * s2 * MM2], [c[1][0] * s2 * MM2, c[1][1] * s2 * MM2 * MM2]];
  return {
    geometry, steps,
    reference: { ambientPressure: median(shots.map((s) => s.ambientPressure)), ambientTemperature: median(shots.map((s) => s.ambientTemperature)) },
    frictionForce: { value: fit.params[0], standardUncertainty: fit.standardUncertainties[0] * scale },
    leakArea: { value: fit.params[1] * MM2, standardUncertainty: fit.standardUncertainties[1] * scale * MM2 },
    correlation: fit.correlation[0][1], covariance, uncertaintyScale: scale,
    chiSquare: fit.chiSquare, dof, reducedChiSquare: reduced, chiSquareProbability: probability, runs,
    describesData: describes, findings,
    typicalShotUncertainty: Math.sqrt(sigma.reduce((a, s) => a + s * s, 0) / sigma.length),
    shots: sorted.map((s, i) => ({ ...s, fitted: fit.fitted[i], residual: fit.residuals[i], normalizedResidual: fit.residuals[i] / sigma[i] })),
    atLowerBound: { frictionForce: fit.atLowerBound[0], leakArea: fit.atLowerBound[1] },
    converged: fit.converged, iterations: fit.iterations,
  };
}
