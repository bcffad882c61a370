import { batchRequestBody, campaignSettingsBody, type BatchRequestBody, type CampaignSettingsBody } from '../../../shared/contracts/analysis-settings.ts';
import { AnalysisBatch } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { campaignInLab } from '../campaigns/routes.ts';
import { batchListView, batchView, createBatch } from './service.ts';

export function batchRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'put',
      path: '/api/labs/:labId/campaigns/:campaignId/analysis-settings',
      access: { kind: 'lab', permission: 'analyses:write' },
      summary: "Set (or clear, with null) the campaign's default analysis settings: threshold, hysteresis, smoothing, polarity, edges, gate mapping. New shots are analysed with them.",
      body: campaignSettingsBody,
      async handler(req, res) {
        const c = await campaignInLab(req);
        const { settings } = req.body as CampaignSettingsBody;
        const before = c.analysisSettings ?? null;
        await c.update({ analysisSettings: settings as Record<string, unknown> | null });
        await recordAudit({
          labId: c.labId, actorId: req.auth!.userId, action: 'campaign.analysis_settings', targetType: 'campaign', targetId: c.id,
          details: { before, after: settings }, ip: clientIp(req),
        });
        res.json({ campaignId: c.id, analysisSettings: c.analysisSettings ?? null });
      },
    },
    {
      method: 'post',
      path: '/api/labs/:labId/campaigns/:campaignId/batches',
      access: { kind: 'lab', permission: 'analyses:write' },
      summary: 'Recompute chosen shots of a campaign (shotIds) or all of them (all: true) with a set of settings: one new version per shot, checked before any job is queued',
      response: { status: 202, description: 'The batch, its progress and its shots' },
      body: batchRequestBody,
      async handler(req, res) {
        const c = await campaignInLab(req);
        const body = req.body as BatchRequestBody;
        const { batch, analyses } = await createBatch(deps.sequelize, {
          labId: c.labId, campaignId: c.id, settings: body.settings, shotIds: body.all ? 'all' : body.shotIds!, requestedBy: req.auth!.userId,
        });
        const ip = clientIp(req);
        await recordAudit({
          labId: c.labId, actorId: req.auth!.userId, action: 'batch.requested', targetType: 'campaign', targetId: c.id,
          details: { batchId: batch.id, settings: body.settings, shots: analyses.length, skipped: batch.skipped }, ip,
        });
        for (const a of analyses) {
          await recordAudit({
            labId: c.labId, actorId: req.auth!.userId, action: 'analysis.requested', targetType: 'shot', targetId: a.shotId,
            details: { version: a.version, batchId: batch.id }, ip,
          });
        }
        for (const a of analyses) await deps.queues.addAnalysisOrDefer({ analysisId: a.id }, deps.logger);
        res.status(202).json(await batchView(batch));
      },
    },
    {
      method: 'get',
      path: '/api/labs/:labId/campaigns/:campaignId/batches',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "The campaign's batch recomputes, newest first, with their progress",
      async handler(req, res) {
        const c = await campaignInLab(req);
        const batches = await AnalysisBatch.findAll({ where: { campaignId: c.id, labId: c.labId }, order: [['createdAt', 'DESC']], limit: 100 });
        res.json({ batches: await Promise.all(batches.map(batchListView)) });
      },
    },
    {
      method: 'get',
      path: '/api/labs/:labId/batches/:batchId',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "One batch recompute: progress, and each shot's speed before and after, the change in units of U, method and gate changes",
      async handler(req, res) {
        const batch = await AnalysisBatch.findOne({ where: { id: req.params.batchId as string, labId: req.lab!.id } });
        if (!batch) throw notFound('No such batch in this lab.');
        res.json(await batchView(batch));
      },
    },
  ];
}
