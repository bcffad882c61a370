import { apiTokenBody, type ApiTokenBody } from '../../../shared/contracts/auth.ts';
import { ApiToken } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import { notFound } from '../../lib/errors.ts';
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

/** Personal API tokens for scripts: each user sees and manages only their own. */
export function tokenRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/me/tokens',
      access: { kind: 'user' },
      summary: 'List your personal API tokens (never the secrets)',
      async handler(req, res) {
        const tokens = await ApiToken.findAll({ where: { userId: req.auth!.userId }, order: [['createdAt', 'DESC']] });
        res.json({ tokens: tokens.map(view) });
      },
    },
    {
      method: 'post',
      path: '/api/me/tokens',
      access: { kind: 'user' },
      summary: 'Create a personal API token; the secret is shown once in this response',
      body: apiTokenBody,
      async handler(req, res) {
        const { name, expiresInDays } = req.body as ApiTokenBody;
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
        res.status(204).end();
      },
    },
  ];
}
