import { memberRoleBody } from '../../../shared/contracts/auth.ts';
import type { Role } from '../../../shared/contracts/roles.ts';
import { Lab, Membership, User } from '../../db/models/index.ts';
import { Op } from 'sequelize';
import { publishAccountChanged } from '../../lib/account-events.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import { conflict, notFound } from '../../lib/errors.ts';
import type { Deps } from '../../lib/deps.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { ActionLimiter } from '../../lib/rate-limit.ts';
import { endAllSessions, mailAccountState, takeAction } from '../account/service.ts';

/** Admins of the lab whose accounts are enabled: a disabled admin cannot run the lab. */
async function adminCount(labId: string): Promise<number> {
  return Membership.count({ where: { labId, role: 'admin' }, include: [{ model: User, attributes: [], where: { disabledAt: null }, required: true }] });
}

async function memberOf(labId: string, userId: string): Promise<{ membership: Membership; user: User }> {
  const membership = await Membership.findOne({ where: { labId, userId }, include: [{ model: User, required: true }] });
  if (!membership) throw notFound('No such member in this lab.');
  return { membership, user: (membership as unknown as { User: User }).User };
}

/** The display name of an account (the admin named in a notice). */
async function nameOf(userId: string): Promise<string> {
  return (await User.findByPk(userId, { attributes: ['name'] }))?.name ?? 'A lab admin';
}

async function labNamed(labId: string): Promise<{ id: string; name: string }> {
  return { id: labId, name: (await Lab.findByPk(labId, { attributes: ['name'] }))?.name ?? 'your lab' };
}

/** Disables and enables one admin may make in 15 minutes (a slip of a script, a stolen session). */
export const MEMBER_STATE_CHANGES_PER_15_MIN = 30;

export function labRoutes(deps: Deps): RouteDef[] {
  const memberStateChanges = new ActionLimiter(deps.redis, 'member-state', MEMBER_STATE_CHANGES_PER_15_MIN, 900);
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
            return { userId: u.id, name: u.name, email: u.email, role: m.role, since: m.createdAt, active: !u.disabledAt, disabledAt: u.disabledAt };
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
    {
      method: 'post',
      path: '/api/labs/:labId/members/:userId/disable',
      access: { kind: 'lab', permission: 'members:manage' },
      summary:
        "Disable a member's account: it cannot sign in, and its sessions, API tokens and event streams stop at once. " +
        'Its work, audit trail and versions stay. Not yourself, not the last admin, not an account that is also in a lab you do not run',
      async handler(req, res) {
        const labId = req.lab!.id;
        const actorId = req.auth!.userId;
        await takeAction(memberStateChanges, actorId, 'Accounts were disabled or enabled');
        const { membership, user } = await memberOf(labId, req.params.userId as string);
        if (user.id === actorId) throw conflict('You cannot disable your own account. Ask another admin of the lab.');
        if (!user.disabledAt) {
          if (membership.role === 'admin' && (await adminCount(labId)) <= 1) {
            throw conflict('A lab needs at least one enabled admin. Make someone else admin first.');
          }
          // An account is one person's across labs: an admin of this lab must not lock them out of a lab they do
          // not run. Such a member is removed from this lab instead.
          const elsewhere = await Membership.findAll({ where: { userId: user.id, labId: { [Op.ne]: labId } }, attributes: ['labId'] });
          for (const other of elsewhere) {
            const actorThere = await Membership.findOne({ where: { labId: other.labId as string, userId: actorId }, attributes: ['role'] });
            if (actorThere?.role !== 'admin') {
              throw conflict(`${user.name} also works in another lab, so their account cannot be disabled from here. Remove them from this lab instead.`);
            }
          }
          await deps.sequelize.transaction(async (transaction) => {
            await User.update({ disabledAt: new Date(), disabledBy: actorId }, { where: { id: user.id }, transaction });
            await endAllSessions(user.id, transaction);
          });
          await publishAccountChanged(deps.redis, user.id);
          const mailed = await mailAccountState(deps, user, 'disabled', await labNamed(labId), await nameOf(actorId));
          await recordAudit({ labId, actorId, action: 'member.disabled', targetType: 'user', targetId: user.id, details: { role: membership.role, name: user.name, mailed }, ip: clientIp(req) });
        }
        res.json({ userId: user.id, active: false });
      },
    },
    {
      method: 'post',
      path: '/api/labs/:labId/members/:userId/enable',
      access: { kind: 'lab', permission: 'members:manage' },
      summary: "Enable a disabled member's account again: they sign in anew (old sessions stay ended); their API tokens work again",
      async handler(req, res) {
        const labId = req.lab!.id;
        await takeAction(memberStateChanges, req.auth!.userId, 'Accounts were disabled or enabled');
        const { membership, user } = await memberOf(labId, req.params.userId as string);
        if (user.disabledAt) {
          await User.update({ disabledAt: null, disabledBy: null }, { where: { id: user.id } });
          const mailed = await mailAccountState(deps, user, 'enabled', await labNamed(labId), await nameOf(req.auth!.userId));
          await recordAudit({ labId, actorId: req.auth!.userId, action: 'member.enabled', targetType: 'user', targetId: user.id, details: { role: membership.role, name: user.name, mailed }, ip: clientIp(req) });
        }
        res.json({ userId: user.id, active: true });
      },
    },
  ];
}
