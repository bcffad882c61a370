// Review and sign-off through the API (in-process, real PostgreSQL and Redis): who may do what, the workflow's
// states and clear refusals, the review history and comments, and the audit trail: every action leaves exactly
// one event, and the database itself refuses to change or delete one. Notification e-mails sent by the worker are
// in tests/api/notifications.test.ts; here only the queued jobs are checked.
import { Queue } from 'bullmq';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { allRoutes } from '../../server/app.ts';
import { AuditEvent, Membership, Shot, User } from '../../server/db/models/index.ts';
import { QUEUE_NAMES, type NotifyJobData } from '../../shared/contracts/jobs.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { analysedShot } from './review-fixtures.ts';
import { redisEndpoint } from '../../server/lib/redis.ts';

let h: ApiHarness;
let notifyQueue: Queue;
let sandgateReviewer: string;

beforeAll(async () => {
  h = await createApiHarness();
  await h.resetDatabase();
  notifyQueue = new Queue(QUEUE_NAMES.notify, { connection: redisEndpoint(h.config.redisUrl) });
  const user = await User.create({ email: 'rhea.moss@sandgate.example', name: 'Rhea Moss', passwordHash: 'not-used' });
  await Membership.create({ labId: h.demo.labs.sandgate.id, userId: user.id, role: 'reviewer' });
  sandgateReviewer = user.id;
});
afterAll(async () => {
  await notifyQueue?.close();
  await h?.close();
});

type Who = 'admin' | 'experimenter' | 'analyst' | 'reviewer';
const as = (who: Who | string) => ({ Cookie: h.sessionCookie(who in (h.demo.users as object) ? h.demo.users[who as Who].id : who) });
const post = (who: Who | string, url: string, body: object = {}) => request(h.app).post(url).set(as(who)).send(body);
const get = (who: Who | string, url: string) => request(h.app).get(url).set(as(who));

async function notifyJobs(): Promise<NotifyJobData[]> {
  return (await notifyQueue.getJobs(['waiting', 'delayed', 'prioritized'])).map((j) => j.data as NotifyJobData);
}

