import type { Request } from 'express';
import { Shot } from '../../db/models/index.ts';
import { notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { shotSummary } from './view.ts';

/** Routes addressed by a shot id find their lab from the shot itself. */
export async function labOfShot(req: Request): Promise<string | null> {
  const shot = await Shot.findByPk(req.params.shotId as string, { attributes: ['labId'] });
  return shot?.labId ?? null;
}

export function shotRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/shots/:shotId',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfShot },
      summary: 'One shot with its conditions',
      async handler(req, res) {
        const shot = await Shot.findOne({ where: { id: req.params.shotId as string, labId: req.lab!.id } });
        if (!shot) throw notFound('No such shot.');
        res.json({ shot: shotSummary(shot) });
      },
    },
  ];
}
