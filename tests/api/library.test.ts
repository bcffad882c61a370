// Library editing through the API: projectiles and gate rigs are created and corrected by analysts and admins,
// validated with the shared zod schemas, unique by name within a lab (whatever the case), audited, and their measured
// values are locked once a signed-off shot uses them. Runs against the throwaway PostgreSQL + Redis.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, AuditEvent, GateRig, Projectile, Shot } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;
let serial = 0;
const unique = (what: string) => `${what} ${Date.now().toString(36)}${(serial++).toString(36)}`;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
});
afterAll(() => h?.close());

const lab = () => demo.labs.hollowmere.id;
const as = (who: 'admin' | 'analyst' | 'experimenter') => ({ Cookie: h.sessionCookie(demo.users[who].id) });

// A table-tennis ball: 40 mm and 2.7 g (ITTF Laws 2.3.1–2.3.2, the values in ../shared/DOMAIN.md).
const ball = (name: string) => ({ name, diameterM: 0.04, diameterToleranceM: 0.0001, massKg: 0.0027, massToleranceKg: 0.00005 });
const rig = (name: string) => ({
  name,
  gates: [
    { label: 'A', position_m: 0, position_uncertainty_m: 0.0005 },
    { label: 'B', position_m: 0.15, position_uncertainty_m: 0.0005 },
  ],
  beamWidthM: 0.001,
  sensorType: 'phototransistor',
});

/** A shot of the first demo campaign using this projectile and rig, in the given status. */
async function shotUsing(projectileId: string | null, gateRigId: string | null, status: 'analysed' | 'approved') {
  return Shot.create({
    labId: lab(), campaignId: demo.hollowmere.campaignIds[0], number: 500 + serial++, firedAt: null, projectileId, gateRigId,
    tubePressurePa: 1000, ambientTemperatureK: 293.15, ambientPressurePa: 101_325, createdBy: null, status,
  });
}

