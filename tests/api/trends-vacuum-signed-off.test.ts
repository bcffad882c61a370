// Campaign trends and exports, issue 11: statistics per tube-vacuum bin, the signed-off filter and mark, and the CSV
// rounded to each value's uncertainty. Reference values of the statistics were computed with NumPy 1.24.2 (Debian's
// python3-numpy) on the same speeds: mean = np.mean, SD = np.std(a, ddof=1) (sample, n − 1), SE = SD/np.sqrt(n),
// spread = max − min; the figures are pasted here, not derived from the server's code. Speeds are stored straight
// on finished analysis rows so the example is exact; how the engine finds a speed is tested elsewhere.
import { parse } from 'csv-parse/sync';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, Campaign, Review, Shot } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';

let h: ApiHarness;
let labId: string;
let campaignId: string;

// number, tube pressure (kPa; null: not logged), speed (m/s), U (m/s), signed off
const TABLE: [number, number | null, number, number, boolean][] = [
  [1, 1.1, 238.05, 1.5678, false],
  [2, 1.5, 230.18, 1.2, true],
  [3, 2.1, 218.95, 1.1, false],
  [4, 3.0, 203.68, 0.0996, true],
  [5, 4.2, 185.94, 1.0, false],
  [6, 6.0, 162.67, 0.9, true],
  [7, 8.5, 133.19, 0.8, false],
  [8, 12.0, 95.57, 0.7, false],
  [9, 12.0, 96.31, 0.7, false],
  [10, null, 250.0, 1.3, false],
];

beforeAll(async () => {
  h = await createApiHarness();
  await h.resetDatabase();
  labId = h.demo.labs.hollowmere.id;
  campaignId = (await Campaign.create({ labId, name: 'Vacuum bins check', startedOn: '2026-11-01', createdBy: null })).id;
  for (const [number, kpa, speed, u, signedOff] of TABLE) {
    const shot = await Shot.create({ labId, campaignId, number, firedAt: null, projectileId: null, gateRigId: null, tubePressurePa: kpa == null ? null : kpa * 1000, sealType: 'Polyester film, 50 µm', ambientTemperatureK: null, ambientPressurePa: null, createdBy: null });
    const a = await Analysis.create({
      labId, shotId: shot.id, version: 1, parameters: {}, engineVersion: 'bins-test', jobKey: `bins-${number}`, requestedBy: null, state: 'done',
      results: { speed: { value: speed, uncertainty: u, method: 'flight', basis: 'fit', coverage: 2 } } as object,
    });
    await shot.update({ currentAnalysisId: a.id, status: signedOff ? 'approved' : 'analysed', ...(signedOff ? { approvedAnalysisId: a.id } : {}) });
    if (signedOff) await Review.create({ labId, shotId: shot.id, analysisId: a.id, reviewerId: h.demo.users.reviewer.id, decision: 'approved' });
  }
});
afterAll(() => h?.close());

const cookie = () => ({ Cookie: h.sessionCookie(h.demo.users.experimenter.id) });
const trends = (query: string) => request(h.app).get(`/api/labs/${labId}/campaigns/${campaignId}/trends${query}`).set(cookie());
const exported = (query: string) => request(h.app).get(`/api/labs/${labId}/campaigns/${campaignId}/export${query}`).set(cookie());
type Group = { key: string; label: string; count: number; mean: number | null; standardDeviation: number | null; standardError: number | null; extremeSpread: number | null; range?: unknown };
const byLabel = (groups: Group[]) => Object.fromEntries(groups.map((g) => [g.label, g]));

function expectStats(g: Group, count: number, mean: number, sd: number, se: number, spread: number) {
  expect(g.count).toBe(count);
  expect(g.mean).toBeCloseTo(mean, 9);
  expect(g.standardDeviation).toBeCloseTo(sd, 9);
  expect(g.standardError).toBeCloseTo(se, 9);
  expect(g.extremeSpread).toBeCloseTo(spread, 9);
}

