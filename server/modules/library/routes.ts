import { GateRig, Projectile } from '../../db/models/index.ts';
import type { RouteDef } from '../../lib/routes.ts';

export function libraryRoutes(): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/labs/:labId/projectiles',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "The lab's projectiles (SI: metres, kilograms)",
      async handler(req, res) {
        const rows = await Projectile.findAll({ where: { labId: req.lab!.id }, order: [['name', 'ASC']] });
        res.json({
          projectiles: rows.map((p) => ({
            id: p.id, name: p.name, material: p.material, diameterM: p.diameterM, diameterToleranceM: p.diameterToleranceM,
            massKg: p.massKg, massToleranceKg: p.massToleranceKg, notes: p.notes,
          })),
        });
      },
    },
    {
      method: 'get',
      path: '/api/labs/:labId/gate-rigs',
      access: { kind: 'lab', permission: 'lab:read' },
      summary: "The lab's gate rigs: gate positions along the path with their uncertainty, beam width, sensor type",
      async handler(req, res) {
        const rows = await GateRig.findAll({ where: { labId: req.lab!.id }, order: [['name', 'ASC']] });
        res.json({
          gateRigs: rows.map((r) => ({
            id: r.id, name: r.name, gates: r.gates, beamWidthM: r.beamWidthM, sensorType: r.sensorType, notes: r.notes,
          })),
        });
      },
    },
  ];
}
