// GET /api/labs/:labId/shots: filtered, searched, sorted and paginated in the database, each shot with the speed,
// expanded uncertainty and method of its current analysis and its latest review decision. Each test makes its own
// campaign of shots with known values, so the expected order is written out by hand from those inputs.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, Campaign, Review, Shot, type ShotStatus } from '../../server/db/models/index.ts';
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

interface ShotSpec {
  number: number;
  pressurePa?: number | null;
  firedAt?: string | null;
  seal?: string;
  notes?: string;
  status?: ShotStatus;
  /** Speed of the current analysis; `undefined` = no analysis. */
  speed?: { value: unknown; uncertainty?: number; method?: string; basis?: string } | null;
  reviews?: ('approved' | 'returned')[];
}

/** A new campaign with these shots, created in this order (one after another, so created_at increases). */
async function campaignWith(specs: ShotSpec[]): Promise<{ campaignId: string; ids: Record<number, string> }> {
  const campaign = await Campaign.create({ labId: lab(), name: unique('List campaign'), startedOn: null, createdBy: null });
  const ids: Record<number, string> = {};
  for (const s of specs) {
    const shot = await Shot.create({
      labId: lab(), campaignId: campaign.id, number: s.number, firedAt: s.firedAt ? new Date(s.firedAt) : null,
      projectileId: null, gateRigId: null, tubePressurePa: s.pressurePa ?? null, sealType: s.seal ?? '', notes: s.notes ?? '',
      ambientTemperatureK: null, ambientPressurePa: null, createdBy: null, status: s.status ?? 'draft',
    });
    ids[s.number] = shot.id;
    if (s.speed !== undefined) {
      const analysis = await Analysis.create({
        labId: lab(), shotId: shot.id, version: 1, parameters: {}, engineVersion: 'test', jobKey: unique('job'), requestedBy: null,
        state: 'done', results: { speed: s.speed, warnings: [] } as object,
      });
      await shot.update({ currentAnalysisId: analysis.id });
      for (const [i, decision] of (s.reviews ?? []).entries()) {
        await Review.create({
          labId: lab(), shotId: shot.id, analysisId: analysis.id, reviewerId: demo.users.reviewer.id, decision,
          comment: decision === 'returned' ? `Check gate C (${i})` : '',
        });
      }
    }
  }
  return { campaignId: campaign.id, ids };
}

async function list(query: Record<string, string | number>, who: 'experimenter' | 'reviewer' = 'experimenter') {
  const res = await request(h.app).get(`/api/labs/${lab()}/shots`).query(query).set({ Cookie: h.sessionCookie(demo.users[who].id) });
  return res;
}
const numbers = (body: { shots: { number: number }[] }) => body.shots.map((s) => s.number);

