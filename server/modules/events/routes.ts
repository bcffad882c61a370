import { Membership } from '../../db/models/index.ts';
import { checkCredential, presentedCredential } from '../../lib/authenticate.ts';
import type { Deps } from '../../lib/deps.ts';
import { tooManyRequests } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { labEventHubFor } from './lab-event-hub.ts';

/** Streams one person may hold open at once in one API process (a few tabs; a runaway script is refused). */
export const MAX_STREAMS_PER_USER = 12;
/**
 * A comment line this often keeps proxies from closing an idle stream and re-checks the caller's credential (signed
 * out, revoked, disabled) and membership. A change to the account ends its streams at once through Redis
 * (server/lib/account-events.ts); the beat is the fallback when that notice is missed.
 */
export const HEARTBEAT_MS = 20_000;

export function eventRoutes(deps: Deps): RouteDef[] {
  const hub = labEventHubFor(deps.redis, deps.logger);
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/events',
      access: { kind: 'lab', permission: 'lab:read' },
      summary:
        "Server-sent events (text/event-stream) of the lab: `event: shot` with data {type, shotId, campaignId, state, currentVersionId} " +
        "whenever a shot's files, versions or review change its state. Starts with `event: ready`. Notices carry ids, not results: " +
        'read the shot (GET /api/shots/:shotId) for the rest. Best effort: after a reconnect, re-read what you show',
      response: {
        status: 200,
        description: 'text/event-stream, open until the client closes it; a `: beat` comment every 20 s',
        content: {
          type: 'text/event-stream',
          example: 'retry: 3000\n\nevent: ready\ndata: {"type":"ready"}\n\nevent: shot\ndata: {"type":"shot","shotId":"…","campaignId":"…","state":"analysed","currentVersionId":"…"}\n\n',
        },
      },
      handler(req, res) {
        const labId = req.lab!.id;
        const userId = req.auth!.userId;
        if (hub.openBy(userId) >= MAX_STREAMS_PER_USER) throw tooManyRequests(`At most ${MAX_STREAMS_PER_USER} event streams per person; close another tab.`, 30);
        res.status(200).set({ 'Content-Type': 'text/event-stream; charset=utf-8', 'Cache-Control': 'no-store', Connection: 'keep-alive', 'X-Accel-Buffering': 'no' });
        res.flushHeaders();
        res.write('retry: 3000\n\nevent: ready\ndata: {"type":"ready"}\n\n');
        const presented = presentedCredential(req)!;
        const stillAllowed = async () => {
          const check = await checkCredential(presented, { jwtSecret: deps.config.jwtSecret, redis: deps.redis });
          if ('error' in check || check.auth.userId !== userId) return false;
          return (await Membership.count({ where: { labId, userId } })) > 0;
        };
        const remove = hub.add(labId, { res, userId, stillAllowed });
        const heartbeat = setInterval(() => {
          // A member removed from the lab, or a session signed out or disabled, stops hearing of it at the next beat.
          stillAllowed().then(
            (ok) => (ok ? res.write(': beat\n\n') : res.end()),
            () => res.write(': beat\n\n'),
          );
        }, HEARTBEAT_MS);
        heartbeat.unref();
        req.on('close', () => {
          clearInterval(heartbeat);
          remove();
        });
      },
    },
  ];
}
