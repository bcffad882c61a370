import { notificationPreferencesBody, type NotificationPreferencesBody } from '../../../shared/contracts/review.ts';
import { NotificationPreference } from '../../db/models/index.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { preferencesOf } from './compose-notification.ts';

export function notificationRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/me/notifications',
      access: { kind: 'user' },
      summary: 'Which kinds of e-mail you receive (review requested, signed off, returned, job failed); all on by default',
      async handler(req, res) {
        res.json({ preferences: await preferencesOf(req.auth!.userId) });
      },
    },
    {
      method: 'patch',
      path: '/api/me/notifications',
      access: { kind: 'user' },
      summary: 'Turn kinds of e-mail on or off',
      body: notificationPreferencesBody,
      async handler(req, res) {
        const userId = req.auth!.userId;
        const body = req.body as NotificationPreferencesBody;
        const current = await preferencesOf(userId);
        await NotificationPreference.upsert({ userId, ...current, ...body, updatedAt: new Date() });
        res.json({ preferences: await preferencesOf(userId) });
      },
    },
  ];
}
