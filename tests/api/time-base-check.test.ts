// "Check the time base" through the API (in-process, real PostgreSQL): a version whose time base was misread is
// flagged in its results, review cannot approve it (409 with the reasons) until an analyst confirms the read (an
// audited "I checked the time base" on that version) or a new version fixes it.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { Analysis, AuditEvent, Campaign, Shot } from '../../server/db/models/index.ts';
import { ENGINE_VERSION } from '../../shared/analysis/engine-version.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { analysedShot } from './review-fixtures.ts';

let h: ApiHarness;

beforeAll(async () => {
  h = await createApiHarness();
  await h.resetDatabase();
});
afterAll(() => h?.close());

type Who = 'admin' | 'experimenter' | 'analyst' | 'reviewer';
const as = (who: Who) => ({ Cookie: h.sessionCookie(h.demo.users[who].id) });
const post = (who: Who, url: string, body: object = {}) => request(h.app).post(url).set(as(who)).send(body);
const get = (who: Who, url: string) => request(h.app).get(url).set(as(who));

/** A shot whose time base the reader took as 1 s per sample instead of 200 ns, sent for review. */
async function misreadShotInReview() {
  const shot = await analysedShot(h, { misreadInterval: 1 });
  expect((await post('experimenter', `/api/shots/${shot.shotId}/review-requests`)).status).toBe(201);
  return shot;
}

