// The launcher model with losses fitted to a campaign, through the API: the trends answer, the inverse question, the
// JSON export and the campaign PDF report. The shots are made from the model itself with known friction (2.5 N) and
// leak area (1.2 mm²) plus seeded scatter of their stated u, so the fit must find those values within its stated
// uncertainty; how well the fit covers the truth over many campaigns is tested in
// tests/unit/physics/fit-launcher-losses.test.ts. The PDF is read with pdftotext (Debian poppler-utils) and its
// pages rendered with pdftoppm into .test-artifacts/campaign-report for a person to look at.
import { execFileSync } from 'node:child_process';
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createRandom } from '../../shared/analysis/create-random.ts';
import { simulateLauncherShot } from '../../shared/physics/simulate-launcher-shot.ts';
import { Analysis, AuditEvent, Campaign, Projectile, Shot } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { binaryBody } from '../helpers/binary-body.ts';

let h: ApiHarness;
let labId: string;
let campaignId: string;
let bareCampaignId: string;
const outDir = path.join(import.meta.dirname, '../../.test-artifacts/campaign-report');
const TRUE_FRICTION = 2.5;
const TRUE_LEAK = 1.2e-6;

beforeAll(async () => {
  h = await createApiHarness();
  await h.resetDatabase();
  rmSync(outDir, { recursive: true, force: true });
  mkdirSync(outDir, { recursive: true });
  labId = h.demo.labs.hollowmere.id;
  const ball = await Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true });
  const foam = await Projectile.findOne({ where: { labId, name: 'Foam sphere, 38 mm' }, rejectOnEmpty: true });
  campaignId = (await Campaign.create({ labId, name: 'Fit check', startedOn: '2026-11-02', tubeLengthM: 2, boreM: 0.0405, createdBy: null })).id;
  bareCampaignId = (await Campaign.create({ labId, name: 'No tube logged', startedOn: '2026-11-03', createdBy: null })).id;
  const random = createRandom(4242);
  const kPa = [14, 10, 7.5, 5.5, 4, 3, 2.2, 1.6, 1.2, 0.9];
  const addShot = async (campaign: string, number: number, tubePressurePa: number | null, projectileId: string, speed: number, u: number) => {
    const shot = await Shot.create({ labId, campaignId: campaign, number, firedAt: null, projectileId, gateRigId: null, tubePressurePa, sealType: 'Film', ambientTemperatureK: 293.15, ambientPressurePa: 100_800, createdBy: null });
    const a = await Analysis.create({
      labId, shotId: shot.id, version: 1, parameters: {}, engineVersion: 'fit-test', jobKey: `fit-${campaign}-${number}`, requestedBy: null, state: 'done',
      results: { speed: { value: speed, uncertainty: 2 * u, method: 'flight' } } as object,
    });
    await shot.update({ currentAnalysisId: a.id, status: 'analysed' });
  };
  for (const [i, p] of kPa.entries()) {
    const truth = simulateLauncherShot({ tubeLength: 2, boreDiameter: 0.0405, projectileDiameter: 0.040, mass: 0.0027, tubePressure: p * 1000, ambientPressure: 100_800, ambientTemperature: 293.15, frictionForce: TRUE_FRICTION, leakArea: TRUE_LEAK, steps: 1000 }).exitSpeed;
    await addShot(campaignId, i + 1, p * 1000, ball.id, truth + 0.3 * random.normal(), 0.3);
  }
  await addShot(campaignId, 11, null, ball.id, 200, 0.3); // no tube pressure logged
  await addShot(campaignId, 12, 2000, foam.id, 260, 0.3); // another projectile
  for (const [i, p] of [5, 3, 1].entries()) await addShot(bareCampaignId, i + 1, p * 1000, ball.id, 200 - 10 * p, 0.3);
});
afterAll(() => h?.close());

const as = (who: 'experimenter' | 'reviewer') => ({ Cookie: h.sessionCookie(h.demo.users[who].id) });
const trends = (id: string, query = '') => request(h.app).get(`/api/labs/${labId}/campaigns/${id}/trends${query}`).set(as('reviewer'));

