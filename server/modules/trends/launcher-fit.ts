import type { LauncherCurvePoint, LauncherFitView } from '../../../shared/contracts/launcher-fit.ts';
import { fitLauncherLosses, type LauncherFitShot } from '../../../shared/physics/fit-launcher-losses.ts';
import { launcherLossBudget } from '../../../shared/physics/launcher-loss-budget.ts';
import { launcherModel } from '../../../shared/physics/launcher-model.ts';
import { LAUNCHER_MODEL_ASSUMPTIONS, LAUNCHER_MODEL_CAUTIONS } from '../../../shared/physics/launcher-model-notes.ts';
import { predictLauncherSpeed } from '../../../shared/physics/predict-launcher-speed.ts';
import { vacuumForTargetSpeed } from '../../../shared/physics/vacuum-for-target-speed.ts';
import { Projectile, type Campaign } from '../../db/models/index.ts';
import type { TrendPoint } from './trend-points.ts';

/** Coverage factor of the bands and expanded uncertainties this view reports. */
const K = 2;
/** Outside air assumed for a shot that did not log it: ISO 2533 sea level pressure and 20 °C (common practice for a lab). */
const DEFAULT_AIR = { pressurePa: 101_325, temperatureK: 293.15 };

export interface LauncherFitInputs {
  tubeLengthM: number | null;
  boreM: number | null;
  /** The projectile the fit is for: the campaign's most used one. */
  projectile: { id: string; name: string; massKg: number; diameterM: number } | null;
  /** A mass given in the request instead of the library's, kg. */
  massKgOverride?: number | null;
  targetSpeedMs?: number | null;
}

const CACHE = new Map<string, LauncherFitView>();
const CACHE_SIZE = 32;

function notFitted(reason: string, launcher: LauncherFitView['launcher'], leftOut: LauncherFitView['leftOut'] = []): LauncherFitView {
  return {
    status: 'not-fitted', reason, coverageFactor: K, launcher, shotsUsed: [], leftOut, airAssumed: [], fit: null, budget: null, curve: [], inverse: null,
    assumptions: LAUNCHER_MODEL_ASSUMPTIONS, cautions: LAUNCHER_MODEL_CAUTIONS,
  };
}

/**
 * The launcher model with losses fitted to a campaign's shots (the shared physics does the work; this picks the
 * shots, fills in what was not logged, and shapes the answer). Results are kept for the same inputs, since a fit
 * runs some hundreds of integrations.
 */
export function campaignLauncherFit(points: TrendPoint[], inputs: LauncherFitInputs): LauncherFitView {
  const massKg = inputs.massKgOverride ?? inputs.projectile?.massKg ?? null;
  const launcher = {
    tubeLengthM: inputs.tubeLengthM, boreM: inputs.boreM, massKg,
    projectileDiameterM: inputs.projectile?.diameterM ?? inputs.boreM, projectileName: inputs.projectile?.name ?? null,
  };
  if (launcher.tubeLengthM == null || launcher.boreM == null) return notFitted('The campaign has no launcher tube logged (length and bore).', launcher);
  if (massKg == null || launcher.projectileDiameterM == null) return notFitted('No projectile is logged with the campaign’s shots, so its mass is unknown.', launcher);

  const leftOut: LauncherFitView['leftOut'] = [];
  const used: TrendPoint[] = [];
  for (const p of points) {
    if (p.speed == null) leftOut.push({ number: p.number, reason: 'no speed measured' });
    else if (p.timeBase === 'unchecked') leftOut.push({ number: p.number, reason: 'marked "check the time base"' });
    else if (!(p.uncertainty != null && p.uncertainty > 0)) leftOut.push({ number: p.number, reason: 'no uncertainty' });
    else if (p.tubePressurePa == null) leftOut.push({ number: p.number, reason: 'no tube pressure logged' });
    else if (inputs.projectile && p.projectileId !== inputs.projectile.id) leftOut.push({ number: p.number, reason: p.projectileId ? `a different projectile (${p.projectileName ?? 'unnamed'})` : 'no projectile logged' });
    else if (p.tubePressurePa >= (p.ambientPressurePa ?? DEFAULT_AIR.pressurePa)) leftOut.push({ number: p.number, reason: 'tube pressure not below the outside air' });
    else used.push(p);
  }
  if (used.length < 3) return notFitted(`The fit needs at least 3 shots with a speed, U and tube pressure; this campaign has ${used.length}.`, launcher, leftOut);

  const shots: LauncherFitShot[] = used.map((p) => ({
    tubePressure: p.tubePressurePa!, ambientPressure: p.ambientPressurePa ?? DEFAULT_AIR.pressurePa, ambientTemperature: p.ambientTemperatureK ?? DEFAULT_AIR.temperatureK,
    // The engine reports U with k = 2 (SpeedResult.coverage).
    speed: p.speed!, expandedUncertainty: p.uncertainty!, coverageFactor: 2,
  }));
  const key = JSON.stringify([launcher, shots]);
  let view = CACHE.get(key);
  if (!view) {
    try {
      view = fittedView(launcher, used, shots, massKg, leftOut);
    } catch (err) {
      // Inputs the physics refuses (RangeError/TypeError with a message naming the value) become a reason, not a 500.
      if (!(err instanceof RangeError || err instanceof TypeError)) throw err;
      return notFitted(`The fit could not run: ${err.message}`, launcher, leftOut);
    }
    if (CACHE.size >= CACHE_SIZE) CACHE.delete(CACHE.keys().next().value!);
    CACHE.set(key, view);
  }
  // The inverse question is cheap beside the fit: answered per request from the kept fit.
  return inputs.targetSpeedMs != null && view.fit ? { ...view, inverse: vacuumForTargetSpeed(view.fit, inputs.targetSpeedMs) } : view;
}

