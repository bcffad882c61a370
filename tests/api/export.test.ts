// Exports of a campaign and of one shot. The CSV is read back with csv-parse (a general-purpose RFC 4180 reader),
// so the structure is checked by something other than our writer. Escaping rule under test (OWASP "CSV
// Injection"): a TEXT cell that begins with =, +, -, @, tab or carriage return gets a leading single quote;
// NUMBERS are written as plain numbers and never prefixed, so −5 °C stays the number -5.
import { parse } from 'csv-parse/sync';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, AuditEvent, Campaign, Review, Shot } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { analysedShot, GATE_POSITIONS } from './review-fixtures.ts';

let h: ApiHarness;
let campaignId: string;
let first: Awaited<ReturnType<typeof analysedShot>>;

const HOSTILE = '=HYPERLINK("http://example.invalid","click")';

beforeAll(async () => {
  h = await createApiHarness();
  await h.resetDatabase();
  const labId = h.demo.labs.hollowmere.id;
  campaignId = (await Campaign.create({ labId, name: 'Export check, winter 2026', startedOn: '2026-12-01', createdBy: null })).id;
  first = await analysedShot(h, { campaignId, number: 1, sealType: HOSTILE, tubePressurePa: 2000 });
  // −5 °C (268.15 K): a negative number that must stay a number.
  await Shot.update({ ambientTemperatureK: 268.15, status: 'approved', approvedAnalysisId: first.analysisId }, { where: { id: first.shotId } });
  await Review.create({ labId, shotId: first.shotId, analysisId: first.analysisId, reviewerId: h.demo.users.reviewer.id, decision: 'approved' });
  // Shot 8: version 1 was approved, then version 2 became current: the approval does not cover version 2.
  const second = await analysedShot(h, { campaignId, number: 8, sealType: 'Mylar, 23 µm' });
  await Review.create({ labId, shotId: second.shotId, analysisId: second.analysisId, reviewerId: h.demo.users.reviewer.id, decision: 'approved' });
  const v1 = await Analysis.findByPk(second.analysisId, { rejectOnEmpty: true });
  const v2 = await Analysis.create({ labId, shotId: second.shotId, version: 2, parameters: v1.parameters, engineVersion: v1.engineVersion, jobKey: `export-v2-${second.shotId}`, requestedBy: null, state: 'done', results: v1.results, captureIds: v1.captureIds });
  await Shot.update({ currentAnalysisId: v2.id, approvedAnalysisId: v1.id, status: 'analysed' }, { where: { id: second.shotId } });
  const plain = (number: number, sealType: string) =>
    Shot.create({ labId, campaignId, number, firedAt: null, projectileId: null, gateRigId: null, tubePressurePa: null, sealType, ambientTemperatureK: null, ambientPressurePa: null, createdBy: null });
  await plain(2, '+cmd|calc');
  await plain(3, '-2+3');
  await plain(4, '@SUM(A1:A9)');
  await plain(5, '\tindented');
  await plain(6, '\rreturn');
  await plain(7, 'Mylar, 23 µm');
});
afterAll(() => h?.close());

const as = (who: 'admin' | 'experimenter' | 'analyst' | 'reviewer') => ({ Cookie: h.sessionCookie(h.demo.users[who].id) });
const rowsOf = (csv: string) => parse(csv, { bom: true, relax_column_count: false }) as string[][];

