import * as z from 'zod';
import { Op } from 'sequelize';
import { AuditEvent, Campaign, Shot, User } from '../../db/models/index.ts';
import type { RouteDef } from '../../lib/routes.ts';

const auditQuery = z.object({
  limit: z.coerce.number().int().min(1).max(500).default(100),
  /** Only events about this shot. */
  shotId: z.uuid('shotId must be a shot id').optional(),
  /** Only events by this person. */
  actorId: z.uuid('actorId must be a user id').optional(),
  /** Only this kind of event: the part before the dot of `action` (shot, capture, analysis, review, comment, …). */
  kind: z.string().regex(/^[a-z_]+$/, 'kind is the part of an action before its dot, e.g. review').optional(),
});

export function auditRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/audit',
      access: { kind: 'lab', permission: 'audit:read' },
      summary:
        "The lab's audit trail, newest first (append-only); filter by shotId, actorId and kind (e.g. review). Each event names its " +
        'actor and, for shots, the shot number and campaign',
      query: auditQuery,
      async handler(req, res) {
        const q = res.locals.query as z.infer<typeof auditQuery>;
        const where: Record<string | symbol, unknown> = { labId: req.lab!.id };
        if (q.shotId) Object.assign(where, { targetType: 'shot', targetId: q.shotId });
        if (q.actorId) where.actorId = q.actorId;
        if (q.kind) where.action = { [Op.like]: `${q.kind}.%` };
        const rows = await AuditEvent.findAll({ where, order: [['id', 'DESC']], limit: q.limit });
        const actorIds = [...new Set(rows.map((r) => r.actorId).filter((x): x is string => !!x))];
        const actors = new Map((await User.findAll({ where: { id: actorIds }, attributes: ['id', 'name'] })).map((u) => [u.id, u.name]));
        const shotIds = [...new Set(rows.filter((r) => r.targetType === 'shot' && r.targetId).map((r) => r.targetId!))];
        const shots = await Shot.findAll({ where: { id: shotIds, labId: req.lab!.id }, attributes: ['id', 'number', 'campaignId'] });
        const campaignIds = [...new Set([...shots.map((s) => s.campaignId), ...rows.filter((r) => r.targetType === 'campaign' && r.targetId).map((r) => r.targetId!)])];
        const campaigns = new Map((await Campaign.findAll({ where: { id: campaignIds, labId: req.lab!.id }, attributes: ['id', 'name'] })).map((c) => [c.id, c.name]));
        const shotOf = new Map(shots.map((s) => [s.id, { id: s.id, number: s.number, campaignId: s.campaignId, campaignName: campaigns.get(s.campaignId) ?? null }]));
        res.json({
          events: rows.map((e) => ({
            id: e.id, at: e.createdAt, action: e.action, actor: e.actorId ? actors.get(e.actorId) ?? null : null, actorId: e.actorId,
            targetType: e.targetType, targetId: e.targetId, details: e.details,
            shot: e.targetType === 'shot' && e.targetId ? shotOf.get(e.targetId) ?? null : null,
            campaign: e.targetType === 'campaign' && e.targetId ? { id: e.targetId, name: campaigns.get(e.targetId) ?? null } : null,
          })),
        });
      },
    },
  ];
}
