// The automatic version of a file whose numbers the API worked out in the thread that read it (uploads.ts): ending
// the read (endCaptureRead) stores them on the version in the same transaction when they are for exactly its
// captures and parameters, and otherwise queues the version's job as for any file, with no numbers. Run on the
// throwaway PostgreSQL in this process, with a stand-in for the job queues that records what is queued.
import type { Transaction } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, AuditEvent, Capture, Shot } from '../../server/db/models/index.ts';
import type { JobQueues } from '../../server/lib/job-queues.ts';
import { defaultParameters } from '../../server/modules/analyses/service.ts';
import { endCaptureRead } from '../../server/modules/shots/end-capture-read.ts';
import type { AnalysisJobData } from '../../shared/contracts/jobs.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';
import { createDemoShotRow } from '../helpers/demo-shots.ts';

let h: ApiHarness;
let demo: DemoWorld;
let shotNumber = 9000;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
}, 60_000);

afterAll(async () => {
  await h?.close();
});

/** The job queues, recording the analysis jobs queued. */
function recordingQueues(): { queues: JobQueues; queued: AnalysisJobData[] } {
  const queued: AnalysisJobData[] = [];
  const queues = { addAnalysisOrDefer: async (data: AnalysisJobData) => { queued.push(data); } } as unknown as JobQueues;
  return { queues, queued };
}

/** A shot with one file being read (queued), whose channels are named as a two-channel scope export names them. */
async function shotWithFileBeingRead(): Promise<{ shot: Shot; capture: Capture; channels: object }> {
  const shot = await Shot.findByPk(await createDemoShotRow(demo, shotNumber++), { rejectOnEmpty: true });
  const capture = await Capture.create({
    labId: shot.labId, shotId: shot.id, fileName: 'arrival.csv', sizeBytes: 1000, sha256: `${shotNumber}`.padStart(64, '0'),
    storageKey: `labs/${shot.labId}/raw/${shotNumber}`, uploadedBy: demo.users.experimenter.id,
  });
  const channels = { channels: [{ index: 0, name: 'CH1' }, { index: 1, name: 'CH2' }], length: 1000 };
  return { shot, capture, channels };
}

const markReady = (capture: Capture, channels: object) => async (transaction: Transaction) => {
  const [n] = await Capture.update({ state: 'ready', progress: 100, channels, sampleCount: 1000 }, { where: { id: capture.id, state: 'queued' }, transaction });
  return n > 0;
};

describe('When the read of a shot\'s only file ends with numbers the API worked out for it', () => {
  it('then numbers for exactly its captures and parameters are stored on the new version in the same transaction, and no job is queued', async () => {
    const { shot, capture, channels } = await shotWithFileBeingRead();
    const parameters = await defaultParameters(shot, ['CH1', 'CH2']);
    const results = { speed: { value: 301.5, uncertainty: 2.5 } };
    const ranAt = { startedAt: new Date(Date.now() - 150), completedAt: new Date(Date.now() - 20) };
    const { queues, queued } = recordingQueues();
    const ended = await endCaptureRead({ sequelize: h.sequelize, queues, logger: h.deps.logger }, shot.id, {
      write: markReady(capture, channels), precomputed: { captureIds: [capture.id], parameters, results, ranAt },
    });
    expect(queued).toEqual([]);
    const version = await Analysis.findByPk(ended.versionMadeId!, { rejectOnEmpty: true });
    expect(version).toMatchObject({ state: 'done', progress: 100, results, captureIds: [capture.id], error: null });
    expect(version.startedAt).toEqual(ranAt.startedAt);
    expect(version.completedAt).toEqual(ranAt.completedAt);
    await shot.reload();
    expect(shot.currentAnalysisId).toBe(version.id);
    expect(shot.status).toBe('analysed');
    expect(ended.shot?.status).toBe('analysed');
  });

  it('then numbers for other parameters (the shot changed meanwhile) are not stored: the version is queued for the worker, with no numbers', async () => {
    const { shot, capture, channels } = await shotWithFileBeingRead();
    const parameters = await defaultParameters(shot, ['CH1', 'CH2']);
    const { queues, queued } = recordingQueues();
    const ended = await endCaptureRead({ sequelize: h.sequelize, queues, logger: h.deps.logger }, shot.id, {
      write: markReady(capture, channels),
      precomputed: { captureIds: [capture.id], parameters: { ...parameters, polarity: 'rising' }, results: { speed: { value: 1, uncertainty: 0 } } },
    });
    expect(queued).toEqual([{ analysisId: ended.versionMadeId }]);
    const version = await Analysis.findByPk(ended.versionMadeId!, { rejectOnEmpty: true });
    expect(version).toMatchObject({ state: 'queued', results: null });
    await shot.reload();
    expect(shot.currentAnalysisId).toBeNull();
    expect(shot.status).toBe('processing');
  });

  it('then a review request about an older version is withdrawn, and the withdrawal audited, as when the job stores them', async () => {
    const { shot, capture, channels } = await shotWithFileBeingRead();
    // An older version of the shot, current and sent for review.
    const older = await Analysis.create({
      labId: shot.labId, shotId: shot.id, version: 1, parameters: {}, engineVersion: 'test', jobKey: `test-older-${shot.id}`,
      requestedBy: null, captureIds: [], state: 'done', results: { speed: null } as object,
    });
    await shot.update({ currentAnalysisId: older.id, reviewAnalysisId: older.id, status: 'in_review' });
    const parameters = await defaultParameters(shot, ['CH1', 'CH2']);
    const { queues } = recordingQueues();
    const ended = await endCaptureRead({ sequelize: h.sequelize, queues, logger: h.deps.logger }, shot.id, {
      write: markReady(capture, channels), precomputed: { captureIds: [capture.id], parameters, results: { speed: { value: 299, uncertainty: 3 } } },
    });
    await shot.reload();
    expect(shot.currentAnalysisId).toBe(ended.versionMadeId);
    expect(shot.reviewAnalysisId).toBeNull();
    expect(shot.status).toBe('analysed');
    const audit = await AuditEvent.findOne({ where: { targetId: shot.id, action: 'review.withdrawn' }, rejectOnEmpty: true });
    expect(audit.details).toMatchObject({ reviewedAnalysisId: older.id, reason: 'analysis version 2 finished while an older version was in review' });
  });
});
