import type { Request } from 'express';
import { campaignBody, campaignPatchBody, type CampaignBody, type CampaignPatchBody } from '../../../shared/contracts/auth.ts';
import { Campaign, Shot } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import { conflict, notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { shotSummary } from '../shots/view.ts';
import type { NeededCondition } from '../../../shared/contracts/shots.ts';
import { missingConditions } from '../../../shared/contracts/shots.ts';
import { campaignNeeds } from './needed-conditions.ts';
import { UniqueConstraintError, fn, col } from 'sequelize';

/** The campaign of `:campaignId` in the caller's lab (the access guard has already placed the caller in that lab). */
export async function campaignInLab(req: Request): Promise<Campaign> {
  const c = await Campaign.findOne({ where: { id: req.params.campaignId as string, labId: req.lab!.id } });
  if (!c) throw notFound('No such campaign in this lab.');
  return c;
}

/**
 * What every campaign route answers for one campaign. `neededConditions`: what its shots must log for its analysis
 * and trends (shared/contracts/shots.ts neededConditions), as the new-shot form and "conditions missing" say it.
 */
function campaignView(c: Campaign, shotCount: number, needed: NeededCondition[]) {
  return {
    id: c.id, name: c.name, description: c.description, startedOn: c.startedOn, tubeLengthM: c.tubeLengthM ?? null, boreM: c.boreM ?? null,
    analysisSettings: c.analysisSettings ?? null, shotCount, neededConditions: needed,
  };
}
const neededOf = async (c: Campaign) => (await campaignNeeds([c])).get(c.id)!;

export function campaignRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/campaigns',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "The lab's campaigns with their shot counts and the conditions their shots need (neededConditions: key, label, why)",
      async handler(req, res) {
        const campaigns = await Campaign.findAll({ where: { labId: req.lab!.id }, order: [['startedOn', 'DESC NULLS LAST'], ['name', 'ASC']] });
        const counts = (await Shot.findAll({
          where: { labId: req.lab!.id, deletedAt: null },
          attributes: ['campaignId', [fn('count', col('id')), 'n']],
          group: ['campaignId'],
          raw: true,
        })) as unknown as { campaignId: string; n: string }[];
        const byCampaign = new Map(counts.map((c) => [c.campaignId, Number(c.n)]));
        const needs = await campaignNeeds(campaigns);
        res.json({
          campaigns: campaigns.map((c) => campaignView(c, byCampaign.get(c.id) ?? 0, needs.get(c.id)!)),
        });
      },
    },
    {
      method: 'post',
      path: '/api/labs/:labId/campaigns',
      access: { kind: 'lab', permission: 'campaigns:write' },
      summary: 'Start a campaign',
      body: campaignBody,
      async handler(req, res) {
        const body = req.body as CampaignBody;
        try {
          const c = await Campaign.create({
            labId: req.lab!.id, name: body.name, description: body.description, startedOn: body.startedOn ?? null,
            tubeLengthM: body.tubeLengthM ?? null, boreM: body.boreM ?? null, createdBy: req.auth!.userId,
          });
          await recordAudit({ labId: req.lab!.id, actorId: req.auth!.userId, action: 'campaign.created', targetType: 'campaign', targetId: c.id, details: { name: c.name }, ip: clientIp(req) });
          res.status(201).json({ campaign: campaignView(c, 0, await neededOf(c)) });
        } catch (err) {
          if (err instanceof UniqueConstraintError) throw conflict(`This lab already has a campaign named "${body.name}".`);
          throw err;
        }
      },
    },
    {
      method: 'get',
      path: '/api/labs/:labId/campaigns/:campaignId',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: 'One campaign and its shots; each shot lists the needed conditions it lacks (missingConditions, the labels of campaign.neededConditions)',
      async handler(req, res) {
        const c = await campaignInLab(req);
        const shots = await Shot.findAll({ where: { campaignId: c.id, labId: req.lab!.id, deletedAt: null }, order: [['number', 'ASC']] });
        const needed = await neededOf(c);
        res.json({
          campaign: campaignView(c, shots.length, needed),
          shots: shots.map((s) => { const v = shotSummary(s); return { ...v, missingConditions: missingConditions(v, needed) }; }),
        });
      },
    },
    {
      method: 'patch',
      path: '/api/labs/:labId/campaigns/:campaignId',
      access: { kind: 'lab', permission: 'campaigns:write' },
      summary: "Correct a campaign's name, description, start date or launcher (tube length and bore)",
      body: campaignPatchBody,
      async handler(req, res) {
        const c = await campaignInLab(req);
        const changes = req.body as CampaignPatchBody;
        const before = Object.fromEntries(Object.keys(changes).map((k) => [k, (c.get(k) as unknown) ?? null]));
        try {
          await c.update(changes);
        } catch (err) {
          if (err instanceof UniqueConstraintError) throw conflict(`This lab already has a campaign named "${changes.name}".`);
          throw err;
        }
        await recordAudit({ labId: c.labId, actorId: req.auth!.userId, action: 'campaign.updated', targetType: 'campaign', targetId: c.id, details: { before, after: changes }, ip: clientIp(req) });
        res.json({ campaign: campaignView(c, await Shot.count({ where: { campaignId: c.id, labId: c.labId, deletedAt: null } }), await neededOf(c)) });
      },
    },
  ];
}
