import type { NextFunction, Request, Response } from 'express';
import type { Redis } from 'ioredis';
import { Op } from 'sequelize';
import { ApiToken, User } from '../db/models/index.ts';
import { API_TOKEN_PREFIX, sha256Hex, verifySession } from './tokens.ts';
import { unauthorized } from './errors.ts';
import type { AuthContext } from './request-context.ts';
import './request-context.ts';

export const SESSION_COOKIE = 'gp_session';
export const revokedSessionKey = (jti: string) => `gp:revoked-session:${jti}`;

/** What a request presented: a Bearer value and/or the session cookie. */
export interface PresentedCredential {
  bearer?: string;
  cookie?: string;
}

export type CredentialCheck = { auth: AuthContext } | { error: Error };

/**
 * Checks one credential against everything that can end it early: a personal token's revocation and expiry; a
 * session's signature, expiry, sign-out (Redis) and the account's session generation (sign out everywhere, a
 * password change or reset); for both, a disabled account. The auth middleware runs it on every request, and the
 * lab event stream again on every beat and whenever the account's credentials change, so an open stream ends too.
 */
export async function checkCredential(presented: PresentedCredential, deps: { jwtSecret: string; redis: Redis }): Promise<CredentialCheck> {
  const { bearer, cookie } = presented;
  if (bearer?.startsWith(API_TOKEN_PREFIX)) {
    const token = await ApiToken.findOne({
      where: { tokenHash: sha256Hex(bearer), revokedAt: null, [Op.or]: [{ expiresAt: null }, { expiresAt: { [Op.gt]: new Date() } }] },
      include: [{ model: User, attributes: ['id', 'disabledAt'], required: true }],
    });
    const user = (token as unknown as { User?: User } | null)?.User;
    if (!token || !user || user.disabledAt) return { error: unauthorized('This API token is not valid (expired, revoked or unknown).') };
    // Coarse last-use stamp: at most one write per minute per token.
    if (!token.lastUsedAt || Date.now() - token.lastUsedAt.getTime() > 60_000) {
      await ApiToken.update({ lastUsedAt: new Date() }, { where: { id: token.id } });
    }
    return { auth: { userId: token.userId as string, via: 'token', tokenId: token.id } };
  }

  const claims = verifySession(bearer ?? cookie ?? '', deps.jwtSecret);
  if (!claims) return { error: unauthorized('Your session has expired. Please sign in again.') };
  if (await deps.redis.exists(revokedSessionKey(claims.jti))) {
    return { error: unauthorized('You have signed out of this session. Please sign in again.') };
  }
  const user = await User.findByPk(claims.userId, { attributes: ['id', 'disabledAt', 'sessionGeneration'] });
  if (!user || user.disabledAt) return { error: unauthorized('This account is no longer active.') };
  if (claims.generation !== user.sessionGeneration) {
    return { error: unauthorized('This session was signed out (sign out everywhere, or a password change). Please sign in again.') };
  }
  return { auth: { userId: claims.userId, via: 'session', sessionId: claims.jti, expiresAt: claims.expiresAt } };
}

/** The credential a request presents, if any. */
export function presentedCredential(req: Request): PresentedCredential | null {
  const header = req.get('authorization');
  const bearer = header?.match(/^Bearer\s+(\S+)$/i)?.[1];
  const cookie = (req.cookies as Record<string, string> | undefined)?.[SESSION_COOKIE];
  if (!bearer && !cookie) return null;
  return { bearer, cookie };
}

/**
 * Finds who is calling: the browser's session cookie or an `Authorization: Bearer` header carrying a personal API
 * token (gpt_…) or a session JWT. Sets `req.auth` or leaves it empty; it never rejects by itself. A credential
 * that is present but invalid (expired, revoked, forged) is rejected with 401, so a script learns its token is dead.
 */
export function createAuthenticate(deps: { jwtSecret: string; redis: Redis }) {
  return async function authenticate(req: Request, _res: Response, next: NextFunction) {
    const presented = presentedCredential(req);
    if (!presented) return next();
    const result = await checkCredential(presented, deps);
    if ('error' in result) req.authError = result.error;
    else req.auth = result.auth;
    next();
  };
}