describe('review workflow', () => {
  it('When a shot goes through request, return, request and approval, then each step answers and records what the contract says', async () => {
    const shot = await analysedShot(h);
    const base = `/api/shots/${shot.shotId}`;

    // Nobody but a reviewer decides; a reviewer does not send for review.
    expect((await post('reviewer', `${base}/review-requests`)).status).toBe(403);
    expect((await post('reviewer', `${base}/reviews`, { decision: 'approved' })).status).toBe(409);

    const asked = await post('experimenter', `${base}/review-requests`, { message: 'Gate C looks late, please check' });
    expect(asked.status, JSON.stringify(asked.body)).toBe(201);
    expect(asked.body).toMatchObject({
      request: { analysisId: shot.analysisId, analysisVersion: 1, message: 'Gate C looks late, please check', requestedBy: { id: h.demo.users.experimenter.id, name: 'Tomas Reyl' } },
      shot: { status: 'in_review', reviewAnalysisId: shot.analysisId, approvedAnalysisId: null },
    });
    const again = await post('analyst', `${base}/review-requests`);
    expect(again.status).toBe(409);
    expect(again.body.error.message).toBe('This shot is already waiting for review.');

    // The lab's reviewers are queued an e-mail each (the demo lab has one reviewer); the requester is not.
    const jobs = (await notifyJobs()).filter((j) => j.shotId === shot.shotId);
    expect(jobs).toEqual([expect.objectContaining({ kind: 'reviewRequested', recipientId: h.demo.users.reviewer.id, eventId: asked.body.request.id })]);

    const queue = await get('reviewer', `/api/labs/${h.demo.labs.hollowmere.id}/review-queue`);
    expect(queue.status).toBe(200);
    const entry = queue.body.shots.find((s: { shotId: string }) => s.shotId === shot.shotId);
    expect(entry).toMatchObject({
      campaignName: 'Vacuum sweep, autumn 2026', number: shot.shotNumber, analysisVersion: 1, analysisId: shot.analysisId,
      requestedBy: { name: 'Tomas Reyl' }, message: 'Gate C looks late, please check',
      speed: { value: shot.results.speed.value, uncertainty: shot.results.speed.uncertainty, method: 'flight' },
    });
    expect(typeof entry.requestedAt).toBe('string');
    expect((await get('experimenter', `/api/labs/${h.demo.labs.hollowmere.id}/review-queue`)).status).toBe(403);

    // An experimenter (or admin, or analyst) cannot approve; a return needs a comment.
    for (const who of ['experimenter', 'analyst', 'admin'] as const) {
      expect((await post(who, `${base}/reviews`, { decision: 'approved' })).status).toBe(403);
    }
    const bare = await post('reviewer', `${base}/reviews`, { decision: 'returned' });
    expect(bare.status).toBe(400);
    expect(bare.body.error.message).toContain('a returned shot needs a comment');
    expect((await post('reviewer', `${base}/reviews`, { decision: 'returned', comment: '   ' })).status).toBe(400);
    expect((await post('reviewer', `${base}/reviews`, { decision: 'maybe' })).status).toBe(400);

    const returned = await post('reviewer', `${base}/reviews`, { decision: 'returned', comment: 'Gate C threshold sits on the noise; use 40 %.' });
    expect(returned.status).toBe(201);
    expect(returned.body).toMatchObject({ review: { decision: 'returned', reviewer: { name: 'Marek Vintner' }, analysisVersion: 1 }, shot: { status: 'returned', reviewAnalysisId: null } });
    expect((await notifyJobs()).filter((j) => j.shotId === shot.shotId && j.kind === 'returned')).toEqual([
      expect.objectContaining({ recipientId: h.demo.users.experimenter.id, eventId: returned.body.review.id }),
    ]);

    expect((await post('analyst', `${base}/review-requests`, {})).status).toBe(201);
    const approved = await post('reviewer', `${base}/reviews`, { decision: 'approved', comment: 'Fine now.' });
    expect(approved.status).toBe(201);
    expect(approved.body.shot).toMatchObject({ status: 'approved', approvedAnalysisId: shot.analysisId, currentAnalysisId: shot.analysisId });
    // The approval is told to the analyst who asked the second time.
    expect((await notifyJobs()).filter((j) => j.shotId === shot.shotId && j.kind === 'approved').map((j) => j.recipientId)).toEqual([h.demo.users.analyst.id]);

    // Signed off: no new request for the same version, conditions frozen.
    const afterApproval = await post('admin', `${base}/review-requests`);
    expect(afterApproval.status).toBe(409);
    expect(afterApproval.body.error.message).toContain('already signed off');
    expect((await request(h.app).patch(base).set(as('experimenter')).send({ notes: 'late edit' })).status).toBe(409);

    const history = await get('experimenter', `${base}/reviews`);
    expect(history.status).toBe(200);
    expect(history.body).toMatchObject({ status: 'approved', approvedAnalysisId: shot.analysisId, approvedAnalysisVersion: 1 });
    expect(history.body.history.map((e: { type: string; decision?: string; by: { name: string } }) => [e.type, e.decision ?? null, e.by.name])).toEqual([
      ['request', null, 'Tomas Reyl'],
      ['decision', 'returned', 'Marek Vintner'],
      ['request', null, 'Priya Okafor'],
      ['decision', 'approved', 'Marek Vintner'],
    ]);
    expect(history.body.history[1]).toMatchObject({ comment: 'Gate C threshold sits on the noise; use 40 %.', analysisVersion: 1 });
  });

  it('When a shot has no finished analysis, then a review request is refused with a reason', async () => {
    const res = await post('experimenter', `/api/shots/${h.demo.hollowmere.shotIds[0]}/review-requests`);
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('no finished analysis');
  });

  it('When a reviewer of another lab looks, then Hollowmere shots do not exist for them and their own queue is empty', async () => {
    const shot = await analysedShot(h);
    expect((await post('experimenter', `/api/shots/${shot.shotId}/review-requests`)).status).toBe(201);
    for (const url of [`/api/shots/${shot.shotId}/reviews`, `/api/shots/${shot.shotId}/comments`, `/api/shots/${shot.shotId}/audit`, `/api/labs/${h.demo.labs.hollowmere.id}/review-queue`]) {
      expect((await get(sandgateReviewer, url)).status, url).toBe(404);
    }
    expect((await post(sandgateReviewer, `/api/shots/${shot.shotId}/reviews`, { decision: 'approved' })).status).toBe(404);
    expect((await Shot.findByPk(shot.shotId))!.status).toBe('in_review');
    const own = await get(sandgateReviewer, `/api/labs/${h.demo.labs.sandgate.id}/review-queue`);
    expect(own.status).toBe(200);
    expect(own.body).toEqual({ shots: [] });
  });
});

