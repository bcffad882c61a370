import type { ShotAnalysis } from '../../../shared/analysis/types.ts';
import { trendsQuery, type TrendGroupStats, type TrendsQuery } from '../../../shared/contracts/review.ts';
import { Analysis, Campaign, Projectile, Shot } from '../../db/models/index.ts';
import { notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { summarizeSpeeds } from './summarize-speeds.ts';

export function trendRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/campaigns/:campaignId/trends',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: 'Speed ± U of every analysed shot of the campaign, with count, mean, sample standard deviation and extreme spread per seal type, projectile or for all',
      query: trendsQuery,
      async handler(req, res) {
        const q = res.locals.query as TrendsQuery;
        const labId = req.lab!.id;
        const campaign = await Campaign.findOne({ where: { id: req.params.campaignId as string, labId } });
        if (!campaign) throw notFound('No such campaign.');
        const shots = await Shot.findAll({ where: { campaignId: campaign.id, labId }, order: [['number', 'ASC']] });
        const ids = shots.map((s) => s.currentAnalysisId).filter((x): x is string => !!x);
        const [analyses, projectiles] = await Promise.all([
          Analysis.findAll({ where: { id: ids, labId, state: 'done' }, attributes: ['id', 'version', 'results'] }),
          Projectile.findAll({ where: { labId }, attributes: ['id', 'name'] }),
        ]);
        const points = [];
        for (const s of shots) {
          const a = analyses.find((x) => x.id === s.currentAnalysisId);
          if (!a) continue;
          const speed = (a.results as Partial<ShotAnalysis> | null)?.speed ?? null;
          points.push({
            shotId: s.id, number: s.number, firedAt: s.firedAt, tubePressurePa: s.tubePressurePa, sealType: s.sealType,
            ambientPressurePa: s.ambientPressurePa, ambientTemperatureK: s.ambientTemperatureK,
            projectileId: s.projectileId, projectileName: projectiles.find((p) => p.id === s.projectileId)?.name ?? null,
            speed: speed?.value ?? null, uncertainty: speed?.uncertainty ?? null, method: speed?.method ?? null,
            status: s.status, analysisVersion: a.version,
          });
        }
        const groups = new Map<string, { label: string; speeds: number[] }>();
        for (const p of points) {
          const key = q.groupBy === 'seal' ? p.sealType : q.groupBy === 'projectile' ? p.projectileId ?? '' : 'all';
          const label = q.groupBy === 'seal' ? p.sealType || '(no seal logged)' : q.groupBy === 'projectile' ? p.projectileName ?? '(no projectile logged)' : 'All shots';
          const g = groups.get(key) ?? { label, speeds: [] };
          if (p.speed != null) g.speeds.push(p.speed);
          groups.set(key, g);
        }
        const stats: TrendGroupStats[] = [...groups.entries()].map(([key, g]) => ({ key, label: g.label, ...summarizeSpeeds(g.speeds) }));
        res.json({
          campaign: { id: campaign.id, name: campaign.name, tubeLengthM: campaign.tubeLengthM ?? null, boreM: campaign.boreM ?? null },
          groupBy: q.groupBy,
          points,
          groups: stats,
          // Not stored for a campaign: what the client passed for its launcher-model overlay, echoed back (SI).
          launcher: { tubeLengthM: q.tubeLengthM ?? null, boreM: q.boreM ?? null, massKg: q.massKg ?? null },
        });
      },
    },
  ];
}
