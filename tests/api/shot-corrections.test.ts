// Correcting a logged shot (issue 11): its conditions, a file dropped on the wrong shot, a shot logged by mistake.
// In-process app on the throwaway PostgreSQL and Redis; no worker runs, so versions stay queued: the point here is
// which rows, audit events and statuses each correction writes.
import { createHash } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, AuditEvent, Capture, Shot } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';

let h: ApiHarness;
let serial = 0;
type Who = 'admin' | 'experimenter' | 'analyst' | 'reviewer';
const as = (who: Who) => ({ Cookie: h.sessionCookie(h.demo.users[who].id) });

beforeAll(async () => {
  h = await createApiHarness();
  await h.resetDatabase();
});
afterAll(() => h?.close());

/** A shot whose current version (done) reads the given ready files, made straight in the database. */
async function shotWithFiles(names: string[]): Promise<{ shot: Shot; captures: Capture[]; version: Analysis }> {
  const demo = h.demo;
  const shot = await Shot.create({
    labId: demo.labs.hollowmere.id, campaignId: demo.hollowmere.campaignIds[0], number: 2000 + serial++, firedAt: null,
    projectileId: null, gateRigId: null, tubePressurePa: 1500, ambientTemperatureK: 293.15, ambientPressurePa: null, createdBy: demo.users.experimenter.id,
  });
  const captures: Capture[] = [];
  for (const [i, name] of names.entries()) {
    const sha256 = createHash('sha256').update(`${shot.id}-${name}`).digest('hex');
    captures.push(await Capture.create({
      labId: shot.labId, shotId: shot.id, fileName: name, sizeBytes: 10, sha256, storageKey: `labs/${shot.labId}/raw/${sha256}`,
      uploadedBy: demo.users.experimenter.id, state: 'ready', channels: { channels: [{ name: `Gate ${'ABC'[i]}` }] } as object,
    }));
  }
  const version = await Analysis.create({
    labId: shot.labId, shotId: shot.id, version: 1, parameters: { gates: names.map((_, i) => ({ channel: `Gate ${'ABC'[i]}`, position: i * 0.15 })) },
    engineVersion: 'test', jobKey: `v1-${shot.id}`, requestedBy: null, captureIds: captures.map((c) => c.id), state: 'done', results: { speed: null } as object,
  });
  await shot.update({ currentAnalysisId: version.id, status: 'analysed' });
  return { shot, captures, version };
}

const auditOf = (shotId: string, action: string) => AuditEvent.findAll({ where: { targetId: shotId, action } });

describe('When a file was dropped on the wrong shot', () => {
  it('then removing it keeps its row and bytes, is audited, and makes a new version that reads only the other file', async () => {
    const { shot, captures } = await shotWithFiles(['gate-a.csv', 'gate-b-wrong-shot.csv']);
    const res = await request(h.app).delete(`/api/shots/${shot.id}/captures/${captures[1].id}`).set(as('experimenter'));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.capture).toMatchObject({ id: captures[1].id, removedAt: expect.any(String) });
    expect(res.body.analysis).toMatchObject({ version: 2, state: 'queued', requestedBy: h.demo.users.experimenter.id });
    const v2 = await Analysis.findByPk(res.body.analysis.id as string, { rejectOnEmpty: true });
    expect(v2.captureIds).toEqual([captures[0].id]);
    // The analyst's gate on the removed file cannot carry over: the defaults for what is left.
    expect((v2.parameters as { gates?: unknown[] }).gates ?? []).not.toContainEqual(expect.objectContaining({ channel: 'Gate B' }));
    expect(await Capture.count({ where: { id: captures[1].id } })).toBe(1);
    const audit = await auditOf(shot.id, 'capture.removed');
    expect(audit.map((a) => a.details)).toEqual([expect.objectContaining({ file: 'gate-b-wrong-shot.csv', captureId: captures[1].id })]);
    const detail = await request(h.app).get(`/api/shots/${shot.id}`).set(as('reviewer'));
    expect(detail.body.shot.status).toBe('processing');
  });

  it('then removing the only file leaves the shot awaiting files, with no current version', async () => {
    const { shot, captures } = await shotWithFiles(['only.csv']);
    const res = await request(h.app).delete(`/api/shots/${shot.id}/captures/${captures[0].id}`).set(as('experimenter'));
    expect(res.status).toBe(200);
    expect(res.body.analysis).toBeNull();
    await shot.reload();
    expect({ status: shot.status, current: shot.currentAnalysisId }).toEqual({ status: 'draft', current: null });
  });

  it('then a signed-off shot refuses it (409) and an analyst may not (403)', async () => {
    const { shot, captures, version } = await shotWithFiles(['a.csv']);
    expect((await request(h.app).delete(`/api/shots/${shot.id}/captures/${captures[0].id}`).set(as('analyst'))).status).toBe(403);
    await shot.update({ approvedAnalysisId: version.id, status: 'approved' });
    const res = await request(h.app).delete(`/api/shots/${shot.id}/captures/${captures[0].id}`).set(as('experimenter'));
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('signed off');
  });
});

