import type { Response } from 'express';
import type { ShotAnalysis } from '../../../shared/analysis/types.ts';
import { exportQuery, type ExportQuery } from '../../../shared/contracts/review.ts';
import { Analysis, Campaign, Shot } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import { conflict, notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { labOfShot } from '../shots/routes.ts';
import { fitCampaignLauncher } from '../trends/launcher-fit.ts';
import { campaignTrendPoints } from '../trends/trend-points.ts';
import { timeBaseStatus } from '../analyses/time-base-status.ts';
import { namesOf } from '../reviews/people.ts';
import { CAMPAIGN_COLUMNS, campaignRows, SHOT_COLUMNS, shotRows, type ShotTimeBase } from './rows.ts';
import { csvWords } from './csv-words.ts';
import { fileSlug, toCsv, type CsvValue } from './to-csv.ts';

function send<K extends string>(res: Response, format: 'csv' | 'json', fileBase: string, columns: readonly (readonly [K, string])[], rows: Record<K, CsvValue>[], meta: object) {
  res.attachment(`${fileBase}.${format}`);
  if (format === 'json') {
    res.type('application/json').send(JSON.stringify({ ...meta, rows }, null, 2));
    return;
  }
  res.type('text/csv; charset=utf-8').send(toCsv(columns.map(([, label]) => label), rows.map((r) => columns.map(([key]) => csvWords(key, r[key])))));
}

export function exportRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/campaigns/:campaignId/export',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "The campaign's shots and results as a CSV or JSON file (one row per shot; lab units: kPa, °C; a Signed off column; shots=signed-off keeps only signed-off shots); " +
        'the CSV rounds each speed to its U (precision=full for every digit); the JSON file is full precision and also carries the launcher model fitted to the shots (launcherFit, SI units)',
      query: exportQuery,
      response: { status: 200, description: 'A CSV (text/csv) or JSON file, as an attachment' },
      async handler(req, res) {
        const { format, shots, precision } = res.locals.query as ExportQuery;
        const campaign = await Campaign.findOne({ where: { id: req.params.campaignId as string, labId: req.lab!.id } });
        if (!campaign) throw notFound('No such campaign.');
        // JSON keeps every number as computed; the CSV is rounded to each value's uncertainty unless asked otherwise.
        const rows = await campaignRows(campaign, { shots, precision: format === 'csv' ? precision : 'full' });
        await recordAudit({ labId: campaign.labId, actorId: req.auth!.userId, action: 'campaign.exported', targetType: 'campaign', targetId: campaign.id, details: { format, shots: rows.length, selection: shots, ...(format === 'csv' ? { precision } : {}) }, ip: clientIp(req) });
        // JSON carries the launcher model fitted to the exported shots beside the rows (SI units); CSV stays one row per shot.
        const points = format === 'json' ? await campaignTrendPoints(campaign) : [];
        const launcherFit = format === 'json' ? await fitCampaignLauncher(campaign, shots === 'signed-off' ? points.filter((p) => p.signedOff) : points) : undefined;
        send(res, format, `${fileSlug(campaign.name)}-shots${shots === 'signed-off' ? '-signed-off' : ''}`, CAMPAIGN_COLUMNS, rows, { campaign: { id: campaign.id, name: campaign.name }, shots, exportedAt: new Date().toISOString(), launcherFit });
      },
    },
    {
      method: 'get',
      path: '/api/shots/:shotId/export',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfShot },
      summary: "The current analysis's gate crossings, pulses and speed lines as a CSV or JSON file (SI units; the CSV rounds each speed to its U unless precision=full; shots does not apply). " +
        'A version marked "check the time base" leads the CSV with a "time base" record saying why (and its speed line says so); the JSON carries timeBaseCheck {state, reasons, confirmation}',
      query: exportQuery,
      response: { status: 200, description: 'A CSV (text/csv) or JSON file, as an attachment' },
      async handler(req, res) {
        const { format, precision } = res.locals.query as ExportQuery;
        const shot = await Shot.findOne({ where: { id: req.params.shotId as string, labId: req.lab!.id } });
        if (!shot) throw notFound('No such shot.');
        const analysis = shot.currentAnalysisId ? await Analysis.findByPk(shot.currentAnalysisId) : null;
        if (!analysis || analysis.state !== 'done') throw conflict('This shot has no finished analysis to export yet.');
        const campaign = await Campaign.findByPk(shot.campaignId, { attributes: ['name'] });
        const status = timeBaseStatus(analysis, await namesOf(analysis.timeBaseConfirmedBy ? [analysis.timeBaseConfirmedBy] : []));
        const timeBase: ShotTimeBase = {
          state: !status.flagged ? null : status.confirmation ? 'confirmed' : 'unchecked',
          reasons: status.reasons.map((r) => ({ code: r.code, message: r.message })),
          confirmation: status.confirmation ? { by: status.confirmation.by?.name ?? null, at: new Date(status.confirmation.at).toISOString(), note: status.confirmation.note } : null,
        };
        const rows = shotRows(analysis.results as Partial<ShotAnalysis> | null, format === 'csv' ? precision : 'full', timeBase);
        await recordAudit({ labId: shot.labId, actorId: req.auth!.userId, action: 'shot.exported', targetType: 'shot', targetId: shot.id, details: { format, version: analysis.version }, ip: clientIp(req) });
        send(res, format, `${fileSlug(campaign?.name ?? 'campaign')}-shot-${shot.number}-v${analysis.version}`, SHOT_COLUMNS, rows, {
          shot: { id: shot.id, number: shot.number, campaign: campaign?.name ?? null }, analysisVersion: analysis.version, exportedAt: new Date().toISOString(),
          // "check the time base": state null (not flagged), "unchecked" (not a measurement yet) or "confirmed".
          timeBaseCheck: timeBase,
        });
      },
    },
  ];
}