describe('projectiles', () => {
  it('When an analyst adds a projectile, then it is stored in SI units, listed, and audited with its values', async () => {
    // Arrange
    const name = unique('Ball');
    // Act
    const res = await request(h.app).post(`/api/labs/${lab()}/projectiles`).set(as('analyst')).send({ ...ball(name), material: 'plastic' });
    // Assert
    expect(res.status).toBe(201);
    expect(res.body.projectile).toMatchObject({ name, diameterM: 0.04, massKg: 0.0027, material: 'plastic', notes: '' });
    const list = await request(h.app).get(`/api/labs/${lab()}/projectiles`).set(as('experimenter'));
    expect(list.body.projectiles).toEqual(expect.arrayContaining([expect.objectContaining({ name, diameterToleranceM: 0.0001 })]));
    const event = await AuditEvent.findOne({ where: { action: 'projectile.created', targetId: res.body.projectile.id } });
    expect(event?.actorId).toBe(demo.users.analyst.id);
    expect(event?.details).toMatchObject({ after: { name, diameterM: 0.04 } });
  });

  it('When a name is already taken in the lab (in any case), then the answer is 409 naming the clash, and another lab may use it', async () => {
    const name = unique('Steel ball');
    expect((await request(h.app).post(`/api/labs/${lab()}/projectiles`).set(as('admin')).send(ball(name))).status).toBe(201);
    // Act
    const res = await request(h.app).post(`/api/labs/${lab()}/projectiles`).set(as('analyst')).send(ball(name.toUpperCase()));
    // Assert
    expect(res.status).toBe(409);
    expect(res.body.error.message).toBe(`This lab already has a projectile named "${name}"; choose another name.`);
    const other = await request(h.app).post(`/api/labs/${demo.labs.sandgate.id}/projectiles`)
      .set({ Cookie: h.sessionCookie(demo.users.otherLabAdmin.id) }).send(ball(name));
    expect(other.status).toBe(201);
  });

  it('When a value is out of range, then the answer is 400 naming the field and the reason', async () => {
    const res = await request(h.app).post(`/api/labs/${lab()}/projectiles`).set(as('analyst'))
      .send({ ...ball(unique('Bad')), diameterM: 0, massToleranceKg: -0.001 });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toContain('diameterM: Diameter must be greater than 0 mm.');
    expect(res.body.error.message).toContain('massToleranceKg: Mass tolerance cannot be negative.');
  });

  it('When an analyst corrects a tolerance, then the row changes and the audit event holds before and after', async () => {
    const p = await Projectile.create({ labId: lab(), ...ball(unique('Ball')) });
    // Act
    const res = await request(h.app).patch(`/api/labs/${lab()}/projectiles/${p.id}`).set(as('analyst')).send({ massToleranceKg: 0.0001 });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.projectile).toMatchObject({ massToleranceKg: 0.0001, massKg: 0.0027 });
    await p.reload();
    expect(p.massToleranceKg).toBe(0.0001);
    const event = await AuditEvent.findOne({ where: { action: 'projectile.updated', targetId: p.id } });
    expect(event?.details).toMatchObject({ before: { massToleranceKg: 0.00005 }, after: { massToleranceKg: 0.0001 } });
  });

  it('When a signed-off shot uses the projectile, then its measured values are refused with 409 suggesting a new entry, while notes may change', async () => {
    const p = await Projectile.create({ labId: lab(), ...ball(unique('Ball')) });
    await shotUsing(p.id, null, 'approved');
    // Act
    const res = await request(h.app).patch(`/api/labs/${lab()}/projectiles/${p.id}`).set(as('analyst')).send({ diameterM: 0.0401 });
    // Assert
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('used by 1 signed-off shot');
    expect(res.body.error.message).toContain('(diameter)');
    expect(res.body.error.message).toContain('Save your values as a new entry');
    await p.reload();
    expect(p.diameterM).toBe(0.04);
    // Sending an unchanged value, or changing only words, is no change of numbers.
    const same = await request(h.app).patch(`/api/labs/${lab()}/projectiles/${p.id}`).set(as('analyst')).send({ diameterM: 0.04, notes: 'Batch 7' });
    expect(same.status).toBe(200);
    expect(same.body.projectile.notes).toBe('Batch 7');
  });

  it('When only an analysed (not signed-off) shot uses the projectile, then its values may still change', async () => {
    const p = await Projectile.create({ labId: lab(), ...ball(unique('Ball')) });
    await shotUsing(p.id, null, 'analysed');
    const res = await request(h.app).patch(`/api/labs/${lab()}/projectiles/${p.id}`).set(as('admin')).send({ diameterM: 0.0401 });
    expect(res.status).toBe(200);
    expect(res.body.projectile.diameterM).toBe(0.0401);
  });

  it("When a projectile of another lab or a made-up id is patched, then the answer is 404", async () => {
    const sandgateBall = await Projectile.create({ labId: demo.labs.sandgate.id, ...ball(unique('Theirs')) });
    const res = await request(h.app).patch(`/api/labs/${lab()}/projectiles/${sandgateBall.id}`).set(as('admin')).send({ notes: 'x' });
    expect(res.status).toBe(404);
    const made = await request(h.app).patch(`/api/labs/${lab()}/projectiles/00000000-0000-4000-8000-000000000000`).set(as('admin')).send({ notes: 'x' });
    expect(made.status).toBe(404);
  });

  it('When a rename would clash with another projectile, then the answer is 409 and the name stays', async () => {
    const a = await Projectile.create({ labId: lab(), ...ball(unique('First')) });
    const b = await Projectile.create({ labId: lab(), ...ball(unique('Second')) });
    const res = await request(h.app).patch(`/api/labs/${lab()}/projectiles/${b.id}`).set(as('analyst')).send({ name: a.name });
    expect(res.status).toBe(409);
    await b.reload();
    expect(b.name).not.toBe(a.name);
    // Renaming to its own name in another case is fine.
    const self = await request(h.app).patch(`/api/labs/${lab()}/projectiles/${b.id}`).set(as('analyst')).send({ name: b.name.toLowerCase() });
    expect(self.status).toBe(200);
  });
});

