import { memberRoleBody } from '../../../shared/contracts/auth.ts';
import type { Role } from '../../../shared/contracts/roles.ts';
import { Lab, Membership, User } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import { conflict, notFound } from '../../lib/errors.ts';
import type { Deps } from '../../lib/deps.ts';
import type { RouteDef } from '../../lib/routes.ts';

async function adminCount(labId: string): Promise<number> {
  return Membership.count({ where: { labId, role: 'admin' } });
}

export function labRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: 'One lab, with your role in it',
      async handler(req, res) {
        const lab = await Lab.findByPk(req.lab!.id, { rejectOnEmpty: true });
        res.json({ lab: { id: lab.id, name: lab.name, slug: lab.slug }, role: req.lab!.role });
      },
    },
    {
      method: 'get',
      path: '/api/labs/:labId/members',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "The lab's members and their roles",
      async handler(req, res) {
        const rows = await Membership.findAll({
          where: { labId: req.lab!.id },
          include: [{ model: User, attributes: ['id', 'name', 'email', 'disabledAt'], required: true }],
          order: [[User, 'name', 'ASC']],
        });
        res.json({
          members: rows.map((m) => {
            const u = (m as unknown as { User: User }).User;
            return { userId: u.id, name: u.name, email: u.email, role: m.role, since: m.createdAt, active: !u.disabledAt };
          }),
        });
      },
    },
    {
      method: 'patch',
      path: '/api/labs/:labId/members/:userId',
      access: { kind: 'lab', permission: 'members:manage' },
      summary: "Change a member's role",
      body: memberRoleBody,
      async handler(req, res) {
        const { role } = req.body as { role: Role };
        const membership = await Membership.findOne({ where: { labId: req.lab!.id, userId: req.params.userId as string } });
        if (!membership) throw notFound('No such member in this lab.');
        if (membership.role === 'admin' && role !== 'admin' && (await adminCount(req.lab!.id)) <= 1) {
          throw conflict('A lab needs at least one admin. Make someone else admin first.');
        }
        const from = membership.role;
        await membership.update({ role });
        await recordAudit({ labId: req.lab!.id, actorId: req.auth!.userId, action: 'member.role_changed', targetType: 'user', targetId: membership.userId as string, details: { from, to: role }, ip: clientIp(req) });
        res.json({ userId: membership.userId, role });
      },
    },
    {
      method: 'delete',
      path: '/api/labs/:labId/members/:userId',
      access: { kind: 'lab', permission: 'members:manage' },
      summary: 'Remove a member from the lab (their account and past work stay)',
      async handler(req, res) {
        const membership = await Membership.findOne({ where: { labId: req.lab!.id, userId: req.params.userId as string } });
        if (!membership) throw notFound('No such member in this lab.');
        if (membership.role === 'admin' && (await adminCount(req.lab!.id)) <= 1) {
          throw conflict('A lab needs at least one admin. Make someone else admin first.');
        }
        await membership.destroy();
        await recordAudit({ labId: req.lab!.id, actorId: req.auth!.userId, action: 'member.removed', targetType: 'user', targetId: membership.userId as string, details: { role: membership.role }, ip: clientIp(req) });
        res.status(204).end();
      },
    },
    {
      method: 'post',
      path: '/api/labs/:labId/members/:userId/unlock-sign-in',
      access: { kind: 'lab', permission: 'members:manage' },
      summary: "Clear a member's failed sign-ins, from every address, so they can sign in again at once",
      response: { status: 204, description: 'Unlocked' },
      async handler(req, res) {
        const membership = await Membership.findOne({
          where: { labId: req.lab!.id, userId: req.params.userId as string },
          include: [{ model: User, attributes: ['email'], required: true }],
        });
        if (!membership) throw notFound('No such member in this lab.');
        const { email } = (membership as unknown as { User: User }).User;
        await deps.loginLimiter.unlock(email);
        await recordAudit({ labId: req.lab!.id, actorId: req.auth!.userId, action: 'member.sign_in_unlocked', targetType: 'user', targetId: membership.userId as string, ip: clientIp(req) });
        res.status(204).end();
      },
    },
  ];
}