describe('When a shot was logged by mistake', () => {
  it('then deleting it keeps it out of the list, the trends and the export, and a lab admin restores it; both audited', async () => {
    const { shot } = await shotWithFiles(['a.csv']);
    const labId = h.demo.labs.hollowmere.id;
    const campaignId = h.demo.hollowmere.campaignIds[0];
    const listed = async () => ((await request(h.app).get(`/api/labs/${labId}/shots?campaignId=${campaignId}&limit=200`).set(as('reviewer'))).body.shots as { id: string }[]).some((s) => s.id === shot.id);
    const inTrends = async () => JSON.stringify((await request(h.app).get(`/api/labs/${labId}/campaigns/${campaignId}/trends`).set(as('reviewer'))).body).includes(shot.id);
    const inExport = async () => {
      const res = await request(h.app).get(`/api/labs/${labId}/campaigns/${campaignId}/export?format=json`).set(as('reviewer')).buffer(true).parse((r, done) => {
        let text = '';
        r.on('data', (c: Buffer) => (text += c.toString('utf8')));
        r.on('end', () => done(null, JSON.parse(text)));
      });
      return JSON.stringify(res.body).includes(`"number":${shot.number},`);
    };
    expect([await listed(), await inTrends(), await inExport()]).toEqual([true, true, true]);

    const del = await request(h.app).delete(`/api/shots/${shot.id}`).set(as('experimenter'));
    expect(del.status, JSON.stringify(del.body)).toBe(200);
    expect(del.body.shot.deletedAt).toEqual(expect.any(String));
    expect([await listed(), await inTrends(), await inExport()]).toEqual([false, false, false]);
    const deletedList = await request(h.app).get(`/api/labs/${labId}/shots?campaignId=${campaignId}&deleted=only`).set(as('admin'));
    expect(deletedList.body.shots.map((s: { id: string }) => s.id)).toContain(shot.id);
    // Still readable by id (the record stays), but no longer editable.
    expect((await request(h.app).get(`/api/shots/${shot.id}`).set(as('reviewer'))).status).toBe(200);
    expect((await request(h.app).patch(`/api/shots/${shot.id}`).set(as('experimenter')).send({ notes: 'x' })).status).toBe(409);

    expect((await request(h.app).post(`/api/shots/${shot.id}/restore`).set(as('experimenter'))).status).toBe(403);
    const restored = await request(h.app).post(`/api/shots/${shot.id}/restore`).set(as('admin'));
    expect(restored.status).toBe(200);
    expect(restored.body.shot.deletedAt).toBeNull();
    expect(await listed()).toBe(true);
    expect((await auditOf(shot.id, 'shot.deleted')).length).toBe(1);
    expect((await auditOf(shot.id, 'shot.restored')).length).toBe(1);
  });
});

describe("When a shot's conditions are corrected", () => {
  it('then the audit holds the values before and after, in SI', async () => {
    const { shot } = await shotWithFiles(['a.csv']);
    const res = await request(h.app).patch(`/api/shots/${shot.id}`).set(as('experimenter')).send({ tubePressurePa: 1200, sealType: 'Mylar 50 µm' });
    expect(res.status).toBe(200);
    const [event] = await auditOf(shot.id, 'shot.updated');
    expect(event.details).toEqual({ before: { tubePressurePa: 1500, sealType: '' }, after: { tubePressurePa: 1200, sealType: 'Mylar 50 µm' } });
  });
});
