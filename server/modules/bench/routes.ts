import { literal, Op } from 'sequelize';
import * as z from 'zod';
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
        const latest = shots[0] ?? null;
        const earlierIds = shots.slice(1).map((s) => s.currentAnalysisId).filter((id): id is string => id != null);
        // Polled every second by every open display: only the latest shot's results are read whole; the earlier
        // shots' only for their speed.
        const [current, newest, captures, speeds] = await Promise.all([
          latest?.currentAnalysisId ? Analysis.findOne({ where: { id: latest.currentAnalysisId, labId: campaign.labId } }) : null,
          latest ? Analysis.findOne({ where: { shotId: latest.id }, order: [['version', 'DESC']], attributes: { exclude: ['results', 'parameters'] } }) : null,
          latest ? Capture.findAll({ where: { shotId: latest.id }, order: [['uploadedAt', 'ASC'], ['id', 'ASC']] }) : [],
          earlierIds.length === 0 ? [] : (Analysis.findAll({
            where: { id: { [Op.in]: earlierIds }, labId: campaign.labId },
            attributes: ['id', [literal(`results -> 'speed'`), 'speed']],
            raw: true,
          }) as unknown as Promise<{ id: string; speed: BenchSpeed | null }[]>),
        ]);
        const speedOf = new Map(speeds.map((a) => [a.id, a.speed]));
        res.json({
          campaign: { id: campaign.id, name: campaign.name },
          latest: latest ? benchShotView(latest, current, newest, captures) : null,
          recent: shots.slice(1).map((s) => {
            const speed = s.currentAnalysisId ? speedOf.get(s.currentAnalysisId) ?? null : null;
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