describe('comments', () => {
  it('When people comment and reply, then the thread lists them in order with authors, and a reply to a comment of another shot is refused', async () => {
    const shot = await analysedShot(h);
    const other = await analysedShot(h);
    const first = await post('experimenter', `/api/shots/${shot.shotId}/comments`, { body: 'Seal tore on the left edge.' });
    expect(first.status).toBe(201);
    const reply = await post('reviewer', `/api/shots/${shot.shotId}/comments`, { body: 'Then exclude it from the sweep?', replyTo: first.body.comment.id });
    expect(reply.status).toBe(201);
    expect((await post('analyst', `/api/shots/${shot.shotId}/comments`, { body: '' })).status).toBe(400);
    const foreign = await post('analyst', `/api/shots/${other.shotId}/comments`, { body: 'misplaced', replyTo: first.body.comment.id });
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.message).toContain('replyTo: no such comment on this shot');
    const list = await get('analyst', `/api/shots/${shot.shotId}/comments`);
    expect(list.body.comments.map((c: { body: string; replyTo: string | null; author: { name: string } }) => [c.author.name, c.body, c.replyTo])).toEqual([
      ['Tomas Reyl', 'Seal tore on the left edge.', null],
      ['Marek Vintner', 'Then exclude it from the sweep?', first.body.comment.id],
    ]);
  });
});

describe('audit trail of a shot', () => {
  it('When every kind of action is taken once, then the shot audit lists exactly one event for each, with the actor', async () => {
    const shot = await analysedShot(h);
    const base = `/api/shots/${shot.shotId}`;
    expect((await request(h.app).patch(base).set(as('experimenter')).send({ notes: 'seal replaced' })).status).toBe(200);
    expect((await post('analyst', `${base}/comments`, { body: 'checked' })).status).toBe(201);
    expect((await post('experimenter', `${base}/review-requests`)).status).toBe(201);
    const upload = await request(h.app).post(`${base}/captures`).set(as('experimenter')).attach('files', Buffer.from('t,CH1\n0,1\n1e-6,2\n'), 'extra.csv');
    expect(upload.status).toBe(202);
    expect((await post('reviewer', `${base}/reviews`, { decision: 'returned', comment: 'add the ambient pressure' })).status).toBe(201);
    expect((await post('experimenter', `${base}/review-requests`)).status).toBe(201);
    expect((await post('reviewer', `${base}/reviews`, { decision: 'approved' })).status).toBe(201);
    // An approved shot may still be recomputed by an analyst (the new version will need a new review).
    const recompute = await post('analyst', `${base}/analyses`, { parameters: { threshold: { level: 45, hysteresis: 10 } } });
    expect(recompute.status, JSON.stringify(recompute.body)).toBe(202);
    expect((await get('admin', `${base}/export?format=csv`)).status).toBe(200);
    expect((await get('admin', `${base}/report.pdf`)).status).toBe(200);

    expect((await get('experimenter', `${base}/audit`)).status).toBe(403);
    const res = await get('reviewer', `${base}/audit`);
    expect(res.status).toBe(200);
    const seen = res.body.events.map((e: { action: string; actor: string }) => `${e.action} by ${e.actor}`);
    expect(seen).toEqual([
      'shot.updated by Tomas Reyl',
      'comment.added by Priya Okafor',
      'review.requested by Tomas Reyl',
      'capture.uploaded by Tomas Reyl',
      'review.returned by Marek Vintner',
      'review.requested by Tomas Reyl',
      'review.approved by Marek Vintner',
      'analysis.requested by Priya Okafor',
      'shot.exported by Ines Calder',
      'shot.report by Ines Calder',
    ]);
  });

  it('When anyone tries to change or delete an audit event in the database, then PostgreSQL refuses, and no route can', async () => {
    const before = await AuditEvent.count();
    expect(before).toBeGreaterThan(0);
    await expect(h.sequelize.query(`UPDATE audit_events SET action = 'forged' WHERE id = (SELECT min(id) FROM audit_events)`)).rejects.toThrow('audit_events is append-only');
    await expect(h.sequelize.query('DELETE FROM audit_events')).rejects.toThrow('audit_events is append-only');
    expect(await AuditEvent.count()).toBe(before);
    expect(await AuditEvent.count({ where: { action: 'forged' } })).toBe(0);
    // No route edits or deletes: every route under an audit path reads.
    const writers = allRoutes(h.deps).filter((r) => r.path.endsWith('/audit') && r.method !== 'get');
    expect(writers).toEqual([]);
  });
});