describe('campaign export', () => {
  it('When the campaign is exported as CSV, then there is one row per shot in lab units, formula-like text is quoted off and numbers stay numbers', async () => {
    // Full precision here, to compare with the stored result (rounding: tests/api/trends-vacuum-signed-off.test.ts).
    const res = await request(h.app).get(`/api/labs/${h.demo.labs.hollowmere.id}/campaigns/${campaignId}/export?format=csv&precision=full`).set(as('analyst'));
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(res.headers['content-disposition']).toBe('attachment; filename=export-check-winter-2026-shots.csv');
    expect(res.text.startsWith('\uFEFF')).toBe(true);
    const rows = rowsOf(res.text);
    expect(rows[0]).toEqual([
      'Shot', 'Fired at (UTC)', 'Tube pressure (kPa)', 'Seal', 'Ambient temperature (°C)', 'Ambient pressure (kPa)', 'Projectile',
      'Speed (m/s)', 'U (m/s)', 'k', 'Method', 'Mach', 'Status', 'Review decision (this version)', 'Analysis version', 'Time base', 'Signed off',
    ]);
    expect(rows.length).toBe(1 + 8);
    const r1 = rows[1];
    const speed = first.results.speed as { value: number; uncertainty: number };
    // 2000 Pa = 2 kPa; 268.15 K − 273.15 = −5 °C (SI Brochure, 0 °C = 273.15 K); 101 325 Pa = 101.325 kPa.
    expect(r1).toEqual([
      '1', '2026-10-14T09:30:00.000Z', '2', `'${HOSTILE}`, '-5', '101.325', 'Table-tennis ball, 40 mm',
      String(speed.value), String(speed.uncertainty), '2', 'flight (fit)', expect.stringMatching(/^0\.8\d+$/), 'Signed off', 'Signed off', '1', '', 'yes',
    ]);
    expect(rows.slice(2).map((r) => [r[0], r[3], r[7], r[12], r[13]])).toEqual([
      ['2', "'+cmd|calc", '', 'Awaiting files', ''],
      ['3', "'-2+3", '', 'Awaiting files', ''],
      ['4', "'@SUM(A1:A9)", '', 'Awaiting files', ''],
      ['5', "'\tindented", '', 'Awaiting files', ''],
      ['6', "'\rreturn", '', 'Awaiting files', ''],
      ['7', 'Mylar, 23 µm', '', 'Awaiting files', ''],
      ['8', 'Mylar, 23 µm', expect.stringMatching(/^\d+\.\d+$/), 'Analysed', ''],
    ]);
    // The statuses in the pages' words (the JSON export below keeps the API's values).
    expect(rows[8][14]).toBe('2');
    // On the wire: the negative number is bare (numeric in a spreadsheet); the hostile text is quoted and prefixed.
    const line1 = res.text.split('\r\n')[1];
    expect(line1).toContain(',-5,101.325,');
    expect(line1).toContain(`,"'=HYPERLINK(""http://example.invalid"",""click"")",`);
    expect(await AuditEvent.count({ where: { action: 'campaign.exported', targetId: campaignId } })).toBe(1);
  });

  it('When the campaign is exported as JSON, then the same rows come with keys named with their units', async () => {
    const res = await request(h.app).get(`/api/labs/${h.demo.labs.hollowmere.id}/campaigns/${campaignId}/export?format=json`).set(as('reviewer'));
    expect(res.status).toBe(200);
    expect(res.headers['content-disposition']).toBe('attachment; filename=export-check-winter-2026-shots.json');
    const body = JSON.parse(res.text);
    expect(body.campaign).toEqual({ id: campaignId, name: 'Export check, winter 2026' });
    expect(body.rows).toHaveLength(8);
    // JSON carries data, not spreadsheet cells: the text is not prefixed there.
    expect(body.rows[0]).toMatchObject({ number: 1, sealType: HOSTILE, ambientTemperatureC: -5, tubePressureKpa: 2, coverageFactor: 2, analysisVersion: 1, reviewDecision: 'approved' });
    expect(body.rows[7]).toMatchObject({ number: 8, status: 'analysed', reviewDecision: null, analysisVersion: 2 });
    expect((await request(h.app).get(`/api/labs/${h.demo.labs.hollowmere.id}/campaigns/${campaignId}/export?format=xlsx`).set(as('reviewer'))).status).toBe(400);
  });
});

describe('shot export', () => {
  it('When a shot is exported, then every gate has its two crossings and its pulse, and the speed lines follow', async () => {
    const res = await request(h.app).get(`/api/shots/${first.shotId}/export?format=csv`).set(as('experimenter'));
    expect(res.status).toBe(200);
    expect(res.headers['content-disposition']).toBe('attachment; filename=export-check-winter-2026-shot-1-v1.csv');
    const rows = rowsOf(res.text);
    expect(rows[0]).toEqual(['Record', 'Channel', 'Gate position (m)', 'Edge', 'Direction', 'Time (s)', 'Pulse width (s)', 'Speed (m/s)', 'U (m/s)', 'Note']);
    const body = rows.slice(1);
    const crossings = body.filter((r) => r[0] === 'crossing');
    expect(crossings.map((r) => [r[1], Number(r[2]), r[3], r[4]])).toEqual(GATE_POSITIONS.flatMap((p, i) => [
      [`Gate ${'ABC'[i]}`, p, 'leading', 'falling'],
      [`Gate ${'ABC'[i]}`, p, 'trailing', 'rising'],
    ]));
    // The model (shared/simulate) moves a 40 mm ball at 300 m/s: it blocks each beam for about (d + beam)/v =
    // 0.041 m / 300 m/s ≈ 137 µs, and reaches gates 0.15 m apart 500 µs apart.
    const pulses = body.filter((r) => r[0] === 'pulse');
    expect(pulses).toHaveLength(3);
    for (const p of pulses) expect(Number(p[6])).toBeGreaterThan(120e-6);
    for (const p of pulses) expect(Number(p[6])).toBeLessThan(145e-6);
    expect(Number(pulses[1][5]) - Number(pulses[0][5])).toBeCloseTo(0.15 / 300, 5);
    const speedLine = body.find((r) => r[0] === 'speed')!;
    expect(Math.abs(Number(speedLine[7]) - 300)).toBeLessThanOrEqual(Number(speedLine[8]));
    expect(body.filter((r) => r[0] === 'flight')).toHaveLength(3);

    const json = await request(h.app).get(`/api/shots/${first.shotId}/export?format=json`).set(as('experimenter'));
    expect(JSON.parse(json.text)).toMatchObject({ shot: { number: 1, campaign: 'Export check, winter 2026' }, analysisVersion: 1, rows: expect.any(Array) });
    expect(await AuditEvent.count({ where: { action: 'shot.exported', targetId: first.shotId } })).toBe(2);
  });

  it('When a shot without a finished analysis is exported, then the answer says there is nothing to export', async () => {
    const res = await request(h.app).get(`/api/shots/${h.demo.hollowmere.shotIds[0]}/export`).set(as('experimenter'));
    expect(res.status).toBe(409);
    expect(res.body.error.message).toBe('This shot has no finished analysis to export yet.');
  });
});
