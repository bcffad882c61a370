import { trendsQuery, type TrendGroupStats, type TrendsQuery } from '../../../shared/contracts/review.ts';
import { Campaign } from '../../db/models/index.ts';
import { notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { fitCampaignLauncher } from './launcher-fit.ts';
import { summarizeSpeeds } from './summarize-speeds.ts';
import { campaignTrendPoints } from './trend-points.ts';

export function trendRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/campaigns/:campaignId/trends',
      access: { kind: 'lab', permission: 'lab:read' },
      summary:
        'Speed ± U of every analysed shot of the campaign, with count, mean, sample standard deviation and extreme spread per seal type, projectile or for all, and the launcher model with losses fitted to the shots (launcherFit; targetSpeedMs asks what tube vacuum gives that speed). ' +
        'A speed marked "check the time base" and not yet confirmed (timeBase "unchecked") is listed but left out of the statistics and the fit',
      query: trendsQuery,
      async handler(req, res) {
        const q = res.locals.query as TrendsQuery;
        const labId = req.lab!.id;
        const campaign = await Campaign.findOne({ where: { id: req.params.campaignId as string, labId } });
        if (!campaign) throw notFound('No such campaign.');
        const points = await campaignTrendPoints(campaign);
        const groups = new Map<string, { label: string; speeds: number[] }>();
        for (const p of points) {
          const key = q.groupBy === 'seal' ? p.sealType : q.groupBy === 'projectile' ? p.projectileId ?? '' : 'all';
          const label = q.groupBy === 'seal' ? p.sealType || '(no seal logged)' : q.groupBy === 'projectile' ? p.projectileName ?? '(no projectile logged)' : 'All shots';
          const g = groups.get(key) ?? { label, speeds: [] };
          if (p.speed != null && p.timeBase !== 'unchecked') g.speeds.push(p.speed);
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
          // The launcher model with losses fitted to these shots (tube and mass from the query where given).
          launcherFit: await fitCampaignLauncher(campaign, points, q),
        });
      },
    },
  ];
}
