// E-mail notifications through the real processes: the API server and the job worker are spawned against the
// throwaway PostgreSQL and Redis and send through nodemailer to a fake SMTP server on a port of our own (the mail
// lands in Redis, read back with readFakeOutbox). Covered: review requested → the lab's reviewer; returned and
// approved → whoever asked; a final job failure → the uploader; each kind turned off per person; a mail server
// that is down when the event happens (the request still succeeds; the job is retried and the mail arrives once
// the server is back); and a recomputation of an approved shot (a new current version, the approval kept).
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Queue } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pollUntil, simulatedCsv } from '../../bench/lib/pipeline-client.ts';
import { readFakeOutbox, startFakeSmtp, type FakeMail } from '../../server/dev/fake-smtp.ts';
import { Projectile } from '../../server/db/models/index.ts';
import { QUEUE_NAMES } from '../../shared/contracts/jobs.ts';
import { createApiHarness, fakeSmtpCredentials, freeLoopbackPort, type ApiHarness } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { redisEndpoint } from '../../server/lib/redis.ts';

let h: ApiHarness;
let app: AppProcesses;
let dataDir: string;
let smtpPort: number;
let smtp: { close(): Promise<void> } | null = null;
let notifyQueue: Queue;

type Who = 'admin' | 'experimenter' | 'analyst' | 'reviewer';

beforeAll(async () => {
  h = await createApiHarness();
  await h.resetDatabase();
  smtpPort = await freeLoopbackPort();
  smtp = await startFakeSmtp({ port: smtpPort, redis: h.redis, credentials: fakeSmtpCredentials() });
  dataDir = mkdtempSync(path.join(tmpdir(), 'gatepost-notify-'));
  app = await startAppProcesses({
    env: { GATEPOST_SMTP_PORT: String(smtpPort), GATEPOST_DATA_DIR: dataDir, GATEPOST_JWT_SECRET: h.config.jwtSecret, GATEPOST_LOG_LEVEL: 'warn' },
  });
  notifyQueue = new Queue(QUEUE_NAMES.notify, { connection: redisEndpoint(h.config.redisUrl) });
}, 120_000);

