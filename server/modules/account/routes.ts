import { Op } from 'sequelize';
import {
  changePasswordBody,
  PASSWORD_RESET_REQUESTED_MESSAGE,
  passwordResetCheckBody,
  passwordResetCompleteBody,
  passwordResetRequestBody,
  signOutEverywhereBody,
  type PasswordResetCheckBody,
  type PasswordResetCompleteBody,
  type PasswordResetRequestBody,
} from '../../../shared/contracts/auth.ts';
import { PasswordReset, User } from '../../db/models/index.ts';
import { publishAccountChanged } from '../../lib/account-events.ts';
import { recordAudit } from '../../lib/audit.ts';
import { SESSION_COOKIE } from '../../lib/authenticate.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { AppError } from '../../lib/errors.ts';
import { hashPassword } from '../../lib/passwords.ts';
import { ActionLimiter, holdOrRefuse, LoginLimiter } from '../../lib/rate-limit.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { newPasswordResetSecret, sha256Hex } from '../../lib/tokens.ts';
import { startSession } from '../auth/routes.ts';
import { meView } from '../auth/service.ts';
import {
  checkCurrentPassword,
  closeOpenResets,
  endAllSessions,
  mailPasswordChanged,
  requireSession,
  revokeAllTokens,
  takeAction,
} from './service.ts';

/** Password changes and sign-outs everywhere that went through, per account (each ends sessions and may send mail). */
export const ACCOUNT_ACTIONS_PER_15_MIN = 10;

const RESET_LINK_CLOSED = 'This reset link has expired or was already used. Ask for a new one with "Forgot password?" on the sign-in page.';

/** The link in the e-mail: the secret rides in the fragment, which browsers never send to a server or a log. */
export const passwordResetLink = (publicUrl: string, secret: string) => `${publicUrl.replace(/\/$/, '')}/reset-password#token=${secret}`;

/**
 * The account's own security (issue 12, item 10): change password, sign out everywhere, and a password reset by
 * e-mail. Decisions, also in README "Security":
 * - changing the password signs out every other browser session (this one gets a fresh session); personal API
 *   tokens keep working unless the person ticks "also revoke my API tokens";
 * - sign out everywhere ends every browser session, this one too; tokens likewise only when asked;
 * - a reset request answers the same, after the same work, whether or not the address has an account: the mail is
 *   made and sent after the answer has gone. Requests are limited per address and account and per source address
 *   (the sign-in limiter's design), and at most `passwordResetMailsPerHour` mails go to one address;
 * - a reset link works once, for `passwordResetMinutes`, and is stored as its SHA-256; using it sets the password,
 *   ends every session, closes the account's other links, is audited and mailed to the owner.
 */
