import { apiTokenBody, type ApiTokenBody } from '../../../shared/contracts/auth.ts';
import type { Request } from 'express';
import { ApiToken, User } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { publishAccountChanged } from '../../lib/account-events.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { AppError, notFound, tooManyRequests } from '../../lib/errors.ts';
import { verifyPassword } from '../../lib/passwords.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { newApiToken } from '../../lib/tokens.ts';

const view = (t: ApiToken) => ({
  id: t.id,
  name: t.name,
  prefix: t.tokenPrefix,
  createdAt: t.createdAt,
  expiresAt: t.expiresAt,
  lastUsedAt: t.lastUsedAt,
  revokedAt: t.revokedAt,
});

/**
 * A token never makes or lists tokens (issue 12, item 6): otherwise a leaked token could mint one that outlives its
 * expiry and its revocation. Only a browser session can, so no token's lifetime is ever set by another token.
 */
function requireSession(req: Request, what: string): void {
  if (req.auth!.via !== 'session') {
    throw new AppError(403, 'session_required', `${what} only in a signed-in browser session (API tokens page), not with an API token.`);
  }
}

/** The password typed again, checked like a sign-in (and counted by the same limiter, so it cannot be guessed here). */
async function confirmPassword(deps: Deps, req: Request, password: string): Promise<void> {
  const user = await User.findByPk(req.auth!.userId, { rejectOnEmpty: true });
  const ip = clientIp(req);
  const attempt = await deps.loginLimiter.reserve(user.email, ip);
  if (attempt.delayMs > 0) await new Promise((resolve) => setTimeout(resolve, attempt.delayMs));
  if (attempt.blocked) throw tooManyRequests('Too many wrong passwords. Try again later, or ask a lab admin to unlock your sign-in.', attempt.retryAfterSeconds);
  if (!(await verifyPassword(user.passwordHash, password))) {
    await deps.loginLimiter.fail(user.email, ip);
    await recordAudit({ labId: null, actorId: user.id, action: 'auth.password_confirm_failed', ip });
    throw new AppError(403, 'wrong_password', 'That is not your password. Type the password you sign in with.');
  }
  await deps.loginLimiter.release(user.email, ip);
}

/** Personal API tokens for scripts: each user sees and manages only their own. */
export function tokenRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/me/tokens',
      access: { kind: 'user' },
      summary: 'List your personal API tokens (never the secrets); in a browser session only',
      async handler(req, res) {
        requireSession(req, 'Your tokens are listed');
        const tokens = await ApiToken.findAll({ where: { userId: req.auth!.userId }, order: [['createdAt', 'DESC']] });
        res.json({ tokens: tokens.map(view) });
      },
    },
    {
      method: 'post',
      path: '/api/me/tokens',
      access: { kind: 'user' },
      summary: 'Create a personal API token (browser session and your password); the secret is shown once in this response',
      body: apiTokenBody,
      async handler(req, res) {
        requireSession(req, 'Tokens are made');
        const { name, expiresInDays, password } = req.body as ApiTokenBody;
        await confirmPassword(deps, req, password);
        const { token, hash, prefix } = newApiToken();
        const expiresAt = expiresInDays ? new Date(Date.now() + expiresInDays * 86_400_000) : null;
        const row = await ApiToken.create({ userId: req.auth!.userId, name, tokenHash: hash, tokenPrefix: prefix, expiresAt });
        await recordAudit({ labId: null, actorId: req.auth!.userId, action: 'token.created', targetType: 'api_token', targetId: row.id, details: { name }, ip: clientIp(req) });
        res.status(201).json({ token: view(row), secret: token });
      },
    },
    {
      method: 'delete',
      path: '/api/me/tokens/:tokenId',
      access: { kind: 'user' },
      summary: 'Revoke one of your API tokens',
      async handler(req, res) {
        const row = await ApiToken.findOne({ where: { id: req.params.tokenId as string, userId: req.auth!.userId } });
        if (!row) throw notFound('No such token.');
        if (!row.revokedAt) await row.update({ revokedAt: new Date() });
        await recordAudit({ labId: null, actorId: req.auth!.userId, action: 'token.revoked', targetType: 'api_token', targetId: row.id, ip: clientIp(req) });
        // An event stream opened with the token ends now, not at its next beat.
        await publishAccountChanged(deps.redis, req.auth!.userId);
        res.status(204).end();
      },
    },
  ];
}
