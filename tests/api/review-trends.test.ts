// Campaign trends: the points and the per-group statistics, checked against a small example worked by hand.
// Sample standard deviation with n − 1 (NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.5.6); extreme spread
// = max − min (common practice in ballistics). The speeds are stored straight on finished analysis rows so the
// example is exact; how the engine finds a speed is tested elsewhere.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, Campaign, Projectile, Shot } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';

let h: ApiHarness;
let campaignId: string;
let ballId: string;
let slugId: string;

beforeAll(async () => {
  h = await createApiHarness();
  await h.resetDatabase();
  const labId = h.demo.labs.hollowmere.id;
  campaignId = (await Campaign.create({ labId, name: 'Trend check', startedOn: '2026-11-01', createdBy: null })).id;
  ballId = (await Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true })).id;
  slugId = (await Projectile.create({ labId, name: 'Trend slug', diameterM: 0.01, diameterToleranceM: 0, massKg: 0.002, massToleranceKg: 0 })).id;
  // number, seal, projectile, speed (m/s), U (m/s), analysis state
  const table: [number, string, string, number | null, 'done' | 'failed'][] = [
    [1, 'Mylar', ballId, 300, 'done'],
    [2, 'Mylar', ballId, 302, 'done'],
    [3, 'Mylar', slugId, 307, 'done'],
    [4, 'Paper', ballId, 310, 'done'],
    [5, 'Paper', slugId, null, 'done'], // analysed, but no speed measured (all gates missed)
    [6, 'Paper', ballId, 999, 'failed'], // a failed analysis is not a point
  ];
  for (const [number, sealType, projectileId, speed, state] of table) {
    const shot = await Shot.create({ labId, campaignId, number, firedAt: null, projectileId, gateRigId: null, tubePressurePa: 1000 * number, sealType, ambientTemperatureK: null, ambientPressurePa: null, createdBy: null });
    const a = await Analysis.create({
      labId, shotId: shot.id, version: 1, parameters: {}, engineVersion: 'trend-test', jobKey: `trend-${number}`, requestedBy: null, state,
      results: (speed == null ? { speed: null } : { speed: { value: speed, uncertainty: 1.5, method: 'flight' } }) as object,
    });
    await shot.update({ currentAnalysisId: a.id, status: state === 'done' ? 'analysed' : 'failed' });
  }
  // A shot never analysed is not a point either.
  await Shot.create({ labId, campaignId, number: 7, firedAt: null, projectileId: ballId, gateRigId: null, tubePressurePa: null, sealType: 'Mylar', ambientTemperatureK: null, ambientPressurePa: null, createdBy: null });
});
afterAll(() => h?.close());

const trends = (query: string) =>
  request(h.app).get(`/api/labs/${h.demo.labs.hollowmere.id}/campaigns/${campaignId}/trends${query}`).set({ Cookie: h.sessionCookie(h.demo.users.experimenter.id) });

describe('campaign trends', () => {
  it('When grouped by seal, then each group has the count, mean, sample standard deviation and extreme spread worked by hand', async () => {
    const res = await trends('?groupBy=seal');
    expect(res.status).toBe(200);
    expect(res.body.points.map((p: { number: number; speed: number | null }) => [p.number, p.speed])).toEqual([[1, 300], [2, 302], [3, 307], [4, 310], [5, null]]);
    expect(res.body.points[0]).toMatchObject({ tubePressurePa: 1000, sealType: 'Mylar', projectileId: ballId, projectileName: 'Table-tennis ball, 40 mm', uncertainty: 1.5, method: 'flight', status: 'analysed', analysisVersion: 1 });
    const bySeal = Object.fromEntries(res.body.groups.map((g: { key: string }) => [g.key, g]));
    // Mylar: 300, 302, 307 → mean 303; deviations −3, −1, +4; Σd² = 26; s = √(26/2) = √13 = 3.605551275…; ES = 7.
    expect(bySeal.Mylar).toMatchObject({ label: 'Mylar', count: 3, mean: 303, extremeSpread: 7 });
    expect(bySeal.Mylar.standardDeviation).toBeCloseTo(3.605551275463989, 12);
    // Paper: one speed (310; shot 5 has none): no standard deviation from one value, spread 0.
    expect(bySeal.Paper).toEqual({ key: 'Paper', label: 'Paper', count: 1, mean: 310, standardDeviation: null, standardError: null, extremeSpread: 0 });
  });

  it('When grouped by projectile or not at all, then the groups follow', async () => {
    const byProjectile = (await trends('?groupBy=projectile')).body.groups;
    // Ball: 300, 302, 310 → mean 304; d = −4, −2, 6; Σd² = 56; s = √28 = 5.291502622…; ES 10. Slug: 307 only.
    const ball = byProjectile.find((g: { key: string }) => g.key === ballId);
    expect(ball).toMatchObject({ label: 'Table-tennis ball, 40 mm', count: 3, mean: 304, extremeSpread: 10 });
    expect(ball.standardDeviation).toBeCloseTo(5.291502622129181, 12);
    expect(byProjectile.find((g: { key: string }) => g.key === slugId)).toMatchObject({ count: 1, mean: 307, standardDeviation: null });
    const all = await trends('?tubeLengthM=2.5&boreM=0.041&massKg=0.0027');
    // All four: 300, 302, 307, 310 → mean 304.75; Σd² = 22.5625 + 7.5625 + 5.0625 + 27.5625 = 62.75; s = √(62.75/3).
    expect(all.body.groupBy).toBe('none');
    expect(all.body.groups).toHaveLength(1);
    expect(all.body.groups[0]).toMatchObject({ key: 'all', count: 4, mean: 304.75, extremeSpread: 10 });
    expect(all.body.groups[0].standardDeviation).toBeCloseTo(Math.sqrt(62.75 / 3), 12);
    expect(all.body.launcher).toEqual({ tubeLengthM: 2.5, boreM: 0.041, massKg: 0.0027 });
  });

  it('When the query is wrong, then the answer names the parameter', async () => {
    const bad = await trends('?groupBy=colour');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toContain('groupBy must be seal, projectile, vacuum or none');
    const negative = await trends('?tubeLengthM=-1');
    expect(negative.status).toBe(400);
    expect(negative.body.error.message).toContain('tubeLengthM must be a positive number');
  });
});
