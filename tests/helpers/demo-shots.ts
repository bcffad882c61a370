// Shots in Hollowmere's demo sweep for tests that drive the real pipeline: the demo ball and exit rig, logged
// through the API as the experimenter would.
import type { PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { GateRig, Projectile, Shot } from '../../server/db/models/index.ts';
import type { DemoWorld } from './api-harness.ts';

/** Id of the demo's 40 mm table-tennis ball. */
export async function demoBallId(demo: DemoWorld): Promise<string> {
  return (await Projectile.findOne({ where: { labId: demo.labs.hollowmere.id, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true })).id;
}

/** Logs a shot in the first campaign with the demo ball and three-gate rig (plus `conditions`); returns it. */
export async function logDemoShot(client: PipelineClient, demo: DemoWorld, conditions: Record<string, unknown> = {}): Promise<{ id: string; number: number }> {
  const res = await client.post<{ shot: { id: string; number: number } }>(`/api/labs/${demo.labs.hollowmere.id}/shots`, {
    campaignId: demo.hollowmere.campaignIds[0], projectileId: await demoBallId(demo), gateRigId: demo.hollowmere.gateRigIds[0], ...conditions,
  });
  if (res.status !== 201) throw new Error(`logging a demo shot failed: HTTP ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.shot;
}

/** Writes a shot row straight into the first campaign (demo ball, first rig, 1.8 kPa, 20 °C, 100.9 kPa), logged by
 * the experimenter: for browser tests that drop files on a shot of their own. Returns its id. */
export async function createDemoShotRow(demo: DemoWorld, number: number): Promise<string> {
  const rig = await GateRig.findByPk(demo.hollowmere.gateRigIds[0], { rejectOnEmpty: true });
  const shot = await Shot.create({
    labId: demo.labs.hollowmere.id, campaignId: demo.hollowmere.campaignIds[0], number, firedAt: new Date(),
    projectileId: await demoBallId(demo), gateRigId: rig.id, tubePressurePa: 1800, ambientTemperatureK: 293.15,
    ambientPressurePa: 100_900, createdBy: demo.users.experimenter.id,
  });
  return shot.id;
}
