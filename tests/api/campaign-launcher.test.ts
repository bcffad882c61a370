// A campaign's launcher (tube length and bore): logged when the campaign starts or corrected later, checked by the
// shared schema, audited, and handed to the trends page with the outside air each shot logged.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, AuditEvent, Campaign, Shot } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';

let h: ApiHarness;
let demo: DemoWorld;
let serial = 0;
const unique = (what: string) => `${what} ${Date.now().toString(36)}${(serial++).toString(36)}`;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
});
afterAll(async () => {
  await h?.close();
});

const as = (who: 'admin' | 'experimenter' | 'analyst') => ({ Cookie: h.sessionCookie(demo.users[who].id) });
const campaigns = () => `/api/labs/${demo.labs.hollowmere.id}/campaigns`;

describe('the launcher of a campaign', () => {
  it('When a campaign is started with a tube length and bore, then they are stored in SI and listed', async () => {
    const name = unique('Long tube');
    const res = await request(h.app).post(campaigns()).set(as('experimenter')).send({ name, tubeLengthM: 3.05, boreM: 0.0412 });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.campaign).toMatchObject({ name, tubeLengthM: 3.05, boreM: 0.0412, shotCount: 0 });
    const row = await Campaign.findByPk(res.body.campaign.id, { rejectOnEmpty: true });
    expect([row.tubeLengthM, row.boreM]).toEqual([3.05, 0.0412]);
    const list = await request(h.app).get(campaigns()).set(as('analyst'));
    expect(list.body.campaigns.find((c: { id: string }) => c.id === row.id)).toMatchObject({ tubeLengthM: 3.05, boreM: 0.0412 });
  });

  it('When a campaign is started without them, then both are null (not logged, not zero)', async () => {
    const res = await request(h.app).post(campaigns()).set(as('admin')).send({ name: unique('No tube') });
    expect(res.body.campaign).toMatchObject({ tubeLengthM: null, boreM: null });
  });

  it('When the launcher is corrected, then only the fields sent change and the audit trail has before and after', async () => {
    const c = (await request(h.app).post(campaigns()).set(as('experimenter')).send({ name: unique('Corrected'), description: 'kept', tubeLengthM: 2 })).body.campaign;
    const res = await request(h.app).patch(`${campaigns()}/${c.id}`).set(as('experimenter')).send({ tubeLengthM: 2.1, boreM: 0.0405 });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.campaign).toMatchObject({ id: c.id, name: c.name, description: 'kept', tubeLengthM: 2.1, boreM: 0.0405 });
    const event = await AuditEvent.findOne({ where: { action: 'campaign.updated', targetId: c.id }, rejectOnEmpty: true });
    expect(event.actorId).toBe(demo.users.experimenter.id);
    expect(event.details).toEqual({ before: { tubeLengthM: 2, boreM: null }, after: { tubeLengthM: 2.1, boreM: 0.0405 } });
    // Cleared again: null is a value, "not logged".
    const cleared = await request(h.app).patch(`${campaigns()}/${c.id}`).set(as('admin')).send({ boreM: null });
    expect(cleared.body.campaign).toMatchObject({ tubeLengthM: 2.1, boreM: null });
  });

  it('When the values are wrong, then the answer names the field and the reason, and nothing changes', async () => {
    const c = (await request(h.app).post(campaigns()).set(as('experimenter')).send({ name: unique('Guarded'), tubeLengthM: 2 })).body.campaign;
    const cases: [object, string][] = [
      [{ tubeLengthM: 0 }, 'The tube length must be greater than 0.'],
      [{ tubeLengthM: 250 }, 'The tube length looks wrong (over 100 m).'],
      [{ boreM: -0.04 }, 'The bore must be greater than 0.'],
      [{ boreM: 40 }, 'The bore looks wrong (over 1 m).'],
      [{ boreM: '40' }, 'The bore must be a number (m).'],
      [{}, 'Nothing to change: send at least one field.'],
    ];
    for (const [body, message] of cases) {
      const res = await request(h.app).patch(`${campaigns()}/${c.id}`).set(as('experimenter')).send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(JSON.stringify(res.body.error), JSON.stringify(body)).toContain(message);
    }
    const taken = await request(h.app).patch(`${campaigns()}/${c.id}`).set(as('experimenter')).send({ name: 'Vacuum sweep, autumn 2026' });
    expect(taken.status).toBe(409);
    expect(taken.body.error.message).toContain('already has a campaign named');
    expect((await Campaign.findByPk(c.id, { rejectOnEmpty: true })).tubeLengthM).toBe(2);
    // An analyst reads campaigns but does not correct them; another lab does not see this one.
    expect((await request(h.app).patch(`${campaigns()}/${c.id}`).set(as('analyst')).send({ tubeLengthM: 3 })).status).toBe(403);
    const elsewhere = `/api/labs/${demo.labs.sandgate.id}/campaigns/${c.id}`;
    expect((await request(h.app).patch(elsewhere).set({ Cookie: h.sessionCookie(demo.users.otherLabAdmin.id) }).send({ tubeLengthM: 3 })).status).toBe(404);
  });

  it('When the trends are read, then the campaign brings its launcher and each point the outside air of its shot', async () => {
    const sweepId = demo.hollowmere.campaignIds[0];
    const sweep = await request(h.app).get(`${campaigns()}/${sweepId}/trends`).set(as('analyst'));
    expect(sweep.status).toBe(200);
    // The demo lab's sweep (server/db/seeders/demo.ts) fires from a 2 m tube of 40.5 mm bore.
    expect(sweep.body.campaign).toMatchObject({ id: sweepId, tubeLengthM: 2, boreM: 0.0405 });

    const labId = demo.labs.hollowmere.id;
    const c = (await request(h.app).post(campaigns()).set(as('experimenter')).send({ name: unique('Air check'), tubeLengthM: 1.5 })).body.campaign;
    const logged: [number, number | null, number | null][] = [[1, 99_800, 291.45], [2, null, null]];
    for (const [number, pa, k] of logged) {
      const shot = await Shot.create({ labId, campaignId: c.id, number, firedAt: null, projectileId: null, gateRigId: null, tubePressurePa: 2000, sealType: '', ambientTemperatureK: k, ambientPressurePa: pa, createdBy: null });
      const a = await Analysis.create({
        labId, shotId: shot.id, version: 1, parameters: {}, engineVersion: 'launcher-test', jobKey: `air-${c.id}-${number}`, requestedBy: null, state: 'done',
        results: { speed: { value: 400, uncertainty: 2, method: 'flight' } } as object,
      });
      await shot.update({ currentAnalysisId: a.id, status: 'analysed' });
    }
    const res = await request(h.app).get(`${campaigns()}/${c.id}/trends`).set(as('analyst'));
    expect(res.body.campaign).toMatchObject({ tubeLengthM: 1.5, boreM: null });
    expect(res.body.points.map((p: { number: number; ambientPressurePa: number | null; ambientTemperatureK: number | null }) => [p.number, p.ambientPressurePa, p.ambientTemperatureK])).toEqual(logged);
  });
});