describe('statistics per tube-vacuum bin', () => {
  it('When grouped by vacuum with no edges, then there is one bin per decade of pressure, best vacuum first, with NumPy\'s mean, SD, SE and n', async () => {
    const res = await trends('?groupBy=vacuum');
    expect(res.status).toBe(200);
    expect(res.body.groups.map((g: Group) => g.label)).toEqual(['1 – 10 kPa', '10 – 100 kPa', '(no tube pressure logged)']);
    const g = byLabel(res.body.groups);
    // NumPy: [238.05, 230.18, 218.95, 203.68, 185.94, 162.67, 133.19]
    expectStats(g['1 – 10 kPa'], 7, 196.09428571428575, 38.03350753267566, 14.375314631280228, 104.86);
    expect(g['1 – 10 kPa'].range).toEqual({ lowPa: 1000, highPa: 10000 });
    // NumPy: [95.57, 96.31]
    expectStats(g['10 – 100 kPa'], 2, 95.94, 0.5232590180780515, 0.37, 0.74);
    expect(g['(no tube pressure logged)']).toMatchObject({ count: 1, mean: 250, standardDeviation: null, standardError: null, range: null });
    // Each point says which group it is in.
    expect(res.body.points.map((p: { number: number; group: string }) => [p.number, p.group])).toEqual([
      [1, 'decade:3'], [2, 'decade:3'], [3, 'decade:3'], [4, 'decade:3'], [5, 'decade:3'], [6, 'decade:3'], [7, 'decade:3'], [8, 'decade:4'], [9, 'decade:4'], [10, 'no-pressure'],
    ]);
  });

  it('When grouped by vacuum between chosen edges (Pa), then the bins follow the edges, with open bins outside them', async () => {
    const res = await trends('?groupBy=vacuum&vacuumEdgesPa=1000,2000,5000,10000');
    expect(res.status).toBe(200);
    expect(res.body.vacuumEdgesPa).toEqual([1000, 2000, 5000, 10000]);
    expect(res.body.groups.map((g: Group) => g.label)).toEqual(['1 – 2 kPa', '2 – 5 kPa', '5 – 10 kPa', '10 kPa and above', '(no tube pressure logged)']);
    const g = byLabel(res.body.groups);
    expectStats(g['1 – 2 kPa'], 2, 234.115, 5.564930367938132, 3.935000000000002, 7.87); // NumPy: [238.05, 230.18]
    expectStats(g['2 – 5 kPa'], 3, 202.85666666666665, 16.520394466638294, 9.538054192432423, 33.01); // [218.95, 203.68, 185.94]
    expectStats(g['5 – 10 kPa'], 2, 147.93, 20.845507909379414, 14.739999999999995, 29.48); // [162.67, 133.19]
    expectStats(g['10 kPa and above'], 2, 95.94, 0.5232590180780515, 0.37, 0.74); // [95.57, 96.31]
  });

  it('When the edges are not increasing positive pascals, then the answer names the edge and the reason', async () => {
    const down = await trends('?groupBy=vacuum&vacuumEdgesPa=1000,500');
    expect(down.status).toBe(400);
    expect(down.body.error.message).toContain('vacuumEdgesPa: edge 2 (500 Pa) must be greater than the one before (1000 Pa)');
    const text = await trends('?groupBy=vacuum&vacuumEdgesPa=1000,lots');
    expect(text.status).toBe(400);
    expect(text.body.error.message).toContain('vacuumEdgesPa: edge 2 ("lots") is not a positive number of pascals');
  });
});

describe('signed-off shots', () => {
  it('When trends are asked for with no filter, then every shot is listed and the signed-off ones are marked (the default as before)', async () => {
    const res = await trends('?groupBy=none');
    expect(res.body.shots).toBe('all');
    expect(res.body.points).toHaveLength(10);
    expect(res.body.points.filter((p: { signedOff: boolean }) => p.signedOff).map((p: { number: number }) => p.number)).toEqual([2, 4, 6]);
  });

  it('When trends are limited to signed-off shots, then only those are listed and counted', async () => {
    const res = await trends('?groupBy=none&shots=signed-off');
    expect(res.status).toBe(200);
    expect(res.body.points.map((p: { number: number }) => p.number)).toEqual([2, 4, 6]);
    // NumPy: [230.18, 203.68, 162.67]
    expectStats(res.body.groups[0], 3, 198.84333333333333, 34.01389470985841, 19.637931266924344, 67.51);
    const bad = await trends('?shots=approved-ish');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toContain('shots must be all or signed-off');
  });

  it('When the campaign is exported signed-off only, then the CSV and the JSON hold only those shots, with a Signed off column', async () => {
    const csv = await exported('?format=csv&shots=signed-off');
    expect(csv.status).toBe(200);
    expect(csv.headers['content-disposition']).toBe('attachment; filename=vacuum-bins-check-shots-signed-off.csv');
    const rows = parse(csv.text, { bom: true }) as string[][];
    const col = rows[0].indexOf('Signed off');
    expect(col).toBeGreaterThan(0);
    expect(rows.slice(1).map((r) => [r[0], r[col]])).toEqual([['2', 'yes'], ['4', 'yes'], ['6', 'yes']]);
    const all = parse((await exported('?format=csv')).text, { bom: true }) as string[][];
    expect(all.slice(1).map((r) => r[col])).toEqual(['no', 'yes', 'no', 'yes', 'no', 'yes', 'no', 'no', 'no', 'no']);
    const json = await exported('?format=json&shots=signed-off');
    expect(JSON.parse(json.text).rows.map((r: { number: number; signedOff: string }) => [r.number, r.signedOff])).toEqual([[2, 'yes'], [4, 'yes'], [6, 'yes']]);
  });
});

