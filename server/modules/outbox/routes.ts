import { readFakeOutbox } from '../../dev/fake-smtp.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';

const hideLinks = (text: string): string => text.replace(/(\/invite\/)[A-Za-z0-9_-]+/g, '$1[only the addressee sees this link]');

export function outboxRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/outbox',
      access: { kind: 'lab', permission: 'outbox:read' },
      summary: "Mail the local fake SMTP server received about this lab (development and test set-ups only)",
      async handler(req, res) {
        if (deps.config.mailOutbox !== 'fake') throw notFound('This installation sends real e-mail; there is no local outbox.');
        // An invitation link is the addressee's proof of owning the address: admins see that it was sent, not
        // the link, or they could take the account an address will later get (issue 12, item 9).
        const mails = (await readFakeOutbox(deps.redis)).filter((m) => m.labId === req.lab!.id).map((m) => ({ ...m, text: hideLinks(m.text) }));
        res.json({ messages: mails });
      },
    },
  ];
}
