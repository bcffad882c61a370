import type { Request } from 'express';
import { z } from 'zod';
import { Op, UniqueConstraintError } from 'sequelize';
import { createShotBody, updateShotBody, type CreateShotBody, type UpdateShotBody } from '../../../shared/contracts/shots.ts';
import { Analysis, Campaign, Capture, GateRig, Projectile, Shot } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { badRequest, conflict, notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { acceptUpload } from './uploads.ts';
import { analysisSummary, analysisView, captureView, shotSummary } from './view.ts';

const shotListQuery = z.object({
  campaignId: z.uuid('campaignId must be a campaign id').optional(),
  status: z.string().transform((s) => s.split(',')).pipe(z.array(z.enum(['draft', 'processing', 'analysed', 'in_review', 'approved', 'returned', 'failed']))).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
  offset: z.coerce.number().int().min(0).default(0),
});

/** Routes addressed by a shot id find their lab from the shot itself. */
export async function labOfShot(req: Request): Promise<string | null> {
  const shot = await Shot.findByPk(req.params.shotId as string, { attributes: ['labId'] });
  return shot?.labId ?? null;
}

async function shotInLab(req: Request): Promise<Shot> {
  const shot = await Shot.findOne({ where: { id: req.params.shotId as string, labId: req.lab!.id } });
  if (!shot) throw notFound('No such shot.');
  return shot;
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
  const [captures, analyses] = await Promise.all([
    Capture.findAll({ where: { shotId: shot.id }, order: [['uploadedAt', 'ASC'], ['id', 'ASC']] }),
    Analysis.findAll({ where: { shotId: shot.id }, order: [['version', 'DESC']], attributes: { exclude: ['results', 'parameters'] } }),
  ]);
  const current = shot.currentAnalysisId ? await Analysis.findByPk(shot.currentAnalysisId) : null;
  return {
    shot: shotSummary(shot),
    captures: captures.map(captureView),
    analyses: analyses.map(analysisSummary),
    currentAnalysis: current ? analysisView(current) : null,
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
      summary: 'One shot: its conditions, captures with their states, analysis versions and the current analysis',
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
        if (shot.status === 'approved') throw conflict('This shot is signed off; its conditions can no longer change.');
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
      summary: 'Upload scope CSV files (multipart field "files"); each is stored byte for byte and queued for reading',
      multipartFiles: 'files',
      response: { status: 202, description: 'The captures, stored and queued for reading' },
      async handler(req, res) {
        const shot = await shotInLab(req);
        if (shot.status === 'approved') throw conflict('This shot is signed off; files can no longer be added.');
        res.status(202).json({ captures: await acceptUpload(deps, req, res, shot) });
      },
    },
    {
      method: 'get',
      path: '/api/labs/:labId/shots',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "Search the lab's shots (by campaign, status), newest first, paginated",
      query: shotListQuery,
      async handler(req, res) {
        const q = res.locals.query as z.infer<typeof shotListQuery>;
        const { limit, offset } = q;
        const where: Record<string, unknown> = { labId: req.lab!.id };
        if (q.campaignId) where.campaignId = q.campaignId;
        if (q.status) where.status = { [Op.in]: q.status };
        const { rows, count } = await Shot.findAndCountAll({ where, order: [['createdAt', 'DESC'], ['number', 'DESC']], limit, offset });
        res.json({ shots: rows.map(shotSummary), total: count, limit, offset });
      },
    },
  ];
}
