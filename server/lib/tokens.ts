import { createHash, randomBytes, randomUUID } from 'node:crypto';
import jwt from 'jsonwebtoken';

const ISSUER = 'gatepost';

export interface SessionClaims {
  userId: string;
  jti: string;
  expiresAt: Date;
  /** The account's session generation when the session was made (sessions from before 0008 count as 0). */
  generation: number;
}

/**
 * A browser session: a signed JWT kept in an httpOnly cookie; its `jti` lets sign-out revoke it early, its `gen`
 * (the account's session generation) lets "sign out everywhere" end every session made before it.
 */
export function signSession(userId: string, secret: string, hours: number, generation = 0): { token: string; claims: SessionClaims } {
  const jti = randomUUID();
  const token = jwt.sign({ typ: 'session', gen: generation }, secret, {
    algorithm: 'HS256',
    subject: userId,
    jwtid: jti,
    issuer: ISSUER,
    expiresIn: Math.round(hours * 3600),
  });
  const decoded = jwt.decode(token) as { exp: number };
  return { token, claims: { userId, jti, expiresAt: new Date(decoded.exp * 1000), generation } };
}

/** Returns the claims of a valid session token, or null for anything expired, forged or malformed. */
export function verifySession(token: string, secret: string): SessionClaims | null {
  try {
    const payload = jwt.verify(token, secret, { algorithms: ['HS256'], issuer: ISSUER }) as jwt.JwtPayload;
    if (payload.typ !== 'session' || !payload.sub || !payload.jti || !payload.exp) return null;
    const generation = payload.gen === undefined ? 0 : payload.gen;
    if (!Number.isInteger(generation) || generation < 0) return null;
    return { userId: payload.sub, jti: payload.jti, expiresAt: new Date(payload.exp * 1000), generation };
  } catch {
    return null;
  }
}

export const API_TOKEN_PREFIX = 'gpt_';

/** A personal API token: random, shown once, stored only as its SHA-256 (a fast hash is right for 256 random bits). */
export function newApiToken(): { token: string; hash: string; prefix: string } {
  const token = API_TOKEN_PREFIX + randomBytes(32).toString('base64url');
  return { token, hash: sha256Hex(token), prefix: token.slice(0, API_TOKEN_PREFIX.length + 6) };
}

/** Password reset links carry a random secret too (192 bits); the database keeps only its hash. */
export function newPasswordResetSecret(): { secret: string; hash: string } {
  const secret = randomBytes(24).toString('base64url');
  return { secret, hash: sha256Hex(secret) };
}

/** Invitation links carry a random secret; the database keeps only its hash. */
export function newInvitationSecret(): { secret: string; hash: string } {
  const secret = randomBytes(24).toString('base64url');
  return { secret, hash: sha256Hex(secret) };
}

export function sha256Hex(value: string): string {
  return createHash('sha256').update(value).digest('hex');
}
