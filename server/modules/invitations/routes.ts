import { Op, UniqueConstraintError } from 'sequelize';
import {
  acceptInvitationBody,
  invitationBody,
  newPasswordSchema,
  type AcceptInvitationBody,
  type InvitationBody,
} from '../../../shared/contracts/auth.ts';
import { ROLE_LABELS } from '../../../shared/contracts/roles.ts';
import { Invitation, Lab, Membership, User } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { AppError, conflict, notFound, serviceUnavailable, tooManyRequests } from '../../lib/errors.ts';
import { hashPassword, verifyPassword } from '../../lib/passwords.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { newInvitationSecret, sha256Hex } from '../../lib/tokens.ts';
import { parseInput } from '../../lib/validate.ts';
import { meView } from '../auth/service.ts';
import { startSession } from '../auth/routes.ts';

const INVITATION_DAYS = 7;

function stateOf(inv: Invitation): 'pending' | 'accepted' | 'revoked' | 'expired' {
  if (inv.acceptedAt) return 'accepted';
  if (inv.revokedAt) return 'revoked';
  if (inv.expiresAt.getTime() <= Date.now()) return 'expired';
  return 'pending';
}

const view = (inv: Invitation) => ({
  id: inv.id,
  email: inv.email,
  role: inv.role,
  state: stateOf(inv),
  createdAt: inv.createdAt,
  expiresAt: inv.expiresAt,
  acceptedAt: inv.acceptedAt,
});

async function openInvitation(secret: string): Promise<{ invitation: Invitation; lab: Lab }> {
  const invitation = await Invitation.findOne({ where: { tokenHash: sha256Hex(secret) } });
  if (!invitation) throw notFound('This invitation link is not valid. Ask your lab admin for a new one.');
  const state = stateOf(invitation);
  if (state !== 'pending') {
    const why = { accepted: 'has already been used', revoked: 'was withdrawn', expired: 'has expired' }[state];
    throw new AppError(410, 'invitation_closed', `This invitation ${why}. Ask your lab admin for a new one.`);
  }
  const lab = await Lab.findByPk(invitation.labId as string, { rejectOnEmpty: true });
  return { invitation, lab };
}

