import { randomUUID } from 'node:crypto';
import diff from 'microdiff';
import * as z from 'zod';
import { Analysis, Capture, Shot } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { badRequest, conflict, notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { settleShot } from '../shots/settle-shot.ts';
import {
  requestAnalysisBody, reingestBody, timeBaseConfirmationBody, type ImportOverrides, type TimeBaseConfirmationBody,
} from '../../../shared/contracts/shots.ts';
import type { AnalysisOptionsInput } from '../../../shared/contracts/analysis.ts';
import { namesOf } from '../reviews/people.ts';
import { labOfShot, shotInLab } from '../shots/routes.ts';
import { analysisSummary, analysisView, captureView } from '../shots/view.ts';
import { createAnalysisVersion } from './service.ts';
import { timeBaseStatus } from './time-base-status.ts';

async function analysisOfShot(shot: Shot, analysisId: string): Promise<Analysis> {
  const analysis = await Analysis.findOne({ where: { id: analysisId, shotId: shot.id } });
  if (!analysis) throw notFound('No such analysis version of this shot.');
  return analysis;
}

const pathOf = (p: (string | number)[]) => p.map((k) => (typeof k === 'number' ? `[${k}]` : `.${k}`)).join('').replace(/^\./, '');

/** What changed between two versions, as JSON paths with the value before and after. */
export function diffVersions(a: Analysis, b: Analysis) {
  const changes = (x: unknown, y: unknown) =>
    diff((x ?? {}) as Record<string, unknown>, (y ?? {}) as Record<string, unknown>).map((d) => ({
      path: pathOf(d.path),
      kind: d.type === 'CREATE' ? 'added' : d.type === 'REMOVE' ? 'removed' : 'changed',
      from: 'oldValue' in d ? d.oldValue : undefined,
      to: 'value' in d ? d.value : undefined,
    }));
  return {
    from: analysisSummary(a),
    to: analysisSummary(b),
    engineChanged: a.engineVersion !== b.engineVersion,
    parameters: changes(a.parameters, b.parameters),
    // The options echo inside the results repeats the parameters; compare the results proper.
    results: changes(stripOptions(a.results), stripOptions(b.results)),
    /** The speed of each version whole (value ± U, m/s), for the headline "Speed: x ± U → y ± U". */
    speed: { from: speedOf(a.results), to: speedOf(b.results) },
    /** Each version's uncertainty budget whole (group, contribution m/s, share), so its rows can be named by source. */
    budget: { from: budgetOf(a.results), to: budgetOf(b.results) },
    /** How each version's threshold is expressed ("percent" or "volts"), to word its level. */
    thresholdUnit: { from: thresholdUnitOf(a.parameters), to: thresholdUnitOf(b.parameters) },
  };
}

function speedOf(results: unknown): { value: number; uncertainty: number } | null {
  const s = (results as { speed?: { value?: unknown; uncertainty?: unknown } | null } | null)?.speed;
  return s && typeof s.value === 'number' && typeof s.uncertainty === 'number' ? { value: s.value, uncertainty: s.uncertainty } : null;
}

function budgetOf(results: unknown): { group: string; contribution: number; share: number }[] | null {
  const b = (results as { speed?: { budget?: unknown } | null } | null)?.speed?.budget;
  return Array.isArray(b) ? b.map((l: { group: string; contribution: number; share: number }) => ({ group: l.group, contribution: l.contribution, share: l.share })) : null;
}

function thresholdUnitOf(parameters: unknown): 'percent' | 'volts' {
  return (parameters as { threshold?: { unit?: string } } | null)?.threshold?.unit === 'volts' ? 'volts' : 'percent';
}

function stripOptions(results: unknown): unknown {
  if (!results || typeof results !== 'object') return results;
  const { options: _options, ...rest } = results as Record<string, unknown>;
  return rest;
}

export function analysisRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/shots/:shotId/analyses',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfShot },
      summary: "The shot's analysis versions, newest first (without results)",
      async handler(req, res) {
        const shot = await shotInLab(req);
        const rows = await Analysis.findAll({ where: { shotId: shot.id }, order: [['version', 'DESC']], attributes: { exclude: ['results'] } });
        res.json({ analyses: rows.map(analysisSummary), currentAnalysisId: shot.currentAnalysisId });
      },
    },
    {
      method: 'post',
      path: '/api/shots/:shotId/analyses',
      access: { kind: 'lab', permission: 'analyses:write', labOf: labOfShot },
      summary: 'Recompute with new parameters: queues a new analysis version (send Idempotency-Key to make retries safe)',
      body: requestAnalysisBody,
      async handler(req, res) {
        const shot = await shotInLab(req);
        const key = req.get('idempotency-key');
        const idempotency = key ? z.string().min(8).max(200).regex(/^[\w.-]+$/).safeParse(key) : null;
        if (idempotency && !idempotency.success) throw badRequest('Idempotency-Key must be 8–200 letters, digits, dots, dashes or underscores.');
        const jobKey = `request-${shot.id}-${idempotency?.data ?? randomUUID()}`;
        const { analysis, created } = await createAnalysisVersion(deps.sequelize, {
          shotId: shot.id,
          parametersInput: (req.body as { parameters: AnalysisOptionsInput }).parameters,
          requestedBy: req.auth!.userId,
          jobKey,
        });
        if (created) {
          await recordAudit({ labId: shot.labId, actorId: req.auth!.userId, action: 'analysis.requested', targetType: 'shot', targetId: shot.id, details: { version: analysis.version }, ip: clientIp(req) });
        }
        await deps.queues.addAnalysisOrDefer({ analysisId: analysis.id }, deps.logger);
        res.status(created ? 202 : 200).json({ analysis: analysisSummary(analysis) });
      },
    },
    {
      method: 'get',
      path: '/api/shots/:shotId/analyses/:analysisId',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfShot },
      summary: 'One analysis version: parameters, engine version, results',
      async handler(req, res) {
        const shot = await shotInLab(req);
        const analysis = await analysisOfShot(shot, req.params.analysisId as string);
        res.json({ analysis: analysisView(analysis, await namesOf([analysis.timeBaseConfirmedBy])) });
      },
    },
    {
      method: 'post',
      path: '/api/shots/:shotId/analyses/:analysisId/time-base-confirmation',
      access: { kind: 'lab', permission: 'analyses:write', labOf: labOfShot },
      summary:
        '"I checked the time base": confirms the read behind a version marked "check the time base", so review may approve it. ' +
        'Answers with the version\'s `timeBaseCheck` (flagged, reasons, confirmation, blocksApproval); 409 when the version is not ' +
        'finished, not flagged or already confirmed',
      body: timeBaseConfirmationBody,
      response: { status: 201, description: 'The confirmation, in the version\'s timeBaseCheck' },
      async handler(req, res) {
        const shot = await shotInLab(req);
        const { note } = req.body as TimeBaseConfirmationBody;
        const userId = req.auth!.userId;
        const analysis = await deps.sequelize.transaction(async (transaction) => {
          const a = await Analysis.findOne({ where: { id: req.params.analysisId as string, shotId: shot.id }, transaction, lock: transaction.LOCK.UPDATE });
          if (!a) throw notFound('No such analysis version of this shot.');
          if (a.state !== 'done') throw conflict(`Version ${a.version} has not finished; there is no result to confirm yet.`);
          const status = timeBaseStatus(a);
          if (!status.flagged) throw conflict(`Version ${a.version} is not marked "check the time base"; there is nothing to confirm.`);
          if (status.confirmation) {
            const who = (await namesOf([a.timeBaseConfirmedBy])).get(a.timeBaseConfirmedBy ?? '') ?? 'a former member';
            throw conflict(`The time base of version ${a.version} was already confirmed by ${who} on ${status.confirmation.at.toISOString().slice(0, 10)}.`);
          }
          return a.update({ timeBaseConfirmedBy: userId, timeBaseConfirmedAt: new Date(), timeBaseConfirmationNote: note }, { transaction });
        });
        const status = timeBaseStatus(analysis, await namesOf([userId]));
        await recordAudit({
          labId: shot.labId, actorId: userId, action: 'analysis.time_base_confirmed', targetType: 'shot', targetId: shot.id,
          details: { analysisId: analysis.id, version: analysis.version, note, reasons: status.reasons.map((r) => r.message) }, ip: clientIp(req),
        });
        res.status(201).json({ analysisId: analysis.id, version: analysis.version, timeBaseCheck: status });
      },
    },
    {
      method: 'get',
      path: '/api/shots/:shotId/analyses/:analysisId/diff/:otherId',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfShot },
      summary: 'What changed between two analysis versions: parameters and results (JSON paths, before and after), each version\'s speed (value, uncertainty) and uncertainty budget (group, contribution, share), and threshold unit',
      async handler(req, res) {
        const shot = await shotInLab(req);
        const [a, b] = await Promise.all([
          analysisOfShot(shot, req.params.analysisId as string),
          analysisOfShot(shot, req.params.otherId as string),
        ]);
        res.json(diffVersions(a, b));
      },
    },
    {
      method: 'post',
      path: '/api/shots/:shotId/captures/:captureId/reingest',
      access: { kind: 'lab', permission: 'shots:write', labOf: labOfShot },
      summary: 'Read a capture again, with importer overrides (column roles, units, time base) when detection got it wrong',
      body: reingestBody,
      async handler(req, res) {
        const shot = await shotInLab(req);
        const capture = await Capture.findOne({ where: { id: req.params.captureId as string, shotId: shot.id, removedAt: null } });
        if (!capture) throw notFound('No such capture on this shot.');
        if (capture.state === 'queued' || capture.state === 'reading') throw conflict('This capture is being read right now; wait for it to finish.');
        const { importOptions } = req.body as { importOptions: ImportOverrides };
        await capture.update({ importOptions, ingestAttempt: capture.ingestAttempt + 1, state: 'queued', progress: 0, error: null });
        await settleShot(shot.id);
        await recordAudit({ labId: shot.labId, actorId: req.auth!.userId, action: 'capture.reingest', targetType: 'shot', targetId: shot.id, details: { captureId: capture.id, importOptions }, ip: clientIp(req) });
        await deps.queues.addIngestOrDefer({ captureId: capture.id, attempt: capture.ingestAttempt }, deps.logger);
        res.status(202).json({ capture: captureView(capture) });
      },
    },
  ];
}
