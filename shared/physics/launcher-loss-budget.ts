import type { LauncherFit } from './fit-launcher-losses.ts';
import { launcherModel } from './launcher-model.ts';
import { predictLauncherSpeed } from './predict-launcher-speed.ts';
import { simulateLauncherShot } from './simulate-launcher-shot.ts';

export interface LauncherLossBudget {
  tubePressure: number;
  /** Zeroth-order speed √(2·P₀·A·L/m) (Ayars & Buchholtz 2004, bore area), m/s. */
  zerothOrder: number;
  /** The gas-dynamic model with the air left in the tube but no friction and no leak, m/s. */
  gasDynamics: number;
  /** The same with the fitted friction added, m/s. */
  withFriction: number;
  /** The fitted model: friction and leak, m/s. */
  fitted: number;
  /** Its standard uncertainty from the fitted parameters, m/s. */
  fittedStandardUncertainty: number;
  /**
   * Effective driving efficiency: the share of the zeroth-order kinetic energy the projectile leaves with,
   * (v_fitted/v_zeroth)², and its standard uncertainty 2·v·u(v)/v_zeroth².
   */
  efficiency: { value: number; standardUncertainty: number };
}

/**
 * Where a launcher's energy goes at one tube pressure, in the order the losses are added: the zeroth-order speed,
 * then the gas dynamics of the inflow and the air left in the tube (`simulateLauncherShot` with no friction and no
 * leak), then the fitted friction, then the fitted leak. The order matters (each loss is taken with those before
 * it), so the steps are a breakdown, not independent shares.
 */
export function launcherLossBudget(fit: LauncherFit, tubePressure: number): LauncherLossBudget {
  const air = { ambientPressure: fit.reference.ambientPressure, ambientTemperature: fit.reference.ambientTemperature };
  const zerothOrder = launcherModel({
    tubeLength: fit.geometry.tubeLength, boreDiameter: fit.geometry.boreDiameter, mass: fit.geometry.mass, tubePressure, ...air,
  }).speed;
  const run = (frictionForce: number, leakArea: number) =>
    simulateLauncherShot({ ...fit.geometry, ...air, tubePressure, frictionForce, leakArea, steps: fit.steps }).exitSpeed;
  const fitted = predictLauncherSpeed(fit, tubePressure);
  const ratio = fitted.speed / zerothOrder;
  return {
    tubePressure, zerothOrder, gasDynamics: run(0, 0), withFriction: run(fit.frictionForce.value, 0),
    fitted: fitted.speed, fittedStandardUncertainty: fitted.standardUncertainty,
    efficiency: { value: ratio * ratio, standardUncertainty: (2 * fitted.speed * fitted.standardUncertainty) / (zerothOrder * zerothOrder) },
  };
}