/** Fits the model to the chosen shots and draws its curve, k = 2 bands and loss budget. */
function fittedView(launcher: LauncherFitView['launcher'], used: TrendPoint[], shots: LauncherFitShot[], massKg: number, leftOut: LauncherFitView['leftOut']): LauncherFitView {
  const fit = fitLauncherLosses({ tubeLength: launcher.tubeLengthM!, boreDiameter: launcher.boreM!, projectileDiameter: launcher.projectileDiameterM!, mass: massKg, shots });
  const pressures = shots.map((s) => s.tubePressure);
  const best = Math.min(...pressures);
  const low = Math.max(10, best / 3);
  const high = Math.min(Math.max(...pressures) * 1.5, 0.9 * fit.reference.ambientPressure);
  const n = 36;
  const curve: LauncherCurvePoint[] = [];
  for (let i = 0; i < n; i++) {
    const p = low * (high / low) ** (i / (n - 1));
    const at = predictLauncherSpeed(fit, p);
    curve.push({
      tubePressurePa: p, speed: at.speed, expandedUncertainty: K * at.standardUncertainty, predictionExpandedUncertainty: K * at.predictionUncertainty,
      zerothOrder: launcherModel({ tubeLength: launcher.tubeLengthM!, boreDiameter: launcher.boreM!, mass: massKg, tubePressure: p, ambientPressure: fit.reference.ambientPressure, ambientTemperature: fit.reference.ambientTemperature }).speed,
    });
  }
  return {
    status: 'fitted', reason: null, coverageFactor: K, launcher,
    shotsUsed: used.map((p) => p.number), leftOut,
    airAssumed: used.filter((p) => p.ambientPressurePa == null || p.ambientTemperatureK == null).map((p) => p.number),
    fit, budget: launcherLossBudget(fit, best), curve, inverse: null,
    assumptions: LAUNCHER_MODEL_ASSUMPTIONS, cautions: LAUNCHER_MODEL_CAUTIONS,
  };
}

/** The campaign's most used projectile among the points (null when none logged one). */
function mostUsedProjectile(points: TrendPoint[]): string | null {
  const counts = new Map<string, number>();
  for (const p of points) if (p.projectileId && p.speed != null) counts.set(p.projectileId, (counts.get(p.projectileId) ?? 0) + 1);
  let best: string | null = null;
  for (const [id, n] of counts) if (best == null || n > counts.get(best)!) best = id;
  return best;
}

/**
 * The launcher fit for a campaign: its logged tube (or the request's), its most used projectile from the library
 * (or the request's mass), its points.
 */
export async function fitCampaignLauncher(
  campaign: Campaign,
  points: TrendPoint[],
  request: { tubeLengthM?: number; boreM?: number; massKg?: number; targetSpeedMs?: number } = {},
): Promise<LauncherFitView> {
  const id = mostUsedProjectile(points);
  const projectile = id ? await Projectile.findOne({ where: { id, labId: campaign.labId }, attributes: ['id', 'name', 'massKg', 'diameterM'] }) : null;
  return campaignLauncherFit(points, {
    tubeLengthM: request.tubeLengthM ?? campaign.tubeLengthM ?? null,
    boreM: request.boreM ?? campaign.boreM ?? null,
    projectile: projectile ? { id: projectile.id, name: projectile.name, massKg: projectile.massKg, diameterM: projectile.diameterM } : null,
    massKgOverride: request.massKg ?? null,
    targetSpeedMs: request.targetSpeedMs ?? null,
  });
}
