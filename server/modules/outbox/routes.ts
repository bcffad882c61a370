import { readFakeOutbox } from '../../dev/fake-smtp.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';

export function outboxRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/outbox',
      access: { kind: 'lab', permission: 'outbox:read' },
      summary: "Mail the local fake SMTP server received about this lab (development and test set-ups only)",
      async handler(req, res) {
        if (deps.config.mailOutbox !== 'fake') throw notFound('This installation sends real e-mail; there is no local outbox.');
        const mails = (await readFakeOutbox(deps.redis)).filter((m) => m.labId === req.lab!.id);
        res.json({ messages: mails });
      },
    },
  ];
}
