import type { LauncherFit } from './fit-launcher-losses.ts';
import { simulateLauncherShot } from './simulate-launcher-shot.ts';

export interface LauncherSpeedPrediction {
  tubePressure: number;
  /** Exit speed of the fitted model, m/s. */
  speed: number;
  /** Its standard uncertainty from the fitted parameters, √(gᵀ·C·g), m/s. */
  standardUncertainty: number;
  /** Standard uncertainty of one new shot's measured speed: the above with a typical shot's own u added in quadrature. */
  predictionUncertainty: number;
  /** ∂v/∂F (m/s per N) and ∂v/∂A_leak (m/s per m²). */
  gradient: [number, number];
}

const FRICTION_STEP = 0.05; // N
const LEAK_STEP = 0.05e-6; // m²

/**
 * The fitted launcher model's exit speed at a tube pressure (the fit's reference outside air), with its uncertainty
 * by the law of propagation of uncertainty, u² = gᵀ·C·g, g the gradient in the fitted parameters by central
 * differences (GUM, JCGM 100:2008, §5.2.2 with correlated inputs), and the uncertainty of one new shot there.
 */
export function predictLauncherSpeed(fit: LauncherFit, tubePressure: number): LauncherSpeedPrediction {
  const speedAt = (frictionForce: number, leakArea: number) =>
    simulateLauncherShot({
      ...fit.geometry, tubePressure, ambientPressure: fit.reference.ambientPressure, ambientTemperature: fit.reference.ambientTemperature,
      frictionForce, leakArea, steps: fit.steps,
    }).exitSpeed;
  const f = fit.frictionForce.value;
  const a = fit.leakArea.value;
  const speed = speedAt(f, a);
  const derivative = (value: number, h: number, at: (x: number) => number) =>
    value >= h ? (at(value + h) - at(value - h)) / (2 * h) : (at(value + h) - speed) / h;
  const g: [number, number] = [derivative(f, FRICTION_STEP, (x) => speedAt(x, a)), derivative(a, LEAK_STEP, (x) => speedAt(f, x))];
  const c = fit.covariance;
  const variance = g[0] * g[0] * c[0][0] + 2 * g[0] * g[1] * c[0][1] + g[1] * g[1] * c[1][1];
  const standardUncertainty = Math.sqrt(Math.max(0, variance));
  const shot = fit.typicalShotUncertainty * fit.uncertaintyScale;
  return { tubePressure, speed, standardUncertainty, predictionUncertainty: Math.hypot(standardUncertainty, shot), gradient: g };
}
