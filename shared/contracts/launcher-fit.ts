import type { LauncherFit } from '../physics/fit-launcher-losses.ts';
import type { LauncherLossBudget } from '../physics/launcher-loss-budget.ts';
import type { VacuumForSpeed } from '../physics/vacuum-for-target-speed.ts';

/** One point of the fitted model's curve against tube pressure (SI). */
export interface LauncherCurvePoint {
  tubePressurePa: number;
  speed: number;
  /** k = 2 band of the fitted model (its parameters' uncertainty), m/s. */
  expandedUncertainty: number;
  /** k = 2 band for one new shot's measured speed, m/s. */
  predictionExpandedUncertainty: number;
  /** The zeroth-order speed at that pressure, for the same launcher and air, m/s. */
  zerothOrder: number;
}

/** The launcher model with losses fitted to a campaign: `launcherFit` of the trends answer and the JSON export. */
export interface LauncherFitView {
  status: 'fitted' | 'not-fitted';
  /** Why there is no fit (status not-fitted), in words a person can act on. */
  reason: string | null;
  coverageFactor: number;
  launcher: { tubeLengthM: number | null; boreM: number | null; massKg: number | null; projectileDiameterM: number | null; projectileName: string | null };
  /** Shot numbers the fit used, and the ones it left out with the reason. */
  shotsUsed: number[];
  leftOut: { number: number; reason: string }[];
  /** Shots whose outside air was not logged, fitted with 101.325 kPa and 20 °C. */
  airAssumed: number[];
  fit: LauncherFit | null;
  /** Where the energy goes at the best vacuum the campaign reached. */
  budget: LauncherLossBudget | null;
  curve: LauncherCurvePoint[];
  /** The answer to ?targetSpeedMs=: the tube vacuum for that speed. */
  inverse: VacuumForSpeed | null;
  assumptions: readonly string[];
  cautions: readonly string[];
}