describe('gate rigs', () => {
  it('When an analyst adds a rig, then its gates keep their order and values, and the event is audited', async () => {
    const name = unique('Rig');
    const res = await request(h.app).post(`/api/labs/${lab()}/gate-rigs`).set(as('analyst')).send(rig(name));
    expect(res.status).toBe(201);
    expect(res.body.gateRig).toMatchObject({ name, beamWidthM: 0.001, sensorType: 'phototransistor', notes: '' });
    expect(res.body.gateRig.gates).toEqual(rig(name).gates);
    expect(await AuditEvent.count({ where: { action: 'gate_rig.created', targetId: res.body.gateRig.id } })).toBe(1);
  });

  it('When gate positions do not strictly increase, then the answer is 400 naming the gate', async () => {
    const body = rig(unique('Rig'));
    body.gates[1].position_m = 0;
    const res = await request(h.app).post(`/api/labs/${lab()}/gate-rigs`).set(as('analyst')).send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toContain('gates.1.position_m: Gate 2 (B) must lie further along the path than gate 1 (A)');
  });

  it('When two gates share a label or the sensor type is unknown, then the answer is 400 saying which', async () => {
    const body = { ...rig(unique('Rig')), sensorType: 'laser' };
    body.gates[1].label = 'a';
    const res = await request(h.app).post(`/api/labs/${lab()}/gate-rigs`).set(as('admin')).send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toContain('gates.1.label: Gate 2 has the same label as gate 1');
    expect(res.body.error.message).toContain('sensorType: Sensor type: choose one of photodiode, phototransistor, photodarlington, other.');
  });

  it('When an experimenter or reviewer tries to add a rig, then the answer is 403', async () => {
    const res = await request(h.app).post(`/api/labs/${lab()}/gate-rigs`).set(as('experimenter')).send(rig(unique('Rig')));
    expect(res.status).toBe(403);
    const rev = await request(h.app).post(`/api/labs/${lab()}/gate-rigs`).set({ Cookie: h.sessionCookie(demo.users.reviewer.id) }).send(rig(unique('Rig')));
    expect(rev.status).toBe(403);
  });

  it('When gates are reordered on a rig no signed-off shot uses, then the new order is stored', async () => {
    const r = await GateRig.create({ labId: lab(), ...rig(unique('Rig')), sensorType: 'photodiode' });
    const gates = [
      { label: 'B', position_m: -0.1, position_uncertainty_m: 0.001 },
      { label: 'A', position_m: 0, position_uncertainty_m: 0.0005 },
      { label: 'C', position_m: 0.3, position_uncertainty_m: 0.0005 },
    ];
    const res = await request(h.app).patch(`/api/labs/${lab()}/gate-rigs/${r.id}`).set(as('analyst')).send({ gates });
    expect(res.status).toBe(200);
    await r.reload();
    expect(r.gates).toEqual(gates);
  });

  it('When a signed-off shot uses the rig, then moving a gate is refused with 409, and the same gates sent back are accepted', async () => {
    const r = await GateRig.create({ labId: lab(), ...rig(unique('Rig')), sensorType: 'photodiode' });
    const shot = await shotUsing(null, r.id, 'approved');
    // An analysis holds the rig's values already; the refusal keeps the library saying the same thing.
    await Analysis.create({
      labId: lab(), shotId: shot.id, version: 1, parameters: {}, engineVersion: 'test', jobKey: unique('job'), requestedBy: null, state: 'done',
    });
    const moved = rig(r.name).gates.map((g, i) => ({ ...g, position_m: i * 0.16 }));
    const res = await request(h.app).patch(`/api/labs/${lab()}/gate-rigs/${r.id}`).set(as('analyst')).send({ gates: moved, beamWidthM: 0.002 });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/^This gate rig is used by 1 signed-off shot, so its measured values \(gates, beam width\) cannot change\. Save your values as a new entry/);
    // Key order differs from what PostgreSQL's jsonb returns; it is still the same gates.
    const same = rig(r.name).gates.map((g) => ({ position_uncertainty_m: g.position_uncertainty_m, position_m: g.position_m, label: g.label }));
    const ok = await request(h.app).patch(`/api/labs/${lab()}/gate-rigs/${r.id}`).set(as('analyst')).send({ gates: same, notes: 'Rail re-measured, unchanged' });
    expect(ok.status).toBe(200);
  });

  it('When a patch is empty, then the answer is 400 saying nothing was sent', async () => {
    const r = await GateRig.create({ labId: lab(), ...rig(unique('Rig')), sensorType: 'photodiode' });
    const res = await request(h.app).patch(`/api/labs/${lab()}/gate-rigs/${r.id}`).set(as('analyst')).send({});
    expect(res.status).toBe(400);
    expect(res.body.error.message).toContain('Nothing to change');
  });
});