export function accountRoutes(deps: Deps): RouteDef[] {
  const { config } = deps;
  // Reset requests: the sign-in limiter's design over an hour (per address and account: refused past 5; per
  // account from anywhere and per source address: progressive delays).
  const resetRequests = new LoginLimiter(deps.redis, {
    prefix: 'gp:reset-request',
    maxFailures: 5,
    windowSeconds: 3600,
    delayStepMs: config.loginDelayStepMs,
    maxDelayMs: config.loginMaxDelayMs,
  });
  // Reset links tried: per source address (a guessed link is 192 random bits, but each try costs a lookup).
  const resetUses = new LoginLimiter(deps.redis, {
    prefix: 'gp:reset-use',
    maxFailures: config.loginMaxFailures * 2,
    windowSeconds: config.loginWindowSeconds,
    delayStepMs: config.loginDelayStepMs,
    maxDelayMs: config.loginMaxDelayMs,
  });

  const accountActions = new ActionLimiter(deps.redis, 'account', ACCOUNT_ACTIONS_PER_15_MIN, 900);

  /** Makes and mails a reset link; runs after the answer has gone, so its cost and outcome cannot be timed. */
  async function sendResetMail(email: string, ip: string, accountRequests: number): Promise<void> {
    const user = await User.findOne({ where: { email } });
    if (!user || user.disabledAt) return;
    if (accountRequests > config.passwordResetMailsPerHour) {
      await recordAudit({ labId: null, actorId: user.id, action: 'account.password_reset_throttled', details: { requests: accountRequests }, ip });
      return;
    }
    const { secret, hash } = newPasswordResetSecret();
    const row = await PasswordReset.create({
      userId: user.id, tokenHash: hash, requestedIp: ip, expiresAt: new Date(Date.now() + config.passwordResetMinutes * 60_000),
    });
    await deps.mailer.send({
      to: user.email,
      subject: 'Set a new Gatepost password',
      text: [
        `Hello ${user.name},`,
        '',
        `Someone (we hope you) asked to set a new password for the Gatepost account ${user.email}, from the address ${ip}.`,
        '',
        `Set a new password: ${passwordResetLink(config.publicUrl, secret)}`,
        '',
        `The link works once and expires in ${config.passwordResetMinutes} minutes. Using it signs out every browser session of the account.`,
        'If you did not ask for it, ignore this e-mail: your password stays as it is.',
        '',
        `Gatepost, ${config.publicUrl}`,
      ].join('\n'),
    });
    await recordAudit({ labId: null, actorId: user.id, action: 'account.password_reset_requested', targetType: 'password_reset', targetId: row.id, ip });
  }

  return [
    {
      method: 'post',
      path: '/api/me/password',
      access: { kind: 'user' },
      summary:
        'Change your password (browser session only): needs the current one; signs out your other browser sessions ' +
        '(this one gets a new session cookie); personal API tokens keep working unless alsoRevokeTokens is true',
      body: changePasswordBody,
      async handler(req, res) {
        requireSession(req, 'The password is changed');
        const { currentPassword, newPassword, alsoRevokeTokens } = changePasswordBody.parse(req.body);
        const user = await User.findByPk(req.auth!.userId, { rejectOnEmpty: true });
        await checkCurrentPassword(deps, req, user, currentPassword, 'currentPassword');
        await takeAction(accountActions, user.id, 'Your password was changed');
        const passwordHash = await hashPassword(newPassword);
        const { generation, tokensRevoked } = await deps.sequelize.transaction(async (transaction) => {
          await User.update({ passwordHash }, { where: { id: user.id }, transaction });
          await closeOpenResets(user.id, transaction);
          const tokens = alsoRevokeTokens ? await revokeAllTokens(user.id, transaction) : 0;
          return { generation: await endAllSessions(user.id, transaction), tokensRevoked: tokens };
        });
        const ip = clientIp(req);
        await recordAudit({ labId: null, actorId: user.id, action: 'account.password_changed', details: { otherSessionsSignedOut: true, tokensRevoked }, ip });
        await publishAccountChanged(deps.redis, user.id);
        const expiresAt = startSession(res, deps, user.id, generation);
        await mailPasswordChanged(deps, user, 'changed', ip, tokensRevoked);
        res.json({ ...(await meView(user.id, 'session', expiresAt)), tokensRevoked });
      },
    },
    {
      method: 'post',
      path: '/api/me/sign-out-everywhere',
      access: { kind: 'user' },
      summary:
        'Sign out every browser session of your account, this one too (browser session only); with alsoRevokeTokens, ' +
        'revoke every personal API token as well',
      body: signOutEverywhereBody,
      async handler(req, res) {
        requireSession(req, 'Signing out everywhere is done');
        const { alsoRevokeTokens } = signOutEverywhereBody.parse(req.body);
        const userId = req.auth!.userId;
        await takeAction(accountActions, userId, 'You signed out everywhere');
        const tokensRevoked = await deps.sequelize.transaction(async (transaction) => {
          const tokens = alsoRevokeTokens ? await revokeAllTokens(userId, transaction) : 0;
          await endAllSessions(userId, transaction);
          return tokens;
        });
        await recordAudit({ labId: null, actorId: userId, action: 'account.signed_out_everywhere', details: { tokensRevoked }, ip: clientIp(req) });
        await publishAccountChanged(deps.redis, userId);
        res.clearCookie(SESSION_COOKIE, { path: '/' });
        res.json({ sessionsSignedOut: 'all', tokensRevoked });
      },
    },
    {
      method: 'post',
      path: '/api/auth/password-reset',
      access: { kind: 'public' },
      summary:
        'Forgot password: e-mails a single-use link to set a new one, if the address has an account. The answer ' +
        'is the same either way (202); limited per address and per source address',
      body: passwordResetRequestBody,
      response: { status: 202, description: 'Accepted: the same message whether or not the address has an account' },
      async handler(req, res) {
        const { email } = req.body as PasswordResetRequestBody;
        const ip = clientIp(req);
        // Counted per address whether or not it has an account, so the limit itself tells nothing either.
        const attempt = await resetRequests.reserve(email, ip);
        await holdOrRefuse(res, attempt, (minutes) => `Too many reset requests for this address from your network. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}.`);
        // A request stays counted (there is nothing to give back) and is done at once: the next need not wait for it.
        await resetRequests.fail(email, ip);
        res.status(202).json({ message: PASSWORD_RESET_REQUESTED_MESSAGE });
        // After the answer: whether an account exists changes nothing the caller can see or time.
        sendResetMail(email, ip, attempt.accountAttempts).catch((err: Error) => {
          deps.logger.warn({ err: err.message }, 'password reset e-mail not sent');
        });
      },
    },
    {
      method: 'post',
      path: '/api/auth/password-reset/check',
      access: { kind: 'public' },
      summary:
        'Whether a reset link still works, before the new password is typed: 200 with its expiry, or 410 when it has ' +
        'expired or was used. Only looks (the link stays usable); the secret goes in the body, never in a URL. ' +
        'Unknown links count toward the same per-address limit as setting a password',
      body: passwordResetCheckBody,
      async handler(req, res) {
        const { token } = req.body as PasswordResetCheckBody;
        const ip = clientIp(req);
        const attempt = await resetUses.reserve(ip, ip);
        await holdOrRefuse(res, attempt, () => 'Too many reset links tried from your address. Try again later.');
        const found = await PasswordReset.findOne({
          where: { tokenHash: sha256Hex(token), usedAt: null, expiresAt: { [Op.gt]: new Date() } },
          include: [{ model: User, required: true, attributes: ['disabledAt'] }],
        });
        const user = (found as unknown as { User?: User } | null)?.User;
        if (!found || !user || user.disabledAt) {
          await resetUses.fail(ip, ip);
          throw new AppError(410, 'reset_link_closed', RESET_LINK_CLOSED);
        }
        await resetUses.release(ip, ip);
        res.json({ expiresAt: found.expiresAt.toISOString() });
      },
    },
    {
      method: 'post',
      path: '/api/auth/password-reset/complete',
      access: { kind: 'public' },
      summary:
        'Set a new password with the secret of a reset link (single use, expires); signs out every browser session ' +
        'of the account and e-mails its owner. Then sign in with the new password',
      body: passwordResetCompleteBody,
      response: { status: 204, description: 'The password is set' },
      async handler(req, res) {
        const { token, password } = req.body as PasswordResetCompleteBody;
        const ip = clientIp(req);
        const attempt = await resetUses.reserve(ip, ip);
        await holdOrRefuse(res, attempt, () => 'Too many reset links tried from your address. Try again later.');
        const tokenHash = sha256Hex(token);
        const open = { tokenHash, usedAt: null, expiresAt: { [Op.gt]: new Date() } };
        const found = await PasswordReset.findOne({ where: open, include: [{ model: User, required: true }] });
        const user = (found as unknown as { User?: User } | null)?.User;
        if (!found || !user || user.disabledAt) {
          await resetUses.fail(ip, ip);
          throw new AppError(410, 'reset_link_closed', RESET_LINK_CLOSED);
        }
        const passwordHash = await hashPassword(password);
        const done = await deps.sequelize.transaction(async (transaction) => {
          // Claimed only while still open: two tabs submitting the same link set the password once.
          const [claimed] = await PasswordReset.update({ usedAt: new Date() }, { where: { id: found.id, ...open }, transaction });
          if (claimed === 0) return false;
          await User.update({ passwordHash }, { where: { id: user.id }, transaction });
          await closeOpenResets(user.id, transaction);
          await endAllSessions(user.id, transaction);
          return true;
        });
        if (!done) {
          await resetUses.fail(ip, ip);
          throw new AppError(410, 'reset_link_closed', RESET_LINK_CLOSED);
        }
        await resetUses.release(ip, ip);
        // A forgotten password is often what the sign-in limiter was counting: start the owner afresh.
        await deps.loginLimiter.unlock(user.email);
        await recordAudit({ labId: null, actorId: user.id, action: 'account.password_reset', targetType: 'password_reset', targetId: found.id, ip });
        await publishAccountChanged(deps.redis, user.id);
        await mailPasswordChanged(deps, user, 'reset', ip, 0);
        res.status(204).end();
      },
    },
  ];
}
