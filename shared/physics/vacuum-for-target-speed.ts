import type { LauncherFit } from './fit-launcher-losses.ts';
import { predictLauncherSpeed } from './predict-launcher-speed.ts';
import { simulateLauncherShot } from './simulate-launcher-shot.ts';

export type VacuumForSpeed =
  | {
    reachable: true;
    targetSpeed: number;
    /** Tube pressure at which the fitted model gives the target speed, Pa. */
    tubePressure: number;
    /** Its standard uncertainty from the fitted parameters, u(v)/|∂v/∂p|, Pa. */
    standardUncertainty: number;
    /** The spread of tube pressure over which one shot's own scatter could still give the target, Pa (standard). */
    shotSpreadPressure: number;
    /** ∂v/∂p at that pressure, m/s per Pa (negative). */
    slope: number;
    /** True when the answer lies outside the tube pressures the campaign measured (an extrapolation). */
    outsideMeasured: boolean;
  }
  | { reachable: false; targetSpeed: number; reason: 'above-hard-vacuum' | 'below-range'; limitSpeed: number };

/**
 * The inverse question, "what tube vacuum gives this exit speed?", answered from the fitted launcher model: the
 * pressure p where v(p) = target by bisection (v falls as p rises), and its uncertainty by propagating the model's
 * u(v) through the slope, u(p) = u(v)/|∂v/∂p| (GUM, JCGM 100:2008, §5.1.2, one input). Speeds above what the fitted
 * launcher gives at a hard vacuum are answered as not reachable by pumping harder: no other change is suggested.
 */
export function vacuumForTargetSpeed(fit: LauncherFit, targetSpeed: number): VacuumForSpeed {
  if (!(targetSpeed > 0) || !Number.isFinite(targetSpeed)) throw new RangeError(`targetSpeed must be a positive number of m/s (got ${targetSpeed})`);
  const speedAt = (tubePressure: number) => ({
    speed: simulateLauncherShot({
      ...fit.geometry, tubePressure, ambientPressure: fit.reference.ambientPressure, ambientTemperature: fit.reference.ambientTemperature,
      frictionForce: fit.frictionForce.value, leakArea: fit.leakArea.value, steps: fit.steps,
    }).exitSpeed,
  });
  const top = speedAt(0).speed;
  if (targetSpeed >= top) return { reachable: false, targetSpeed, reason: 'above-hard-vacuum', limitSpeed: top };
  const highest = 0.98 * fit.reference.ambientPressure;
  const bottom = speedAt(highest).speed;
  if (targetSpeed <= bottom) return { reachable: false, targetSpeed, reason: 'below-range', limitSpeed: bottom };
  let lo = 0;
  let hi = highest;
  for (let i = 0; i < 48 && hi - lo > 1e-3; i++) {
    const mid = (lo + hi) / 2;
    if (speedAt(mid).speed > targetSpeed) lo = mid; else hi = mid;
  }
  const p = (lo + hi) / 2;
  const at = predictLauncherSpeed(fit, p);
  const h = Math.max(1, 0.01 * p);
  const slope = (speedAt(p + h).speed - speedAt(Math.max(0, p - h)).speed) / (p + h - Math.max(0, p - h));
  const measured = fit.shots.map((s) => s.tubePressure);
  return {
    reachable: true, targetSpeed, tubePressure: p,
    standardUncertainty: at.standardUncertainty / Math.abs(slope),
    shotSpreadPressure: (fit.typicalShotUncertainty * fit.uncertaintyScale) / Math.abs(slope),
    slope,
    outsideMeasured: p < Math.min(...measured) || p > Math.max(...measured),
  };
}