export function invitationRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/invitations',
      access: { kind: 'lab', permission: 'invitations:manage' },
      summary: "The lab's invitations, newest first",
      async handler(req, res) {
        const rows = await Invitation.findAll({ where: { labId: req.lab!.id }, order: [['createdAt', 'DESC']], limit: 200 });
        res.json({ invitations: rows.map(view) });
      },
    },
    {
      method: 'post',
      path: '/api/labs/:labId/invitations',
      access: { kind: 'lab', permission: 'invitations:manage' },
      summary: 'Invite someone to the lab by e-mail with a role',
      body: invitationBody,
      async handler(req, res) {
        const { email, role } = req.body as InvitationBody;
        const labId = req.lab!.id;
        const existing = await User.findOne({ where: { email }, attributes: ['id'] });
        if (existing && (await Membership.findOne({ where: { labId, userId: existing.id } }))) {
          throw conflict(`${email} is already a member of this lab.`);
        }
        const [lab, inviter] = await Promise.all([
          Lab.findByPk(labId, { rejectOnEmpty: true }),
          User.findByPk(req.auth!.userId, { rejectOnEmpty: true }),
        ]);
        const { secret, hash } = newInvitationSecret();
        const invitation = await Invitation.create({
          labId, email, role, tokenHash: hash, invitedBy: inviter.id,
          expiresAt: new Date(Date.now() + INVITATION_DAYS * 86_400_000),
        });
        const link = `${deps.config.publicUrl.replace(/\/$/, '')}/invite/${secret}`;
        try {
          await deps.mailer.send({
            to: email,
            labId,
            subject: `${inviter.name} invited you to ${lab.name} on Gatepost`,
            text: [
              `${inviter.name} has invited you to join ${lab.name} on Gatepost as ${ROLE_LABELS[role].toLowerCase()}.`,
              '',
              `Accept the invitation: ${link}`,
              '',
              `The link works once and expires in ${INVITATION_DAYS} days. If you did not expect this e-mail, ignore it.`,
            ].join('\n'),
          });
        } catch (err) {
          await invitation.update({ revokedAt: new Date() });
          deps.logger.error({ err }, 'invitation e-mail not sent');
          throw serviceUnavailable('The invitation e-mail could not be sent (the mail server did not accept it). Nothing was saved; try again later.', err);
        }
        // A new invitation replaces any still-open one for the same address, but only once it has gone out: a
        // failed send must leave the earlier link working ("Nothing was saved").
        await Invitation.update(
          { revokedAt: new Date() },
          { where: { labId, email, acceptedAt: null, revokedAt: null, id: { [Op.ne]: invitation.id } } },
        );
        await recordAudit({ labId, actorId: inviter.id, action: 'invitation.sent', targetType: 'invitation', targetId: invitation.id, details: { email, role }, ip: clientIp(req) });
        res.status(201).json({ invitation: view(invitation) });
      },
    },
    {
      method: 'delete',
      path: '/api/labs/:labId/invitations/:invitationId',
      access: { kind: 'lab', permission: 'invitations:manage' },
      summary: 'Withdraw an invitation that has not been accepted',
      async handler(req, res) {
        const inv = await Invitation.findOne({ where: { id: req.params.invitationId as string, labId: req.lab!.id } });
        if (!inv) throw notFound('No such invitation.');
        if (inv.acceptedAt) throw conflict('This invitation was already accepted; remove the member instead.');
        if (!inv.revokedAt) await inv.update({ revokedAt: new Date() });
        await recordAudit({ labId: req.lab!.id, actorId: req.auth!.userId, action: 'invitation.withdrawn', targetType: 'invitation', targetId: inv.id, details: { email: inv.email }, ip: clientIp(req) });
        res.status(204).end();
      },
    },
    {
      method: 'get',
      path: '/api/invitations/:token',
      access: { kind: 'public' },
      summary: 'What an invitation link offers (lab, role, address, inviter, expiry), before accepting; accountExists says whether to ask for the existing password or a name and a new one. Only the holder of the link learns it: the link goes to the invited address alone (admins see that an invitation was sent, never its link: not in the outbox, the responses or the audit trail), so an admin of one lab cannot learn from it whether an address has an account',
      response: { status: 200, description: 'JSON: { labName, email, role, invitedBy, expiresAt, accountExists }' },
      async handler(req, res) {
        const { invitation, lab } = await openInvitation(req.params.token as string);
        const inviter = invitation.invitedBy ? await User.findByPk(invitation.invitedBy, { attributes: ['name'] }) : null;
        const accountExists = (await User.count({ where: { email: invitation.email } })) > 0;
        res.json({
          labName: lab.name,
          email: invitation.email,
          role: invitation.role,
          invitedBy: inviter?.name ?? null,
          expiresAt: invitation.expiresAt,
          accountExists,
        });
      },
    },
    {
      method: 'post',
      path: '/api/invitations/:token/accept',
      access: { kind: 'public' },
      summary: 'Accept an invitation: creates the account (or confirms the existing one) and signs in',
      body: acceptInvitationBody,
      async handler(req, res) {
        const { name, password } = req.body as AcceptInvitationBody;
        const { invitation, lab } = await openInvitation(req.params.token as string);
        const ip = clientIp(req);
        let user = await User.findOne({ where: { email: invitation.email } });
        if (user) {
          const limit = await deps.loginLimiter.reserve(invitation.email, ip);
          if (limit.blocked) {
            res.set('Retry-After', String(limit.retryAfterSeconds));
            throw tooManyRequests('Too many failed attempts. Try again later.', limit.retryAfterSeconds);
          }
          if (!(await verifyPassword(user.passwordHash, password))) {
            await deps.loginLimiter.fail(invitation.email, ip);
            throw new AppError(401, 'invalid_credentials', `${invitation.email} already has an account: enter its password to join ${lab.name}.`);
          }
          if (user.disabledAt) await deps.loginLimiter.fail(invitation.email, ip);
          if (user.disabledAt) throw new AppError(403, 'account_disabled', 'This account has been disabled by a lab admin, so it cannot join a lab. Ask the lab admin who disabled it.');
          await deps.loginLimiter.release(invitation.email, ip);
        } else {
          if (!name) throw new AppError(400, 'bad_request', 'Please correct the request: name: Enter your name.');
          parseInput(newPasswordSchema, password);
          try {
            user = await User.create({ email: invitation.email, name, passwordHash: await hashPassword(password) });
          } catch (err) {
            // The same link accepted twice at once: the other request made the account (issue 12, item 9).
            if (err instanceof UniqueConstraintError) throw conflict('This invitation is being accepted in another window or was just used. Sign in instead.');
            throw err;
          }
        }
        const accepted = await deps.sequelize.transaction(async (transaction) => {
          // Marking it accepted only while still open makes a double submit harmless.
          const [count] = await Invitation.update(
            { acceptedAt: new Date(), acceptedBy: user.id },
            { where: { id: invitation.id, acceptedAt: null, revokedAt: null, expiresAt: { [Op.gt]: new Date() } }, transaction },
          );
          if (count === 0) return false;
          const existing = await Membership.findOne({ where: { labId: lab.id, userId: user.id }, transaction });
          if (!existing) await Membership.create({ labId: lab.id, userId: user.id, role: invitation.role }, { transaction });
          return true;
        });
        // Another request accepted it between our look and our update (issue 12, item 9): the same clear 409 as above.
        if (!accepted) throw conflict('This invitation is being accepted in another window or was just used. Sign in instead.');
        await recordAudit({ labId: lab.id, actorId: user.id, action: 'invitation.accepted', targetType: 'invitation', targetId: invitation.id, details: { role: invitation.role }, ip });
        const expiresAt = startSession(res, deps, user.id, user.sessionGeneration ?? 0);
        res.json(await meView(user.id, 'session', expiresAt));
      },
    },
  ];
}