describe('check the time base', () => {
  it('When the time base was misread, then the version is flagged with its reasons and review cannot approve it (409, clear message)', async () => {
    const shot = await misreadShotInReview();
    const detail = await get('reviewer', `/api/shots/${shot.shotId}`);
    expect(detail.status).toBe(200);
    const current = detail.body.currentAnalysis;
    // 300 m/s over 0.15 m read with durations 5·10⁶ times too long (1 s for 200 ns): 6·10⁻⁵ m/s.
    expect(current.results.speed.value).toBeCloseTo(300 / 5e6, 8);
    expect(current.timeBaseCheck).toMatchObject({ flagged: true, confirmation: null, blocksApproval: true });
    expect(current.timeBaseCheck.reasons.map((r: { code: string }) => r.code)).toEqual(['speed-range', 'coarse-sampling', 'time-base-assumed']);
    expect(current.results.assumptions).toMatchObject({ positionTolerance: 0.0005, timebaseAccuracyPpm: 50, sampleInterval: 1, timeBase: { assumed: true } });

    const queue = await get('reviewer', `/api/labs/${h.demo.labs.hollowmere.id}/review-queue`);
    expect(queue.body.shots.find((s: { shotId: string }) => s.shotId === shot.shotId).timeBaseCheck).toEqual({ flagged: true, blocksApproval: true });

    const refused = await post('reviewer', `/api/shots/${shot.shotId}/reviews`, { decision: 'approved' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('time_base_unchecked');
    expect(refused.body.error.message).toMatch(/^Version 1 is marked "check the time base", so it cannot be signed off yet: the speed of 0\.00006 m\/s .* is outside 0\.1–10\u00a0000 m\/s/);
    expect(refused.body.error.message).toMatch(/An analyst must confirm the read \("I checked the time base"\) or fix it in a new version first\.$/);
    expect(refused.body.error.details.reasons).toHaveLength(3);
    expect((await Shot.findByPk(shot.shotId))!.status).toBe('in_review');
    // Returning it is still allowed: that is how a reviewer asks for the fix.
    expect((await post('reviewer', `/api/shots/${shot.shotId}/reviews`, { decision: 'returned', comment: 'the time base reads 1 s per sample' })).status).toBe(201);
  });

  it('When an analyst confirms the read, then it is audited once, shown with name and note, and review can approve', async () => {
    const shot = await misreadShotInReview();
    const url = `/api/shots/${shot.shotId}/analyses/${shot.analysisId}/time-base-confirmation`;
    expect((await post('reviewer', url, { note: 'looks fine' })).status).toBe(403);
    expect((await post('experimenter', url, { note: 'looks fine' })).status).toBe(403);
    const empty = await post('analyst', url, { note: '  ' });
    expect(empty.status).toBe(400);
    expect(empty.body.error.message).toContain('say what you checked');

    const ok = await post('analyst', url, { note: 'The scope screen says 1 s/div slow roll; the interval is right.' });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    expect(ok.body).toMatchObject({
      analysisId: shot.analysisId, version: 1,
      timeBaseCheck: {
        flagged: true, blocksApproval: false,
        confirmation: { by: { id: h.demo.users.analyst.id, name: expect.any(String) }, note: 'The scope screen says 1 s/div slow roll; the interval is right.' },
      },
    });
    const events = await AuditEvent.findAll({ where: { targetId: shot.shotId, action: 'analysis.time_base_confirmed' } });
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({ actorId: h.demo.users.analyst.id, details: { analysisId: shot.analysisId, version: 1, note: expect.stringContaining('slow roll') } });

    const twice = await post('admin', url, { note: 'again' });
    expect(twice.status).toBe(409);
    expect(twice.body.error.message).toMatch(/^The time base of version 1 was already confirmed by .+ on \d{4}-\d{2}-\d{2}\.$/);

    const detail = await get('reviewer', `/api/shots/${shot.shotId}`);
    expect(detail.body.currentAnalysis.timeBaseCheck).toMatchObject({ flagged: true, blocksApproval: false, confirmation: { note: expect.stringContaining('slow roll') } });
    const approved = await post('reviewer', `/api/shots/${shot.shotId}/reviews`, { decision: 'approved' });
    expect(approved.status, JSON.stringify(approved.body)).toBe(201);
    expect(approved.body.shot.status).toBe('approved');
  });

  it('When a new version fixes the read, then that version is not flagged and review can approve it', async () => {
    const shot = await misreadShotInReview();
    const flagged = await Analysis.findByPk(shot.analysisId, { rejectOnEmpty: true });
    // The fix: version 2 read with the right interval (made here as the worker would store it).
    const right = await analysedShot(h);
    const fixedResults = (await Analysis.findByPk(right.analysisId, { rejectOnEmpty: true })).results;
    const v2 = await Analysis.create({
      labId: flagged.labId, shotId: shot.shotId, version: 2, parameters: flagged.parameters, engineVersion: ENGINE_VERSION,
      jobKey: `fix-${shot.shotId}`, requestedBy: h.demo.users.analyst.id, state: 'done', results: fixedResults, captureIds: flagged.captureIds, completedAt: new Date(),
    });
    await Shot.update({ currentAnalysisId: v2.id, status: 'analysed', reviewAnalysisId: null }, { where: { id: shot.shotId } });
    expect((await get('reviewer', `/api/shots/${shot.shotId}/analyses/${v2.id}`)).body.analysis.timeBaseCheck).toEqual({ flagged: false, reasons: [], confirmation: null, blocksApproval: false });
    const notFlagged = await post('analyst', `/api/shots/${shot.shotId}/analyses/${v2.id}/time-base-confirmation`, { note: 'checked' });
    expect(notFlagged.status).toBe(409);
    expect(notFlagged.body.error.message).toBe('Version 2 is not marked "check the time base"; there is nothing to confirm.');
    expect((await post('experimenter', `/api/shots/${shot.shotId}/review-requests`)).status).toBe(201);
    expect((await post('reviewer', `/api/shots/${shot.shotId}/reviews`, { decision: 'approved' })).status).toBe(201);
  });

  it('When a stored result predates the flag (engine before 1.3.0), then it is not flagged and approval works as before', async () => {
    const shot = await analysedShot(h);
    const a = await Analysis.findByPk(shot.analysisId, { rejectOnEmpty: true });
    const { timeBaseCheck: _dropped, assumptions: _too, ...old } = a.results as Record<string, unknown>;
    await a.update({ results: old, engineVersion: '1.2.0' });
    expect((await get('analyst', `/api/shots/${shot.shotId}`)).body.currentAnalysis.timeBaseCheck).toMatchObject({ flagged: false, blocksApproval: false });
    expect((await post('experimenter', `/api/shots/${shot.shotId}/review-requests`)).status).toBe(201);
    expect((await post('reviewer', `/api/shots/${shot.shotId}/reviews`, { decision: 'approved' })).status).toBe(201);
  });

  it('When a flagged version is exported and trended, then it says "unchecked" and the statistics leave it out until it is confirmed', async () => {
    const labId = h.demo.labs.hollowmere.id;
    const campaign = await Campaign.create({ labId, name: 'Time-base check', startedOn: '2026-11-20', createdBy: null });
    const good = await analysedShot(h, { campaignId: campaign.id, number: 1 });
    const bad = await analysedShot(h, { campaignId: campaign.id, number: 2, misreadInterval: 1 });
    const trends = async () => (await get('experimenter', `/api/labs/${labId}/campaigns/${campaign.id}/trends`)).body;
    const before = await trends();
    expect(before.points.map((p: { number: number; timeBase: string | null }) => [p.number, p.timeBase])).toEqual([[1, null], [2, 'unchecked']]);
    expect(before.groups).toEqual([expect.objectContaining({ count: 1, mean: good.results.speed.value })]);

    const csv = (await get('analyst', `/api/labs/${labId}/campaigns/${campaign.id}/export?format=csv`)).text;
    const rows = parse(csv, { bom: true }) as string[][];
    const timeBase = rows[0].indexOf('Time base');
    expect(timeBase).toBeGreaterThan(0);
    expect(rows.slice(1).map((r) => [r[0], r[timeBase]])).toEqual([['1', ''], ['2', 'unchecked']]);

    expect((await post('analyst', `/api/shots/${bad.shotId}/analyses/${bad.analysisId}/time-base-confirmation`, { note: 'slow roll, checked' })).status).toBe(201);
    const after = await trends();
    expect(after.points[1].timeBase).toBe('confirmed');
    expect(after.groups[0].count).toBe(2);
  });

  it('When a flagged version is sent for review, then it is accepted with a warning and the audit entry records it; an unflagged one gets no warning', async () => {
    const bad = await analysedShot(h, { misreadInterval: 1 });
    const sent = await post('experimenter', `/api/shots/${bad.shotId}/review-requests`, { message: 'please look at the time base' });
    expect(sent.status).toBe(201);
    expect(sent.body.warnings).toEqual([{ code: 'time_base_unchecked', message: expect.stringMatching(/^Version 1 is marked "check the time base": a reviewer can return it but cannot sign it off/) }]);
    const audit = await AuditEvent.findOne({ where: { action: 'review.requested', targetId: bad.shotId } });
    expect(audit!.details).toMatchObject({ version: 1, timeBaseUnchecked: true });

    const good = await analysedShot(h);
    const fine = await post('experimenter', `/api/shots/${good.shotId}/review-requests`);
    expect(fine.status).toBe(201);
    expect(fine.body.warnings).toEqual([]);
  });

  it('When a flagged version is exported on its own, then the CSV leads with a "time base" record and the JSON carries the state, until and after it is confirmed', async () => {
    const bad = await analysedShot(h, { misreadInterval: 1 });
    const csvRows = async () => parse((await get('reviewer', `/api/shots/${bad.shotId}/export?format=csv`)).text, { bom: true }) as string[][];
    const before = await csvRows();
    const note = before[0].indexOf('Note');
    expect(before[1][0]).toBe('time base');
    expect(before[1][note]).toMatch(/^check the time base: the speed of 0\.00006 m\/s .*Not a measurement until an analyst confirms the read or fixes it in a new version\.$/);
    expect(before.find((r) => r[0] === 'speed')![note]).toMatch(/; check the time base: not a measurement until an analyst confirms the read$/);
    const json = (await get('reviewer', `/api/shots/${bad.shotId}/export?format=json`)).body;
    expect(json.timeBaseCheck).toMatchObject({ state: 'unchecked', confirmation: null });
    expect(json.timeBaseCheck.reasons.map((r: { code: string }) => r.code)).toEqual(['speed-range', 'coarse-sampling', 'time-base-assumed']);

    expect((await post('analyst', `/api/shots/${bad.shotId}/analyses/${bad.analysisId}/time-base-confirmation`, { note: 'slow roll, checked' })).status).toBe(201);
    const after = await csvRows();
    expect(after[1][0]).toBe('time base');
    expect(after[1][note]).toMatch(/^time base checked by .+, \d{4}-\d{2}-\d{2}: "slow roll, checked" \(it had been marked: /);
    expect(after.find((r) => r[0] === 'speed')![note]).not.toMatch(/check the time base/);
    expect((await get('reviewer', `/api/shots/${bad.shotId}/export?format=json`)).body.timeBaseCheck).toMatchObject({ state: 'confirmed', confirmation: { note: 'slow roll, checked' } });

    const good = await analysedShot(h);
    const plain = parse((await get('reviewer', `/api/shots/${good.shotId}/export?format=csv`)).text, { bom: true }) as string[][];
    expect(plain.some((r) => r[0] === 'time base')).toBe(false);
    expect((await get('reviewer', `/api/shots/${good.shotId}/export?format=json`)).body.timeBaseCheck).toMatchObject({ state: null });
  });
});