describe('CSV precision', () => {
  it('When the campaign CSV is exported, then each speed is rounded to its U by default (JCGM 100:2008 §7.2.6) and given in full on request', async () => {
    const rounded = parse((await exported('?format=csv')).text, { bom: true }) as string[][];
    const [speedCol, uCol] = [rounded[0].indexOf('Speed (m/s)'), rounded[0].indexOf('U (m/s)')];
    // Worked by hand: U = 1.5678 → 1.6 (two significant digits), so 238.05 → 238.1 (to 0.1; half away from zero);
    // U = 0.0996 → 0.10 (rounding up adds a digit: two significant digits are 0.10), so 203.68 → 203.68;
    // U = 1.2 → 1.2, 230.18 → 230.2; U = 1.1, 218.95 → 219.0 (the decimal 218.95 rounds half away from zero, and
    // the trailing zero stays: it is a known digit); U = 1.0 → 1.0, 185.94 → 185.9.
    expect(rounded.slice(1, 6).map((r) => [r[speedCol], r[uCol]])).toEqual([
      ['238.1', '1.6'], ['230.2', '1.2'], ['219.0', '1.1'], ['203.68', '0.10'], ['185.9', '1.0'],
    ]);
    const full = parse((await exported('?format=csv&precision=full')).text, { bom: true }) as string[][];
    expect(full.slice(1, 6).map((r) => [r[speedCol], r[uCol]])).toEqual([
      ['238.05', '1.5678'], ['230.18', '1.2'], ['218.95', '1.1'], ['203.68', '0.0996'], ['185.94', '1'],
    ]);
    // JSON is always full precision.
    const json = JSON.parse((await exported('?format=json')).text);
    expect(json.rows[0]).toMatchObject({ speedMps: 238.05, uncertaintyMps: 1.5678 });
    const bad = await exported('?format=csv&precision=some');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toContain('precision must be rounded or full');
  });
});

describe('the OpenAPI document', () => {
  it('When scripts read the OpenAPI document, then the new query parameters are listed with what they do and their defaults', async () => {
    const doc = (await request(h.app).get('/api/openapi.json')).body as { paths: Record<string, Record<string, { parameters: { name: string; schema: { default?: unknown; description?: string; enum?: string[] } }[] }>> };
    const params = (path: string) => Object.fromEntries(doc.paths[path].get.parameters.map((p) => [p.name, p.schema]));
    const trendsParams = params('/api/labs/{labId}/campaigns/{campaignId}/trends');
    expect(trendsParams.shots).toMatchObject({ enum: ['all', 'signed-off'], default: 'all' });
    expect(trendsParams.shots.description).toContain('signed-off: only shots whose current analysis version a reviewer signed off');
    expect(trendsParams.groupBy.enum).toEqual(['seal', 'projectile', 'vacuum', 'none']);
    expect(trendsParams.vacuumEdgesPa.description).toContain('bin edges of tube pressure in Pa');
    const exportParams = params('/api/labs/{labId}/campaigns/{campaignId}/export');
    expect(exportParams.precision).toMatchObject({ enum: ['rounded', 'full'], default: 'rounded' });
    expect(exportParams.precision.description).toContain('JCGM 100:2008 §7.2.6');
    expect(exportParams.shots).toMatchObject({ default: 'all' });
  });
});

