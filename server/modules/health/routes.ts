import type { Deps } from '../../lib/deps.ts';
import type { RouteDef } from '../../lib/routes.ts';

export function healthRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/health',
      access: { kind: 'public' },
      summary: 'Liveness and dependencies: 200 when PostgreSQL and Redis answer, 503 otherwise',
      async handler(_req, res) {
        const [db, redis] = await Promise.all([
          deps.sequelize.query('SELECT 1').then(() => 'ok', () => 'down'),
          deps.redis.ping().then(() => 'ok', () => 'down'),
        ]);
        res.status(db === 'ok' && redis === 'ok' ? 200 : 503).json({ status: db === 'ok' && redis === 'ok' ? 'ok' : 'degraded', db, redis });
      },
    },
  ];
}
