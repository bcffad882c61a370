import type { Request } from 'express';
import { Op, type Transaction } from 'sequelize';
import { ApiToken, PasswordReset, User } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { AppError, tooManyRequests } from '../../lib/errors.ts';
import { verifyPassword } from '../../lib/passwords.ts';
import type { ActionLimiter } from '../../lib/rate-limit.ts';

/**
 * Ends every browser session of the account: raises its session generation, so each session JWT made before
 * (they carry the generation they were made under) is refused by the auth middleware from the next request on.
 * Returns the new generation, for the session the caller may start right after (a password change keeps its own).
 */
export async function endAllSessions(userId: string, transaction?: Transaction): Promise<number> {
  const [rows] = await User.sequelize!.query(
    'UPDATE users SET session_generation = session_generation + 1, updated_at = now() WHERE id = :userId RETURNING session_generation',
    { replacements: { userId }, transaction },
  );
  const generation = (rows as Array<{ session_generation: number }>)[0]?.session_generation;
  if (typeof generation !== 'number') throw new Error(`no user ${userId} to sign out`);
  return generation;
}

/** Revokes every live personal API token of the account; returns how many. */
export async function revokeAllTokens(userId: string, transaction?: Transaction): Promise<number> {
  const [count] = await ApiToken.update({ revokedAt: new Date() }, { where: { userId, revokedAt: null }, transaction });
  return count;
}

/** Closes every reset link of the account still open (after a password change or a completed reset). */
export async function closeOpenResets(userId: string, transaction?: Transaction): Promise<void> {
  await PasswordReset.update({ usedAt: new Date() }, { where: { userId, usedAt: null, expiresAt: { [Op.gt]: new Date() } }, transaction });
}

/** Throws 429 when the action limiter says so. */
export async function takeAction(limiter: ActionLimiter, key: string, what: string): Promise<void> {
  const { allowed, retryAfterSeconds } = await limiter.take(key);
  if (!allowed) {
    const minutes = Math.ceil(retryAfterSeconds / 60);
    throw tooManyRequests(`${what} too often just now. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}.`, retryAfterSeconds);
  }
}

/** Routes of the account itself (change password, sign out everywhere) need the browser, not an API token. */
export function requireSession(req: Request, what: string): void {
  if (req.auth!.via !== 'session') {
    throw new AppError(403, 'session_required', `${what} only in a signed-in browser session (Account page), not with an API token.`);
  }
}

/**
 * The current password, checked like a sign-in and counted by the same limiter (per account and address, with
 * progressive delays), so it cannot be guessed here faster than on the sign-in page.
 */
export async function checkCurrentPassword(deps: Deps, req: Request, user: User, password: string, field: string): Promise<void> {
  const ip = clientIp(req);
  const attempt = await deps.loginLimiter.reserve(user.email, ip);
  if (attempt.delayMs > 0) await new Promise((resolve) => setTimeout(resolve, attempt.delayMs));
  if (attempt.blocked) {
    throw tooManyRequests('Too many wrong passwords. Try again later, or ask a lab admin to unlock your sign-in.', attempt.retryAfterSeconds);
  }
  if (!(await verifyPassword(user.passwordHash, password))) {
    await deps.loginLimiter.fail(user.email, ip);
    await recordAudit({ labId: null, actorId: user.id, action: 'auth.password_confirm_failed', ip });
    const message = 'That is not your current password.';
    throw new AppError(403, 'wrong_password', message, { fields: [{ path: field, message }] });
  }
  await deps.loginLimiter.release(user.email, ip);
}

/** Tells the owner their password changed; a mail server that is away must not undo the change. */
export async function mailPasswordChanged(deps: Deps, user: User, how: 'changed' | 'reset', ip: string, tokensRevoked: number): Promise<void> {
  const tokens = tokensRevoked > 0
    ? `Your ${tokensRevoked} personal API token${tokensRevoked === 1 ? ' was' : 's were'} revoked as asked.`
    : 'Your personal API tokens still work. If you think someone else knew your password, revoke them on the API tokens page.';
  try {
    await deps.mailer.send({
      to: user.email,
      subject: 'Your Gatepost password was changed',
      text: [
        `Hello ${user.name},`,
        '',
        how === 'reset'
          ? `The password of your Gatepost account (${user.email}) was set again through a reset link at ${new Date().toISOString()}, from the address ${ip}. Every browser session was signed out.`
          : `The password of your Gatepost account (${user.email}) was changed at ${new Date().toISOString()}, from the address ${ip}. Your other browser sessions were signed out.`,
        tokens,
        '',
        'If that was not you, ask for a new password with "Forgot password?" on the sign-in page at once, and tell your lab admin.',
        '',
        `Gatepost, ${deps.config.publicUrl}`,
      ].join('\n'),
    });
  } catch (err) {
    deps.logger.warn({ err: (err as Error).message, userId: user.id }, 'could not mail the owner about a password change');
  }
}

/**
 * Tells a member that a lab admin disabled or enabled their account (issue 12 review: a disabled member was told
 * nothing and found out at the next sign-in). Sent through the same mailer, marked with the lab so its admins see in
 * the outbox that the notice went. Returns whether it was sent: a mail server that is away must not undo the change.
 */
export async function mailAccountState(
  deps: Deps, user: User, state: 'disabled' | 'enabled', lab: { id: string; name: string }, adminName: string,
): Promise<boolean> {
  const when = new Date().toISOString();
  try {
    await deps.mailer.send({
      to: user.email,
      labId: lab.id,
      subject: state === 'disabled' ? 'Your Gatepost account was disabled' : 'Your Gatepost account was enabled again',
      text: [
        `Hello ${user.name},`,
        '',
        ...(state === 'disabled'
          ? [
            `${adminName}, an admin of ${lab.name}, disabled your Gatepost account (${user.email}) at ${when}.`,
            'You cannot sign in now; your browser sessions were signed out and your personal API tokens stopped working.',
            'Your shots, versions, reviews and the audit trail stay as they are.',
            '',
            `If you think this is a mistake, ask ${adminName} or another admin of ${lab.name}.`,
          ]
          : [
            `${adminName}, an admin of ${lab.name}, enabled your Gatepost account (${user.email}) again at ${when}.`,
            'You can sign in again; your personal API tokens work again.',
          ]),
        '',
        `Gatepost, ${deps.config.publicUrl}`,
      ].join('\n'),
    });
    return true;
  } catch (err) {
    deps.logger.warn({ err: (err as Error).message, userId: user.id }, `could not mail the member that their account was ${state}`);
    return false;
  }
}
