import { AuditEvent, User } from '../../db/models/index.ts';
import type { RouteDef } from '../../lib/routes.ts';

export function auditRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/audit',
      access: { kind: 'lab', permission: 'audit:read' },
      summary: "The lab's audit trail, newest first (append-only)",
      async handler(req, res) {
        const limit = Math.min(500, Math.max(1, Number(req.query.limit ?? 100) || 100));
        const rows = await AuditEvent.findAll({ where: { labId: req.lab!.id }, order: [['id', 'DESC']], limit });
        const actorIds = [...new Set(rows.map((r) => r.actorId).filter((x): x is string => !!x))];
        const actors = new Map((await User.findAll({ where: { id: actorIds }, attributes: ['id', 'name'] })).map((u) => [u.id, u.name]));
        res.json({
          events: rows.map((e) => ({
            id: e.id, at: e.createdAt, action: e.action, actor: e.actorId ? actors.get(e.actorId) ?? null : null,
            targetType: e.targetType, targetId: e.targetId, details: e.details,
          })),
        });
      },
    },
  ];
}
