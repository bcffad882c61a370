import type { Request } from 'express';
import * as z from 'zod';
import { col, literal, Op, Transaction, UniqueConstraintError, type Order } from 'sequelize';
import { createShotBody, missingConditions, updateShotBody, type CreateShotBody, type UpdateShotBody } from '../../../shared/contracts/shots.ts';
import { Analysis, Campaign, Capture, GateRig, Projectile, Review, Shot } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { badRequest, conflict, notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { namesOf } from '../reviews/people.ts';
import type { AnalysisOptionsInput } from '../../../shared/contracts/analysis.ts';
import { combinedChannelNames, createAnalysisVersion, defaultParameters, readyCaptures } from '../analyses/service.ts';
import { campaignNeeds } from '../campaigns/needed-conditions.ts';
import { endCaptureRead } from './end-capture-read.ts';
import { settleShot } from './settle-shot.ts';
import { acceptUpload } from './uploads.ts';
import { analysisSummary, analysisView, captureView, shotSummary } from './view.ts';

const shotListQuery = z.object({
  campaignId: z.uuid('campaignId must be a campaign id').optional(),
  status: z.string().transform((s) => s.split(',')).pipe(z.array(z.enum(['draft', 'processing', 'analysed', 'in_review', 'approved', 'returned', 'failed']))).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
  offset: z.coerce.number().int().min(0).default(0),
  /** `field` or `field:asc|desc`; without it, newest first (as before). */
  sort: z.string().regex(/^(number|firedAt|tubePressure|speed|status)(:(asc|desc))?$/, 'sort must be one of number, firedAt, tubePressure, speed, status, optionally followed by :asc or :desc (e.g. speed:desc)').optional(),
  /** Words to find in the notes or the seal type (case-insensitive). */
  q: z.string().trim().max(200).optional(),
  /** `only`: the deleted shots (to restore one); by default deleted shots are left out. */
  deleted: z.enum(['only']).optional(),
});

/** `fileName`: the name of the one file sent as the request body (a multipart upload names its files itself). */
const uploadQuery = z.object({
  fileName: z.string()
    .min(1, 'fileName must not be empty')
    .max(255, 'fileName must be at most 255 characters')
    // eslint-disable-next-line no-control-regex -- control characters (NUL among them) are what it refuses.
    .regex(/^[^\u0000-\u001f\u007f]*$/, 'fileName must not hold control characters')
    .optional(),
});

/** The current analysis's speed as a number, or NULL when there is none (a missed speed, a failed or queued analysis). */
const SPEED_SQL = `(SELECT CASE WHEN jsonb_typeof(a.results #> '{speed,value}') = 'number' THEN (a.results #>> '{speed,value}')::float8 END
  FROM analyses a WHERE a.id = "Shot"."current_analysis_id" AND a.lab_id = "Shot"."lab_id")`;
/** Statuses in the order a shot moves through them, so sorting by status reads like the workflow. */
const STATUS_ORDER_SQL = `CASE "Shot"."status" WHEN 'draft' THEN 0 WHEN 'processing' THEN 1 WHEN 'failed' THEN 2 WHEN 'analysed' THEN 3
  WHEN 'in_review' THEN 4 WHEN 'returned' THEN 5 WHEN 'approved' THEN 6 ELSE 7 END`;
const SORT_COLUMNS = { number: col('Shot.number'), firedAt: col('Shot.fired_at'), tubePressure: col('Shot.tube_pressure_pa'), speed: literal(SPEED_SQL), status: literal(STATUS_ORDER_SQL) };

const finiteOrNull = (x: unknown) => (typeof x === 'number' && Number.isFinite(x) ? x : null);

/** Routes addressed by a shot id find their lab from the shot itself. */
export async function labOfShot(req: Request): Promise<string | null> {
  const shot = await Shot.findByPk(req.params.shotId as string, { attributes: ['labId'] });
  return shot?.labId ?? null;
}

/** The shot of `:shotId` in the caller's lab (the access guard has already placed the caller in that lab). */
export async function shotInLab(req: Request): Promise<Shot> {
  const shot = await Shot.findOne({ where: { id: req.params.shotId as string, labId: req.lab!.id } });
  if (!shot) throw notFound('No such shot.');
  return shot;
}

/** Deletes or restores a shot (a repeat changes nothing), audited with what it was. */
async function markDeleted(req: Request, shot: Shot, deleted: boolean): Promise<Shot> {
  if (!!shot.deletedAt === deleted) return shot;
  const was = { number: shot.number, status: shot.status, deletedAt: shot.deletedAt };
  await shot.update(deleted ? { deletedAt: new Date(), deletedBy: req.auth!.userId } : { deletedAt: null, deletedBy: null });
  await recordAudit({ labId: shot.labId, actorId: req.auth!.userId, action: deleted ? 'shot.deleted' : 'shot.restored', targetType: 'shot', targetId: shot.id, details: was, ip: clientIp(req) });
  await settleShot(shot.id);
  return shot;
}

function refuseDeleted(shot: Shot) {
  if (shot.deletedAt) throw conflict('This shot is deleted; a lab admin can restore it first.');
}

/**
 * The parameters of the version made after a file was removed: the current version's settings when every gate it
 * names is still in the remaining files (the analyst's choices carry over), else the defaults for what is left.
 */
async function parametersAfterRemoval(shot: Shot): Promise<AnalysisOptionsInput> {
  const remaining = await readyCaptures(shot.id);
  const names = combinedChannelNames(remaining);
  const current = shot.currentAnalysisId ? await Analysis.findByPk(shot.currentAnalysisId, { attributes: ['parameters'] }) : null;
  const params = current?.parameters as AnalysisOptionsInput | undefined;
  if (params && (params.gates ?? []).every((g) => names.includes(g.channel))) return params;
  return defaultParameters(shot, names);
}

/** Projectile and rig must belong to the shot's lab (the database enforces it too; this gives the clear message). */
async function checkLibraryRefs(labId: string, body: UpdateShotBody) {
  if (body.projectileId && !(await Projectile.count({ where: { id: body.projectileId, labId } }))) {
    throw badRequest('Please correct the request: projectileId: no such projectile in this lab.');
  }
  if (body.gateRigId && !(await GateRig.count({ where: { id: body.gateRigId, labId } }))) {
    throw badRequest('Please correct the request: gateRigId: no such gate rig in this lab.');
  }
}

function conditionsOf(body: UpdateShotBody) {
  const out: Record<string, unknown> = {};
  for (const key of ['projectileId', 'gateRigId', 'tubePressurePa', 'sealType', 'ambientTemperatureK', 'ambientPressurePa', 'notes'] as const) {
    if (body[key] !== undefined) out[key] = body[key];
  }
  if (body.firedAt !== undefined) out.firedAt = body.firedAt ? new Date(body.firedAt) : null;
  return out;
}

export async function shotDetail(shot: Shot) {
  // One snapshot for the shot, its files and its versions: read one after the other outside a transaction, a
  // version could be seen still running beside a status the worker had written after finishing it ("analysed"
  // next to "running", seen by the status tests on a busy machine).
  const { captures, analyses, current } = await shot.sequelize.transaction(
    { isolationLevel: Transaction.ISOLATION_LEVELS.REPEATABLE_READ },
    async (transaction) => {
      const found = {
        captures: await Capture.findAll({ where: { shotId: shot.id }, order: [['uploadedAt', 'ASC'], ['id', 'ASC']], transaction }),
        analyses: await Analysis.findAll({ where: { shotId: shot.id }, order: [['version', 'DESC']], attributes: { exclude: ['results', 'parameters'] }, transaction }),
      };
      await shot.reload({ transaction });
      return { ...found, current: shot.currentAnalysisId ? await Analysis.findByPk(shot.currentAnalysisId, { transaction }) : null };
    },
  );
  const names = await namesOf([current?.timeBaseConfirmedBy, ...analyses.map((a) => a.requestedBy)]);
  const campaign = await Campaign.findOne({ where: { id: shot.campaignId, labId: shot.labId } });
  const needed = campaign ? (await campaignNeeds([campaign])).get(campaign.id) ?? [] : [];
  const summary = shotSummary(shot);
  return {
    // missingConditions: what the campaign needs (campaign.neededConditions) that this shot has not logged.
    shot: { ...summary, missingConditions: missingConditions(summary, needed) },
    captures: captures.map(captureView),
    // Who asked for each version (null: made automatically when the files were read).
    analyses: analyses.map((a) => ({ ...analysisSummary(a), requestedByName: a.requestedBy ? names.get(a.requestedBy) ?? null : null })),
    currentAnalysis: current ? analysisView(current, names) : null,
  };
}

export function shotRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'post',
      path: '/api/labs/:labId/shots',
      access: { kind: 'lab', permission: 'shots:write' },
      summary: 'Log a new shot in a campaign, with its conditions',
      response: { status: 201, description: 'The new shot' },
      body: createShotBody,
      async handler(req, res) {
        const body = req.body as CreateShotBody;
        const labId = req.lab!.id;
        const campaign = await Campaign.findOne({ where: { id: body.campaignId, labId } });
        if (!campaign) throw badRequest('Please correct the request: campaignId: no such campaign in this lab.');
        await checkLibraryRefs(labId, body);
        try {
          const shot = await deps.sequelize.transaction(async (transaction) => {
            // Lock the campaign so two people logging shots at once get consecutive numbers.
            await Campaign.findByPk(campaign.id, { transaction, lock: transaction.LOCK.UPDATE });
            const last = (await Shot.max('number', { where: { campaignId: campaign.id }, transaction })) as number | null;
            return Shot.create(
              { labId, campaignId: campaign.id, number: body.number ?? (last ?? 0) + 1, createdBy: req.auth!.userId, firedAt: null,
                projectileId: null, gateRigId: null, tubePressurePa: null, ambientTemperatureK: null, ambientPressurePa: null,
                ...conditionsOf(body) },
              { transaction },
            );
          });
          await recordAudit({ labId, actorId: req.auth!.userId, action: 'shot.created', targetType: 'shot', targetId: shot.id, details: { campaign: campaign.name, number: shot.number }, ip: clientIp(req) });
          res.status(201).json({ shot: shotSummary(shot) });
        } catch (err) {
          if (err instanceof UniqueConstraintError) throw conflict(`Shot #${body.number} already exists in ${campaign.name}.`);
          throw err;
        }
      },
    },
    {
      method: 'get',
      path: '/api/shots/:shotId',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfShot },
      summary: 'One shot: its conditions (and shot.missingConditions: what its campaign needs that it has not logged), captures with their states, analysis versions and the current analysis',
      async handler(req, res) {
        res.json(await shotDetail(await shotInLab(req)));
      },
    },
    {
      method: 'patch',
      path: '/api/shots/:shotId',
      access: { kind: 'lab', permission: 'shots:write', labOf: labOfShot },
      summary: "Correct a shot's logged conditions",
      body: updateShotBody,
      async handler(req, res) {
        const shot = await shotInLab(req);
        // Sign-off rule (issue 7): conditions and files change only while the shot is not approved. An analyst may still
        // recompute an approved shot; the new version becomes current, the shot goes back to `analysed` (editable
        // again) and needs a new review, while the approval of the old version stays on record.
        if (shot.status === 'approved') throw conflict('This shot is signed off; its conditions can no longer change.');
        refuseDeleted(shot);
        const body = req.body as UpdateShotBody;
        await checkLibraryRefs(shot.labId, body);
        const changes = conditionsOf(body);
        const before = Object.fromEntries(Object.keys(changes).map((k) => [k, (shot.get(k) as unknown) ?? null]));
        await shot.update(changes);
        await recordAudit({ labId: shot.labId, actorId: req.auth!.userId, action: 'shot.updated', targetType: 'shot', targetId: shot.id, details: { before, after: changes }, ip: clientIp(req) });
        res.json({ shot: shotSummary(shot) });
      },
    },
    {
      method: 'post',
      path: '/api/shots/:shotId/captures',
      access: { kind: 'lab', permission: 'shots:write', labOf: labOfShot },
      summary: 'Upload scope CSV files: several as multipart/form-data (field "files"), or one as the whole request body named by ?fileName= ' +
        '(no multipart encoding: less work on both sides for a large file). Each is stored byte for byte and queued for reading',
      multipartFiles: 'files',
      fileBody: ['text/csv', 'text/plain', 'application/octet-stream'],
      query: uploadQuery,
      response: { status: 202, description: 'The captures, stored and queued for reading' },
      async handler(req, res) {
        const shot = await shotInLab(req);
        if (shot.status === 'approved') throw conflict('This shot is signed off; files can no longer be added.');
        refuseDeleted(shot);
        const { fileName } = res.locals.query as z.infer<typeof uploadQuery>;
        res.status(202).json({ captures: await acceptUpload(deps, req, res, shot, fileName) });
      },
    },
    {
      method: 'delete',
      path: '/api/shots/:shotId',
      access: { kind: 'lab', permission: 'shots:write', labOf: labOfShot },
      summary: 'Delete a shot logged by mistake: it is marked deleted (audited) and left out of lists, trends and exports; a lab admin can restore it',
      response: { status: 200, description: 'The shot, marked deleted' },
      async handler(req, res) {
        const shot = await shotInLab(req);
        if (shot.status === 'approved') throw conflict('This shot is signed off; it stays on record and cannot be deleted.');
        res.json({ shot: shotSummary(await markDeleted(req, shot, true)) });
      },
    },
    {
      method: 'post',
      path: '/api/shots/:shotId/restore',
      access: { kind: 'lab', permission: 'shots:restore', labOf: labOfShot },
      summary: 'Restore a deleted shot (lab admins): it is back in lists, trends and exports; audited',
      response: { status: 200, description: 'The shot, restored' },
      async handler(req, res) {
        res.json({ shot: shotSummary(await markDeleted(req, await shotInLab(req), false)) });
      },
    },
    {
      method: 'delete',
      path: '/api/shots/:shotId/captures/:captureId',
      access: { kind: 'lab', permission: 'shots:write', labOf: labOfShot },
      summary: 'Remove a file dropped on the wrong shot: its bytes stay stored, the removal is audited, and the shot is analysed again without it',
      response: { status: 200, description: 'The removed capture, and the new analysis version when one was made' },
      async handler(req, res) {
        const shot = await shotInLab(req);
        if (shot.status === 'approved') throw conflict('This shot is signed off; its files can no longer change.');
        refuseDeleted(shot);
        const capture = await Capture.findOne({ where: { id: req.params.captureId as string, shotId: shot.id } });
        if (!capture) throw notFound('No such file on this shot.');
        if (capture.removedAt) return res.json({ capture: captureView(capture), analysis: null });
        const removal = { removedAt: new Date(), removedBy: req.auth!.userId };
        const audit = () => recordAudit({
          labId: shot.labId, actorId: req.auth!.userId, action: 'capture.removed', targetType: 'shot', targetId: shot.id,
          details: { captureId: capture.id, file: capture.fileName, sha256: capture.sha256 }, ip: clientIp(req),
        });
        const current = shot.currentAnalysisId ? await Analysis.findByPk(shot.currentAnalysisId, { attributes: ['id', 'captureIds'] }) : null;
        if (!current || !current.captureIds.includes(capture.id)) {
          // A file no current version reads (refused, still being read, or read after it): with it gone, the files
          // read may be all the shot waited for, and a shot without a version gets its automatic one now, as when a
          // read ends (else the shot would read "failed" beside read files, and a queued file's job, finding it
          // removed, would never make the version). Under the shot's lock with the status (endCaptureRead).
          const { versionMadeId } = await endCaptureRead(deps, shot.id, {
            onlyWithoutCurrent: true,
            write: async (transaction) => {
              await capture.update(removal, { transaction });
              return true;
            },
          });
          await audit();
          const auto = versionMadeId ? await Analysis.findByPk(versionMadeId) : null;
          return res.json({ capture: captureView(capture), analysis: auto ? analysisSummary(auto) : null });
        }
        // The current version read this file: the shot is analysed again from what is left (or has no version).
        await capture.update(removal);
        await audit();
        let made: Analysis | null = null;
        if ((await readyCaptures(shot.id)).length > 0) {
          const { analysis } = await createAnalysisVersion(deps.sequelize, {
            shotId: shot.id, parametersInput: await parametersAfterRemoval(shot), requestedBy: req.auth!.userId, jobKey: `removed-${capture.id}`,
          });
          await deps.queues.addAnalysisOrDefer({ analysisId: analysis.id }, deps.logger);
          made = analysis;
        } else {
          await shot.update({ currentAnalysisId: null, reviewAnalysisId: null });
        }
        await settleShot(shot.id);
        res.json({ capture: captureView(capture), analysis: made ? analysisSummary(made) : null });
      },
    },
    {
      method: 'get',
      path: '/api/labs/:labId/shots',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "Search the lab's shots (by campaign, status, words in notes or seal type), sorted, paginated; each with its current speed ± U, latest review decision and the needed conditions it lacks (missingConditions)",
      query: shotListQuery,
      async handler(req, res) {
        const q = res.locals.query as z.infer<typeof shotListQuery>;
        const { limit, offset } = q;
        const where: Record<string | symbol, unknown> = { labId: req.lab!.id, deletedAt: q.deleted === 'only' ? { [Op.ne]: null } : null };
        if (q.campaignId) where.campaignId = q.campaignId;
        if (q.status) where.status = { [Op.in]: q.status };
        if (q.q) {
          // LIKE's own wildcards typed by a person are meant literally.
          const pattern = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
          where[Op.or] = [{ notes: { [Op.iLike]: pattern } }, { sealType: { [Op.iLike]: pattern } }];
        }
        let order: Order = [['createdAt', 'DESC'], ['number', 'DESC']];
        if (q.sort) {
          const [field, dir = 'asc'] = q.sort.split(':') as [keyof typeof SORT_COLUMNS, string];
          // Empty values (no speed yet, no pressure logged) stay at the bottom either way; ties by shot number, then id.
          order = [[SORT_COLUMNS[field], `${dir.toUpperCase()} NULLS LAST`], [col('Shot.number'), dir.toUpperCase()], [col('Shot.id'), 'ASC']];
        }
        const { rows, count } = await Shot.findAndCountAll({ where, order, limit, offset });
        const needs = await campaignNeeds(await Campaign.findAll({ where: { id: [...new Set(rows.map((s) => s.campaignId))], labId: req.lab!.id } }));
        // Only the speed part of each current analysis is read: full results can be large.
        const analysisIds = rows.map((s) => s.currentAnalysisId).filter((id): id is string => id != null);
        const speeds = new Map<string, Record<string, unknown> | null>();
        if (analysisIds.length > 0) {
          const found = (await Analysis.findAll({
            where: { id: { [Op.in]: analysisIds }, labId: req.lab!.id },
            attributes: ['id', [literal(`results -> 'speed'`), 'speed']],
            raw: true,
          })) as unknown as { id: string; speed: Record<string, unknown> | null }[];
          for (const a of found) speeds.set(a.id, a.speed);
        }
        const reviews = rows.length === 0 ? [] : await Review.findAll({
          where: { shotId: { [Op.in]: rows.map((s) => s.id) }, labId: req.lab!.id },
          attributes: ['shotId', 'decision', 'createdAt'],
          order: [['createdAt', 'DESC'], ['id', 'DESC']],
        });
        const latestReview = new Map<string, Review>();
        for (const r of reviews) if (!latestReview.has(r.shotId)) latestReview.set(r.shotId, r);
        res.json({
          shots: rows.map((s) => {
            const speed = s.currentAnalysisId ? speeds.get(s.currentAnalysisId) : null;
            const value = finiteOrNull(speed?.value);
            const review = latestReview.get(s.id);
            const summary = shotSummary(s);
            return {
              ...summary,
              // The conditions the shot's campaign needs that it lacks: what "conditions missing" lists.
              missingConditions: missingConditions(summary, needs.get(s.campaignId) ?? []),
              speed: value == null ? null : {
                value, uncertainty: finiteOrNull(speed?.uncertainty), method: typeof speed?.method === 'string' ? speed.method : null,
                basis: typeof speed?.basis === 'string' ? speed.basis : null,
              },
              review: review ? { decision: review.decision, decidedAt: review.createdAt } : null,
            };
          }),
          total: count, limit, offset,
        });
      },
    },
  ];
}