describe('shot list', () => {
  it('When no sort is given, then the newest shots come first as before, with total, limit and offset', async () => {
    const { campaignId } = await campaignWith([{ number: 1 }, { number: 2 }, { number: 3 }]);
    const res = await list({ campaignId });
    expect(res.status).toBe(200);
    expect(numbers(res.body)).toEqual([3, 2, 1]);
    expect(res.body).toMatchObject({ total: 3, limit: 50, offset: 0 });
  });

  it('When the current analysis has a speed, then the row carries value, expanded uncertainty and method; otherwise speed is null', async () => {
    const { campaignId } = await campaignWith([
      { number: 1, speed: { value: 412.3712938, uncertainty: 0.4213, method: 'flight', basis: 'fit' } },
      { number: 2, speed: null },
      { number: 3 },
      { number: 4, speed: { value: 'not a number' } },
    ]);
    const res = await list({ campaignId, sort: 'number' });
    expect(res.body.shots.map((s: { speed: unknown }) => s.speed)).toEqual([
      { value: 412.3712938, uncertainty: 0.4213, method: 'flight', basis: 'fit' },
      null,
      null,
      null,
    ]);
  });

  it('When reviews exist, then the latest decision is shown, and shots without one show null', async () => {
    const { campaignId } = await campaignWith([
      { number: 1, speed: { value: 300, uncertainty: 2 }, reviews: ['returned', 'approved'] },
      { number: 2, speed: { value: 310, uncertainty: 2 }, reviews: ['returned'] },
      { number: 3, speed: { value: 320, uncertainty: 2 } },
    ]);
    const res = await list({ campaignId, sort: 'number:asc' });
    expect(res.body.shots.map((s: { review: { decision: string } | null }) => s.review?.decision ?? null)).toEqual(['approved', 'returned', null]);
    expect(res.body.shots[0].review.decidedAt).toEqual(expect.any(String));
  });

  it('When sorted by speed, then faster or slower shots come first and shots without a speed stay last either way', async () => {
    const { campaignId } = await campaignWith([
      { number: 1, speed: { value: 250, uncertainty: 1 } },
      { number: 2 },
      { number: 3, speed: { value: 410, uncertainty: 1 } },
      { number: 4, speed: { value: 330, uncertainty: 1 } },
    ]);
    expect(numbers((await list({ campaignId, sort: 'speed:asc' })).body)).toEqual([1, 4, 3, 2]);
    expect(numbers((await list({ campaignId, sort: 'speed:desc' })).body)).toEqual([3, 4, 1, 2]);
  });

  it('When sorted by tube pressure or fired time, then the order follows the values, empty ones last', async () => {
    const { campaignId } = await campaignWith([
      { number: 1, pressurePa: 12_000, firedAt: '2026-10-12T09:15:00Z' },
      { number: 2, pressurePa: 1_100, firedAt: '2026-10-12T11:15:00Z' },
      { number: 3, pressurePa: null, firedAt: null },
      { number: 4, pressurePa: 4_200, firedAt: '2026-10-11T15:00:00Z' },
    ]);
    expect(numbers((await list({ campaignId, sort: 'tubePressure' })).body)).toEqual([2, 4, 1, 3]);
    expect(numbers((await list({ campaignId, sort: 'tubePressure:desc' })).body)).toEqual([1, 4, 2, 3]);
    expect(numbers((await list({ campaignId, sort: 'firedAt:desc' })).body)).toEqual([2, 1, 4, 3]);
  });

  it('When sorted by status, then shots follow the workflow (awaiting files … signed off), ties by shot number', async () => {
    const { campaignId } = await campaignWith([
      { number: 1, status: 'approved' },
      { number: 2, status: 'draft' },
      { number: 3, status: 'in_review' },
      { number: 4, status: 'analysed' },
      { number: 5, status: 'draft' },
    ]);
    expect(numbers((await list({ campaignId, sort: 'status' })).body)).toEqual([2, 5, 4, 3, 1]);
  });

  it('When searching, then words in notes or seal type match in any case, and % or _ are taken literally', async () => {
    const { campaignId } = await campaignWith([
      { number: 1, seal: 'Polyester film, 50 µm', notes: '' },
      { number: 2, seal: 'Aluminium foil', notes: 'Gate C alignment checked' },
      { number: 3, seal: 'Aluminium foil', notes: 'Pump at 100% for ten minutes' },
      { number: 4, seal: 'Paper', notes: 'gate_b cable swapped' },
    ]);
    expect(numbers((await list({ campaignId, q: 'POLYESTER', sort: 'number' })).body)).toEqual([1]);
    expect(numbers((await list({ campaignId, q: 'gate', sort: 'number' })).body)).toEqual([2, 4]);
    expect(numbers((await list({ campaignId, q: 'aluminium', sort: 'number' })).body)).toEqual([2, 3]);
    expect(numbers((await list({ campaignId, q: '100%', sort: 'number' })).body)).toEqual([3]);
    // "_" would match any one character if not escaped: "gate c" has a space where "gate_b" has "_".
    expect(numbers((await list({ campaignId, q: 'gate_', sort: 'number' })).body)).toEqual([4]);
    expect((await list({ campaignId, q: 'nothing like this' })).body).toMatchObject({ shots: [], total: 0 });
  });

  it('When filtering by status and paginating, then total counts every match and each page holds its slice', async () => {
    const specs: ShotSpec[] = [];
    for (let n = 1; n <= 7; n++) specs.push({ number: n, status: n % 2 === 0 ? 'analysed' : 'draft' });
    const { campaignId } = await campaignWith(specs);
    const page1 = await list({ campaignId, status: 'draft', sort: 'number', limit: 3, offset: 0 });
    const page2 = await list({ campaignId, status: 'draft', sort: 'number', limit: 3, offset: 3 });
    expect(numbers(page1.body)).toEqual([1, 3, 5]);
    expect(numbers(page2.body)).toEqual([7]);
    expect(page2.body).toMatchObject({ total: 4, limit: 3, offset: 3 });
    const two = await list({ campaignId, status: 'analysed,draft', sort: 'number:desc', limit: 2 });
    expect(numbers(two.body)).toEqual([7, 6]);
    expect(two.body.total).toBe(7);
  });

  it('When the sort is not one the list knows, then the answer is 400 listing the choices', async () => {
    const res = await list({ sort: 'mass' });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toContain('sort must be one of number, firedAt, tubePressure, speed, status');
  });

  it("When another lab's campaign id is given, then none of its shots are listed", async () => {
    await Shot.create({
      labId: demo.labs.sandgate.id, campaignId: demo.sandgate.campaignIds[0], number: 900 + serial++, firedAt: null, projectileId: null,
      gateRigId: null, tubePressurePa: null, ambientTemperatureK: null, ambientPressurePa: null, createdBy: null,
    });
    const res = await list({ campaignId: demo.sandgate.campaignIds[0] });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ shots: [], total: 0 });
  });
});
