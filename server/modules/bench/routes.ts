import { Op } from 'sequelize';
import { z } from 'zod';
import { Analysis, Capture, Shot } from '../../db/models/index.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { campaignInLab } from '../campaigns/routes.ts';
import { benchShotView, type BenchSpeed } from './view.ts';

const benchQuery = z.object({
  /** How many earlier shots the short list shows. */
  recent: z.coerce.number().int().min(1).max(20).default(6),
});

export function benchRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/campaigns/:campaignId/bench',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "What the bench display shows: the campaign's latest shot (speed ± U, method, warnings, where each gate's trace crossed), and the last few shots with their speeds. Cheap enough to poll every second.",
      query: benchQuery,
      async handler(req, res) {
        const { recent } = res.locals.query as z.infer<typeof benchQuery>;
        const campaign = await campaignInLab(req);
        const shots = await Shot.findAll({ where: { campaignId: campaign.id, labId: campaign.labId }, order: [['number', 'DESC']], limit: recent + 1 });
        const analysisIds = shots.map((s) => s.currentAnalysisId).filter((id): id is string => id != null);
        const latest = shots[0] ?? null;
        const [analyses, newest, captures] = await Promise.all([
          analysisIds.length === 0 ? [] : Analysis.findAll({ where: { id: { [Op.in]: analysisIds }, labId: campaign.labId } }),
          latest ? Analysis.findOne({ where: { shotId: latest.id }, order: [['version', 'DESC']], attributes: { exclude: ['results', 'parameters'] } }) : null,
          latest ? Capture.findAll({ where: { shotId: latest.id }, order: [['uploadedAt', 'ASC'], ['id', 'ASC']] }) : [],
        ]);
        const current = new Map(analyses.map((a) => [a.id, a]));
        res.json({
          campaign: { id: campaign.id, name: campaign.name },
          latest: latest ? benchShotView(latest, latest.currentAnalysisId ? current.get(latest.currentAnalysisId) ?? null : null, newest, captures) : null,
          recent: shots.slice(1).map((s) => {
            const a = s.currentAnalysisId ? current.get(s.currentAnalysisId) : undefined;
            const speed = (a?.results as { speed?: BenchSpeed | null } | null)?.speed ?? null;
            return {
              id: s.id, number: s.number, status: s.status, firedAt: s.firedAt,
              speed: speed ? { value: speed.value, uncertainty: speed.uncertainty, method: speed.method, basis: speed.basis } : null,
            };
          }),
        });
      },
    },
  ];
}
