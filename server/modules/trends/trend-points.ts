import type { ShotAnalysis } from '../../../shared/analysis/types.ts';
import type { TrendPoint as SharedTrendPoint } from '../../../shared/contracts/review.ts';
import { Analysis, Projectile, Shot, type Campaign } from '../../db/models/index.ts';
import { TIME_BASE_ATTRIBUTES, timeBaseState } from '../analyses/time-base-status.ts';

/** A campaign's shot on the server (`firedAt` still a Date). */
export type TrendPoint = SharedTrendPoint<Date>;

/** Every shot of the campaign whose current analysis finished, in shot-number order. */
export async function campaignTrendPoints(campaign: Campaign): Promise<TrendPoint[]> {
  const labId = campaign.labId;
  const shots = await Shot.findAll({ where: { campaignId: campaign.id, labId, deletedAt: null }, order: [['number', 'ASC']] });
  const ids = shots.map((s) => s.currentAnalysisId).filter((x): x is string => !!x);
  const [analyses, projectiles] = await Promise.all([
    Analysis.findAll({ where: { id: ids, labId, state: 'done' }, attributes: ['id', 'version', 'results', ...TIME_BASE_ATTRIBUTES] }),
    Projectile.findAll({ where: { labId }, attributes: ['id', 'name'] }),
  ]);
  const points: TrendPoint[] = [];
  for (const s of shots) {
    const a = analyses.find((x) => x.id === s.currentAnalysisId);
    if (!a) continue;
    const speed = (a.results as Partial<ShotAnalysis> | null)?.speed ?? null;
    points.push({
      shotId: s.id, number: s.number, firedAt: s.firedAt, tubePressurePa: s.tubePressurePa, sealType: s.sealType,
      ambientPressurePa: s.ambientPressurePa, ambientTemperatureK: s.ambientTemperatureK,
      projectileId: s.projectileId, projectileName: projectiles.find((p) => p.id === s.projectileId)?.name ?? null,
      speed: speed?.value ?? null, uncertainty: speed?.uncertainty ?? null, method: speed?.method ?? null,
      status: s.status, analysisVersion: a.version, timeBase: timeBaseState(a),
      // "approved" is derived from the review of the current version only (shared/contracts/shot-status.ts).
      signedOff: s.status === 'approved',
    });
  }
  return points;
}