afterAll(async () => {
  await app?.stop();
  await smtp?.close();
  await notifyQueue?.close();
  await h?.close();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

async function call<T = Record<string, unknown>>(who: Who, method: string, url: string, body?: unknown): Promise<{ status: number; body: T }> {
  const res = await fetch(`${app.baseUrl}${url}`, {
    method,
    headers: { Cookie: h.sessionCookie(h.demo.users[who].id), ...(body === undefined ? {} : { 'Content-Type': 'application/json' }) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  return { status: res.status, body: (await res.json().catch(() => ({}))) as T };
}

async function upload(shotId: string, name: string, bytes: Uint8Array): Promise<void> {
  const form = new FormData();
  form.append('files', new Blob([Buffer.from(bytes)]), name);
  const res = await fetch(`${app.baseUrl}/api/shots/${shotId}/captures`, { method: 'POST', headers: { Cookie: h.sessionCookie(h.demo.users.experimenter.id) }, body: form });
  expect(res.status).toBe(202);
}

async function newShot(): Promise<string> {
  const labId = h.demo.labs.hollowmere.id;
  const ball = await Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true });
  const res = await call<{ shot: { id: string } }>('experimenter', 'POST', `/api/labs/${labId}/shots`, {
    campaignId: h.demo.hollowmere.campaignIds[0], projectileId: ball.id, gateRigId: h.demo.hollowmere.gateRigIds[0], tubePressurePa: 2000,
  });
  expect(res.status).toBe(201);
  return res.body.shot.id;
}

interface ShotView { shot: { status: string; currentAnalysisId: string | null; approvedAnalysisId: string | null }; analyses: { id: string; version: number; state: string; error: string | null }[] }
const shotView = async (shotId: string) => (await call<ShotView>('experimenter', 'GET', `/api/shots/${shotId}`)).body;

/** Waits until the shot's newest analysis version is done and the shot is no longer processing. */
async function analysed(shotId: string, version: number): Promise<ShotView> {
  const view = await pollUntil(async () => {
    const v = await shotView(shotId);
    const state = v.analyses.find((a) => a.version === version)?.state;
    return state === 'failed' || (state === 'done' && v.shot.status !== 'processing') ? v : undefined;
  }, { timeoutMs: 45_000, what: `analysis version ${version} of ${shotId}` });
  expect(view.analyses.find((a) => a.version === version), JSON.stringify(view.analyses)).toMatchObject({ state: 'done' });
  return view;
}

/** The first mail to `email` whose subject matches and whose text names the shot (each test uses a new shot). */
async function mailTo(email: string, subject: RegExp, shotId: string, timeoutMs = 20_000): Promise<FakeMail> {
  return pollUntil(
    async () => (await readFakeOutbox(h.redis)).find((m) => m.to.includes(email) && subject.test(m.subject) && m.text.includes(shotId)),
    { timeoutMs, intervalMs: 100, what: `mail "${subject}" about ${shotId} to ${email}` },
  );
}

describe('notification e-mails through the worker', () => {
  it('When a shot is sent for review, returned, sent again and approved, then the reviewer and the requester get one mail each step, and an opted-out kind is not sent', async () => {
    const shotId = await newShot();
    await upload(shotId, 'shot.csv', simulatedCsv().bytes);
    const v1 = await analysed(shotId, 1);

    const asked = await call('experimenter', 'POST', `/api/shots/${shotId}/review-requests`, { message: 'first of the sweep' });
    expect(asked.status).toBe(201);
    const toReviewer = await mailTo(h.demo.users.reviewer.email, /^Review requested: shot #\d+ of Vacuum sweep, autumn 2026$/, shotId);
    expect(toReviewer.text).toContain('Tomas Reyl asks for a review of shot');
    expect(toReviewer.text).toContain('(analysis version 1)');
    expect(toReviewer.text).toContain('Their note: first of the sweep');
    expect(toReviewer.text).toContain(`${app.baseUrl}/labs/${h.demo.labs.hollowmere.id}/shots/${shotId}`);
    expect(toReviewer.labId).toBe(h.demo.labs.hollowmere.id);

    expect((await call('reviewer', 'POST', `/api/shots/${shotId}/reviews`, { decision: 'returned', comment: 'Gate B pulse is clipped; re-run with 45 %.' })).status).toBe(201);
    const back = await mailTo(h.demo.users.experimenter.email, /^Returned for changes: /, shotId);
    expect(back.text).toContain('Marek Vintner returned shot');
    expect(back.text).toContain('Gate B pulse is clipped; re-run with 45 %.');

    // The experimenter turns approvals off; the default is on.
    expect((await call('experimenter', 'GET', '/api/me/notifications')).body).toEqual({ preferences: { reviewRequested: true, approved: true, returned: true, jobFailed: true } });
    expect((await call('experimenter', 'PATCH', '/api/me/notifications', { approved: false })).body).toEqual({ preferences: { reviewRequested: true, approved: false, returned: true, jobFailed: true } });
    expect((await call('experimenter', 'PATCH', '/api/me/notifications', { approved: 'no' })).status).toBe(400);

    expect((await call('experimenter', 'POST', `/api/shots/${shotId}/review-requests`, {})).status).toBe(201);
    const approved = await call<{ review: { id: string } }>('reviewer', 'POST', `/api/shots/${shotId}/reviews`, { decision: 'approved' });
    expect(approved.status).toBe(201);
    // The job ran and chose not to send: the person turned this kind off.
    // finishedOn and returnvalue are written together when the job completes and read together by getJob, so a
    // job fetched while still active (returnvalue null) is never taken for a finished one.
    const job = await pollUntil(async () => {
      const j = await notifyQueue.getJob(`notify-approved-${approved.body.review.id}-${h.demo.users.experimenter.id}`);
      return j?.finishedOn ? j : undefined;
    }, { timeoutMs: 20_000, what: 'the approval notification job' });
    expect(job.returnvalue).toEqual({ sent: false });
    // The second request's mail was queued before the approval, but nothing orders the two jobs: wait for it.
    await pollUntil(async () => (await readFakeOutbox(h.redis)).filter((m) => m.subject.startsWith('Review requested') && m.text.includes(shotId)).length >= 2 || undefined,
      { timeoutMs: 20_000, what: 'the second review-request mail' });
    const mails = await readFakeOutbox(h.redis);
    expect(mails.filter((m) => m.to.includes(h.demo.users.experimenter.email) && m.subject.startsWith('Signed off'))).toEqual([]);
    expect(mails.filter((m) => m.subject.startsWith('Review requested') && m.text.includes(shotId))).toHaveLength(2);

    // An analyst recomputes the approved shot: version 2 becomes current, the shot needs a new review, and the
    // approval of version 1 stays on record.
    const first = (await call<{ currentAnalysis: { parameters: Record<string, unknown> } }>('analyst', 'GET', `/api/shots/${shotId}`)).body.currentAnalysis;
    const again = await call('analyst', 'POST', `/api/shots/${shotId}/analyses`, { parameters: { ...first.parameters, threshold: { unit: 'percent', level: 45, hysteresis: 10 } } });
    expect(again.status).toBe(202);
    const v2 = await analysed(shotId, 2);
    const version1 = v1.analyses.find((a) => a.version === 1)!.id;
    const version2 = v2.analyses.find((a) => a.version === 2)!.id;
    expect(v2.shot).toMatchObject({ status: 'analysed', currentAnalysisId: version2, approvedAnalysisId: version1 });
    const history = await call<{ history: { type: string; decision?: string; analysisVersion: number }[] }>('reviewer', 'GET', `/api/shots/${shotId}/reviews`);
    expect(history.body.history.filter((e) => e.decision === 'approved').map((e) => e.analysisVersion)).toEqual([1]);
    expect((await call('analyst', 'POST', `/api/shots/${shotId}/review-requests`, {})).status).toBe(201);

    // A recomputation that finishes while version 2 waits for review withdraws that request: the reviewer can no
    // longer sign off numbers that are not the shot's current ones.
    expect((await call('analyst', 'POST', `/api/shots/${shotId}/analyses`, { parameters: { ...first.parameters, threshold: { unit: 'percent', level: 55, hysteresis: 10 } } })).status).toBe(202);
    const v3 = await analysed(shotId, 3);
    expect(v3.shot).toMatchObject({ status: 'analysed', currentAnalysisId: v3.analyses.find((a) => a.version === 3)!.id, approvedAnalysisId: version1 });
    const late = await call<{ error: { message: string } }>('reviewer', 'POST', `/api/shots/${shotId}/reviews`, { decision: 'approved' });
    expect(late.status).toBe(409);
    expect(late.body.error.message).toContain('not waiting for review');
    const audit = await call<{ events: { action: string; actor: string | null; details: { reviewedAnalysisId?: string } }[] }>('reviewer', 'GET', `/api/shots/${shotId}/audit`);
    expect(audit.body.events.filter((e) => e.action === 'review.withdrawn')).toEqual([
      expect.objectContaining({ actor: null, details: expect.objectContaining({ reviewedAnalysisId: version2 }) }),
    ]);
  }, 90_000);

  it('When a capture cannot be read, then its uploader is told once the job has failed for good', async () => {
    const shotId = await newShot();
    await upload(shotId, 'notes.csv', new TextEncoder().encode('this is not,a scope file\nat all,really\n'));
    const mail = await mailTo(h.demo.users.experimenter.email, /^Processing failed: /, shotId, 30_000);
    expect(mail.text).toContain('notes.csv:');
    expect(mail.text).toContain(shotId);
  }, 60_000);

  it('When the mail server is down as a review is requested, then the request succeeds and the mail arrives after the server is back', async () => {
    const shotId = await newShot();
    await upload(shotId, 'shot.csv', simulatedCsv({ seed: 11 }).bytes);
    await analysed(shotId, 1);
    await smtp!.close();
    smtp = null;
    const asked = await call<{ request: { id: string } }>('analyst', 'POST', `/api/shots/${shotId}/review-requests`, {});
    expect(asked.status).toBe(201);
    const jobId = `notify-reviewRequested-${asked.body.request.id}-${h.demo.users.reviewer.id}`;
    // The first attempt fails on the refused connection and is scheduled again.
    await pollUntil(async () => ((await notifyQueue.getJob(jobId))?.attemptsMade ?? 0) >= 1 || undefined, { timeoutMs: 20_000, what: 'a failed first attempt' });
    smtp = await startFakeSmtp({ port: smtpPort, redis: h.redis, credentials: fakeSmtpCredentials() });
    const mail = await mailTo(h.demo.users.reviewer.email, /^Review requested: /, shotId, 30_000);
    expect(mail.text).toContain(shotId);
    // The mail reaches the server a moment before the job is marked finished.
    const done = await pollUntil(async () => { const j = await notifyQueue.getJob(jobId); return j?.finishedOn ? j : undefined; }, { timeoutMs: 10_000, what: 'the retried job to finish' });
    expect(done.returnvalue).toEqual({ sent: true });
    expect(done.attemptsMade).toBeGreaterThanOrEqual(2);
  }, 60_000);
});