describe('the launcher fit of a campaign', () => {
  it('When the trends are read, then the fit finds the known friction and leak within their uncertainty and says which shots it used', async () => {
    const res = await trends(campaignId);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const view = res.body.launcherFit;
    expect(view.status).toBe('fitted');
    expect(view.shotsUsed).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
    expect(view.leftOut).toEqual([{ number: 11, reason: 'no tube pressure logged' }, { number: 12, reason: 'a different projectile (Foam sphere, 38 mm)' }]);
    expect(view.launcher).toMatchObject({ tubeLengthM: 2, boreM: 0.0405, massKg: 0.0027, projectileDiameterM: 0.04, projectileName: 'Table-tennis ball, 40 mm' });
    const fit = view.fit;
    expect(Math.abs(fit.frictionForce.value - TRUE_FRICTION)).toBeLessThanOrEqual(2 * fit.frictionForce.standardUncertainty);
    expect(Math.abs(fit.leakArea.value - TRUE_LEAK)).toBeLessThanOrEqual(2 * fit.leakArea.standardUncertainty);
    expect(fit.dof).toBe(8);
    expect(fit.describesData).toBe(true);
    expect(fit.correlation).toBeGreaterThan(-1);
    expect(fit.correlation).toBeLessThan(1);
    // The curve: 36 points over the measured range, the band wider for a new shot than for the model, the zeroth order above.
    expect(view.curve).toHaveLength(36);
    for (const c of view.curve) {
      expect(c.predictionExpandedUncertainty).toBeGreaterThan(c.expandedUncertainty);
      expect(c.zerothOrder).toBeGreaterThan(c.speed);
    }
    expect(view.budget.tubePressure).toBe(900);
    expect(view.budget.efficiency.value).toBeGreaterThan(0);
    expect(view.budget.efficiency.value).toBeLessThan(1);
    expect(view.cautions.join(' ')).toMatch(/near or above the speed of sound are dangerous/);
    expect(view.cautions.join(' ')).toMatch(/not advice to raise pressure, speed or energy/);
  });

  it('When a target speed is asked, then the answer is the tube vacuum for it with its uncertainty; an unreachable one is said to be so', async () => {
    const res = await trends(campaignId, '?targetSpeedMs=200');
    const inverse = res.body.launcherFit.inverse;
    expect(inverse).toMatchObject({ reachable: true, targetSpeed: 200, outsideMeasured: false });
    expect(inverse.tubePressure).toBeGreaterThan(2000);
    expect(inverse.tubePressure).toBeLessThan(6000);
    expect(inverse.standardUncertainty).toBeGreaterThan(0);
    const tooFast = await trends(campaignId, '?targetSpeedMs=400');
    expect(tooFast.body.launcherFit.inverse).toMatchObject({ reachable: false, reason: 'above-hard-vacuum' });
    const bad = await trends(campaignId, '?targetSpeedMs=-5');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toContain('targetSpeedMs must be a positive number');
  });

  it('When the campaign has no launcher logged, then there is no fit and the reason says what to log', async () => {
    const res = await trends(bareCampaignId);
    expect(res.body.launcherFit).toMatchObject({ status: 'not-fitted', reason: 'The campaign has no launcher tube logged (length and bore).', fit: null });
    // The request may name the tube instead.
    const named = await trends(bareCampaignId, '?tubeLengthM=2&boreM=0.0405');
    expect(named.body.launcherFit.status).toBe('fitted');
  });

  it('When the campaign is exported as JSON, then the fit comes with the rows', async () => {
    const res = await request(h.app).get(`/api/labs/${labId}/campaigns/${campaignId}/export?format=json`).set(as('experimenter'));
    expect(res.status).toBe(200);
    const body = JSON.parse(res.text);
    expect(body.rows).toHaveLength(12);
    expect(body.launcherFit.status).toBe('fitted');
    expect(body.launcherFit.fit.frictionForce.value).toBeGreaterThan(0);
    expect(body.launcherFit.assumptions.length).toBeGreaterThan(3);
  });

  it('When the campaign report is printed, then the PDF has the shots, the fitted losses with U, χ²/ν, the energy breakdown, the assumptions and the cautions', async () => {
    const res = await request(h.app).get(`/api/labs/${labId}/campaigns/${campaignId}/report.pdf`).set(as('experimenter')).buffer(true).parse(binaryBody);
    expect(res.status, String(res.body)).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    expect(res.headers['content-disposition']).toBe('attachment; filename=fit-check-report.pdf');
    const file = path.join(outDir, 'fit-check.pdf');
    writeFileSync(file, res.body as Buffer);
    const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
    expect(text).toContain('Fit check');
    expect(text).toContain('Launcher model fitted to the shots');
    expect(text).toMatch(/Sliding friction \(± U, k = 2\)\s+\d+\.\d+ ± \d+\.\d+ N/);
    expect(text).toMatch(/Leak area past the ball \(± U, k = 2\)\s+\d+\.\d+ ± \d+\.\d+ mm²/);
    expect(text).toMatch(/chi²\/dof\s+\d+\.\d\d \(chi² = /);
    expect(text).toContain('The model describes these shots.');
    expect(text).toContain('Where the energy goes at 0.9 kPa');
    expect(text).toContain('What the model assumes');
    expect(text).toContain('speed of sound are dangerous');
    expect(text).toContain('rated backstop');
    execFileSync('pdftoppm', ['-png', '-r', '70', file, path.join(outDir, 'fit-check')]);
    expect(await AuditEvent.count({ where: { targetId: campaignId, action: 'campaign.report' } })).toBe(1);
  });
});
