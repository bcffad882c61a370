import { trendsQuery, type TrendGroupStats, type TrendsQuery } from '../../../shared/contracts/review.ts';
import { Campaign } from '../../db/models/index.ts';
import { notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { fitCampaignLauncher } from './launcher-fit.ts';
import { summarizeSpeeds } from './summarize-speeds.ts';
import { NO_PRESSURE_BIN, vacuumBinOf } from './vacuum-bins.ts';
import { campaignTrendPoints } from './trend-points.ts';

export function trendRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/campaigns/:campaignId/trends',
      access: { kind: 'lab', permission: 'lab:read' },
      summary:
        'Speed ± U of every analysed shot of the campaign (signedOff marks a shot whose current version a reviewer signed off; shots=signed-off keeps only those), ' +
        'with count, mean, sample standard deviation, standard error of the mean and extreme spread per seal type, projectile, tube vacuum level (groupBy=vacuum: per decade of pressure, or between vacuumEdgesPa; ' +
        'a spread across a pressure sweep is not a repeatability figure) or for all, and the launcher model with losses fitted to the shots (launcherFit; targetSpeedMs asks what tube vacuum gives that speed). ' +
        'A speed marked "check the time base" and not yet confirmed (timeBase "unchecked") is listed but left out of the statistics and the fit',
      query: trendsQuery,
      async handler(req, res) {
        const q = res.locals.query as TrendsQuery;
        const labId = req.lab!.id;
        const campaign = await Campaign.findOne({ where: { id: req.params.campaignId as string, labId } });
        if (!campaign) throw notFound('No such campaign.');
        const all = await campaignTrendPoints(campaign);
        const points = q.shots === 'signed-off' ? all.filter((p) => p.signedOff) : all;
        const groups = new Map<string, { label: string; speeds: number[]; order: number; range: TrendGroupStats['range'] }>();
        for (const p of points) {
          const bin = q.groupBy === 'vacuum' ? vacuumBinOf(p.tubePressurePa, q.vacuumEdgesPa) : null;
          const key = bin ? bin.key : q.groupBy === 'seal' ? p.sealType : q.groupBy === 'projectile' ? p.projectileId ?? '' : 'all';
          const label = bin ? bin.label : q.groupBy === 'seal' ? p.sealType || '(no seal logged)' : q.groupBy === 'projectile' ? p.projectileName ?? '(no projectile logged)' : 'All shots';
          const g = groups.get(key) ?? { label, speeds: [], order: bin?.order ?? groups.size, range: bin && bin !== NO_PRESSURE_BIN ? { lowPa: bin.lowPa, highPa: bin.highPa } : null };
          if (p.speed != null && p.timeBase !== 'unchecked') g.speeds.push(p.speed);
          groups.set(key, g);
          p.group = key;
        }
        // Vacuum bins from the best vacuum (lowest pressure) up; other groupings in order of first appearance.
        const stats: TrendGroupStats[] = [...groups.entries()].sort(([, a], [, b]) => a.order - b.order)
          .map(([key, g]) => ({ key, label: g.label, ...summarizeSpeeds(g.speeds), ...(q.groupBy === 'vacuum' ? { range: g.range } : {}) }));
        res.json({
          campaign: { id: campaign.id, name: campaign.name, tubeLengthM: campaign.tubeLengthM ?? null, boreM: campaign.boreM ?? null },
          groupBy: q.groupBy,
          shots: q.shots,
          ...(q.groupBy === 'vacuum' ? { vacuumEdgesPa: q.vacuumEdgesPa ?? null } : {}),
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
