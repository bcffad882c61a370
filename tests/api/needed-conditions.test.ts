// Which conditions a campaign's shots need, through the API (issue 11 review, gap a): the campaign says what it needs
// (neededConditions) and every shot what it lacks (missingConditions), the same in the campaign, the shot list and
// the shot, by the rule in shared/contracts/shots.ts. Sandgate's drop tower has no tube: its shots miss nothing.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Campaign, Shot } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { analysedShot } from './review-fixtures.ts';

let h: ApiHarness;

beforeAll(async () => {
  h = await createApiHarness();
  await h.resetDatabase();
});
afterAll(() => h?.close());

const get = (who: 'experimenter' | 'otherLabAdmin', url: string) => request(h.app).get(url).set({ Cookie: h.sessionCookie(h.demo.users[who].id) });
const keys = (needed: { key: string }[]) => needed.map((c) => c.key);

describe('needed conditions', () => {
  it('When Sandgate drops a ball through its gates (no tube, no vacuum logged), then the campaign needs only rig and projectile and no shot says "conditions missing"', async () => {
    const labId = h.demo.labs.sandgate.id;
    const campaignId = h.demo.sandgate.campaignIds[0];
    // A drop shot as the demo logs them: no tube vacuum, room air logged.
    const pair = await Shot.findOne({ where: { labId } });
    const shot = pair ?? await Shot.create({ labId, campaignId, number: 1, tubePressurePa: null, sealType: '', projectileId: h.demo.sandgate.projectileIds[0], gateRigId: h.demo.sandgate.gateRigIds[0], ambientTemperatureK: 295.15, ambientPressurePa: 100_400 });
    expect(shot.tubePressurePa).toBeNull();

    const campaign = await get('otherLabAdmin', `/api/labs/${labId}/campaigns/${campaignId}`);
    expect(campaign.status).toBe(200);
    expect(keys(campaign.body.campaign.neededConditions)).toEqual(['gateRigId', 'projectileId']);
    expect(campaign.body.shots.length).toBeGreaterThan(0);
    for (const s of campaign.body.shots) expect(s.missingConditions).toEqual([]);

    const list = await get('otherLabAdmin', `/api/labs/${labId}/shots?campaignId=${campaignId}`);
    for (const s of list.body.shots) expect(s.missingConditions).toEqual([]);
    expect((await get('otherLabAdmin', `/api/shots/${shot.id}`)).body.shot.missingConditions).toEqual([]);

    const all = await get('otherLabAdmin', `/api/labs/${labId}/campaigns`);
    expect(keys(all.body.campaigns[0].neededConditions)).toEqual(['gateRigId', 'projectileId']);
  });

  it('When the vacuum sweep (launcher tube logged) has a shot without vacuum or outside air, then the campaign, the list and the shot all name what is missing', async () => {
    const labId = h.demo.labs.hollowmere.id;
    const sweep = await Campaign.findOne({ where: { labId, name: 'Vacuum sweep, autumn 2026' }, rejectOnEmpty: true });
    const bare = await Shot.create({ labId, campaignId: sweep.id, number: 90, tubePressurePa: null, sealType: '', projectileId: h.demo.hollowmere.projectileIds[0], gateRigId: h.demo.hollowmere.gateRigIds[0], ambientTemperatureK: 293.15, ambientPressurePa: null });
    const campaign = await get('experimenter', `/api/labs/${labId}/campaigns/${sweep.id}`);
    expect(keys(campaign.body.campaign.neededConditions)).toEqual(['gateRigId', 'projectileId', 'tubePressurePa', 'ambientTemperatureK', 'ambientPressurePa']);
    expect(campaign.body.shots.find((s: { id: string }) => s.id === bare.id).missingConditions).toEqual(['tube vacuum', 'ambient pressure']);
    const list = await get('experimenter', `/api/labs/${labId}/shots?campaignId=${sweep.id}&limit=100`);
    expect(list.body.shots.find((s: { id: string }) => s.id === bare.id).missingConditions).toEqual(['tube vacuum', 'ambient pressure']);
    expect((await get('experimenter', `/api/shots/${bare.id}`)).body.shot.missingConditions).toEqual(['tube vacuum', 'ambient pressure']);
  });

  it('When a campaign without a tube measures a shot above Mach 0.3, then it needs ambient temperature; its vacuum once any shot logs one', async () => {
    const labId = h.demo.labs.hollowmere.id;
    const campaign = await Campaign.create({ labId, name: 'Gas gun trial', startedOn: '2026-11-30', createdBy: null });
    const url = `/api/labs/${labId}/campaigns/${campaign.id}`;
    expect(keys((await get('experimenter', url)).body.campaign.neededConditions)).toEqual(['gateRigId', 'projectileId']);
    // 300 m/s (Mach 0.87), tube vacuum 2 kPa logged.
    await analysedShot(h, { campaignId: campaign.id, number: 1 });
    expect(keys((await get('experimenter', url)).body.campaign.neededConditions)).toEqual(['gateRigId', 'projectileId', 'tubePressurePa', 'ambientTemperatureK']);
    // A misread time base can give any speed: a flagged, unchecked result does not make the Mach number matter.
    const slow = await Campaign.create({ labId, name: 'Slow trial', startedOn: '2026-11-30', createdBy: null });
    await analysedShot(h, { campaignId: slow.id, number: 1, misreadInterval: 1e-12 });
    expect(keys((await get('experimenter', `/api/labs/${labId}/campaigns/${slow.id}`)).body.campaign.neededConditions)).not.toContain('ambientTemperatureK');
  });
});
