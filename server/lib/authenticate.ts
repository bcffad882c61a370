import type { NextFunction, Request, Response } from 'express';
import type { Redis } from 'ioredis';
import { Op } from 'sequelize';
import { ApiToken, User } from '../db/models/index.ts';
import { API_TOKEN_PREFIX, sha256Hex, verifySession } from './tokens.ts';
import { unauthorized } from './errors.ts';
import './request-context.ts';

export const SESSION_COOKIE = 'gp_session';
export const revokedSessionKey = (jti: string) => `gp:revoked-session:${jti}`;

/**
 * Finds who is calling: the browser's session cookie or an `Authorization: Bearer` header carrying a personal API
 * token (gpt_…) or a session JWT. Sets `req.auth` or leaves it empty; it never rejects by itself. A credential
 * that is present but invalid (expired, revoked, forged) is rejected with 401, so a script learns its token is dead.
 */
export function createAuthenticate(deps: { jwtSecret: string; redis: Redis }) {
  return async function authenticate(req: Request, _res: Response, next: NextFunction) {
    const header = req.get('authorization');
    const bearer = header?.match(/^Bearer\s+(\S+)$/i)?.[1];
    const cookie = (req.cookies as Record<string, string> | undefined)?.[SESSION_COOKIE];
    if (!bearer && !cookie) return next();

    if (bearer?.startsWith(API_TOKEN_PREFIX)) {
      const token = await ApiToken.findOne({
        where: { tokenHash: sha256Hex(bearer), revokedAt: null, [Op.or]: [{ expiresAt: null }, { expiresAt: { [Op.gt]: new Date() } }] },
        include: [{ model: User, attributes: ['id', 'disabledAt'], required: true }],
      });
      const user = (token as unknown as { User?: User } | null)?.User;
      if (!token || !user || user.disabledAt) {
        req.authError = unauthorized('This API token is not valid (expired, revoked or unknown).');
        return next();
      }
      // Coarse last-use stamp: at most one write per minute per token.
      if (!token.lastUsedAt || Date.now() - token.lastUsedAt.getTime() > 60_000) {
        await ApiToken.update({ lastUsedAt: new Date() }, { where: { id: token.id } });
      }
      req.auth = { userId: token.userId as string, via: 'token', tokenId: token.id };
      return next();
    }

    const claims = verifySession(bearer ?? cookie!, deps.jwtSecret);
    if (!claims) {
      req.authError = unauthorized('Your session has expired. Please sign in again.');
      return next();
    }
    if (await deps.redis.exists(revokedSessionKey(claims.jti))) {
      req.authError = unauthorized('You have signed out of this session. Please sign in again.');
      return next();
    }
    const user = await User.findByPk(claims.userId, { attributes: ['id', 'disabledAt'] });
    if (!user || user.disabledAt) {
      req.authError = unauthorized('This account is no longer active.');
      return next();
    }
    req.auth = { userId: claims.userId, via: 'session', sessionId: claims.jti, expiresAt: claims.expiresAt };
    next();
  };
}
