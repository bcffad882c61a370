import type { Response } from 'express';
import { loginBody, type LoginBody } from '../../../shared/contracts/auth.ts';
import { User } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { revokedSessionKey, SESSION_COOKIE } from '../../lib/authenticate.ts';
import { publishAccountChanged } from '../../lib/account-events.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { AppError, serviceUnavailable } from '../../lib/errors.ts';
import { holdOrRefuse } from '../../lib/rate-limit.ts';
import { verifyAgainstDummy, verifyPassword } from '../../lib/passwords.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { signSession } from '../../lib/tokens.ts';
import { meView } from './service.ts';

/**
 * Signs the user in on this response: a fresh session JWT in an httpOnly, SameSite cookie. `generation` is the
 * account's current session generation (users.session_generation): a session of an older one is refused.
 */
export function startSession(res: Response, deps: Deps, userId: string, generation: number): Date {
  const { token, claims } = signSession(userId, deps.config.jwtSecret, deps.config.sessionHours, generation);
  res.cookie(SESSION_COOKIE, token, {
    httpOnly: true,
    sameSite: 'lax',
    secure: deps.config.publicUrl.startsWith('https:'),
    path: '/',
    expires: claims.expiresAt,
  });
  return claims.expiresAt;
}

/** Tells the account's owner about repeated failed sign-ins; a mail server that is away must not change the answer. */
async function mailOwnerAboutFailures(deps: Deps, user: User, ip: string, failures: number): Promise<void> {
  const minutes = Math.round(deps.config.loginWindowSeconds / 60);
  try {
    await deps.mailer.send({
      to: user.email,
      subject: 'Failed sign-ins to your Gatepost account',
      text: [
        `Hello ${user.name},`,
        '',
        `${failures} attempts to sign in to your Gatepost account (${user.email}) failed within ${minutes} minutes, the latest from the address ${ip} at ${new Date().toISOString()}.`,
        '',
        'If that was you, nothing needs doing. If it was not, someone may be guessing your password: sign in and change it, and tell your lab admin.',
        'Further attempts are slowed down; your own sign-in keeps working.',
        '',
        `Gatepost, ${deps.config.publicUrl}`,
      ].join('\n'),
    });
  } catch (err) {
    deps.logger.warn({ err: (err as Error).message, userId: user.id }, 'could not mail the owner about failed sign-ins');
  }
}

export function authRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'post',
      path: '/api/auth/login',
      access: { kind: 'public' },
      summary: 'Sign in with e-mail and password; sets the session cookie',
      body: loginBody,
      async handler(req, res) {
        const { email, password } = req.body as LoginBody;
        const ip = clientIp(req);
        const attempt = await deps.loginLimiter.reserve(email, ip);
        // Guessing gets slower with every failure on the account (from anywhere) or from this address; a right
        // password still gets in, only later.
        await holdOrRefuse(res, attempt, (minutes) =>
          `Too many failed sign-ins to this account from your address. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}, ` +
          'or ask a lab admin to unlock your sign-in (People page).');
        const user = await User.findOne({ where: { email } });
        const ok = user ? await verifyPassword(user.passwordHash, password) : await verifyAgainstDummy(password);
        if (ok && user?.disabledAt) {
          // Said only to someone who knows the password: a disabled account is not a secret from its owner.
          await deps.loginLimiter.fail(email, ip);
          await recordAudit({ labId: null, actorId: user.id, action: 'auth.login_refused_disabled', ip });
          throw new AppError(403, 'account_disabled', 'This account has been disabled by a lab admin. Ask your lab admin to enable it again.');
        }
        if (!ok || !user) {
          await deps.loginLimiter.fail(email, ip);
          await recordAudit({ labId: null, actorId: user?.id ?? null, action: 'auth.login_failed', details: { email }, ip });
          // Once per window, when the account's failures from every address reach the limit.
          if (user && attempt.accountAttempts === deps.loginLimiter.maxFailures) await mailOwnerAboutFailures(deps, user, ip, attempt.accountAttempts);
          throw new AppError(401, 'invalid_credentials', 'That e-mail and password do not match an account.');
        }
        await deps.loginLimiter.release(email, ip);
        const expiresAt = startSession(res, deps, user.id, user.sessionGeneration);
        await recordAudit({ labId: null, actorId: user.id, action: 'auth.login', ip });
        res.json(await meView(user.id, 'session', expiresAt));
      },
    },
    {
      method: 'post',
      path: '/api/auth/logout',
      access: { kind: 'public' },
      summary: 'Sign out: revokes this browser session and clears its cookie',
      async handler(req, res) {
        const auth = req.auth;
        if (auth?.via === 'session' && auth.sessionId && auth.expiresAt) {
          const ttl = Math.max(1, Math.ceil((auth.expiresAt.getTime() - Date.now()) / 1000));
          try {
            await deps.redis.set(revokedSessionKey(auth.sessionId), '1', 'EX', ttl);
          } catch (err) {
            // The cookie stays: the session is still valid, and the person must know it (issue 12, item 11).
            throw serviceUnavailable('Sign-out could not be recorded just now, so you are still signed in. Try again in a moment.', err);
          }
          await recordAudit({ labId: null, actorId: auth.userId, action: 'auth.logout', ip: clientIp(req) });
          await publishAccountChanged(deps.redis, auth.userId);
        }
        res.clearCookie(SESSION_COOKIE, { path: '/' });
        res.status(204).end();
      },
    },
    {
      method: 'get',
      path: '/api/auth/session',
      access: { kind: 'public' },
      summary: 'Whether anyone is signed in: { user: null } (200) before sign-in, else { user } as /api/auth/me gives it. '
        + 'The pages ask this before sign-in, so a visitor who is not signed in is not an error (no 401 in the console)',
      async handler(req, res) {
        res.json({ user: req.auth ? await meView(req.auth.userId, req.auth.via, req.auth.expiresAt) : null });
      },
    },
    {
      method: 'get',
      path: '/api/auth/me',
      access: { kind: 'user' },
      summary: 'The signed-in user and their labs and roles',
      async handler(req, res) {
        res.json(await meView(req.auth!.userId, req.auth!.via, req.auth!.expiresAt));
      },
    },
  ];
}
