import { rm, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { Op } from 'sequelize';
import { analyzeShot } from '../../shared/analysis/analyze-shot.ts';
import { analysisOptionsSchema } from '../../shared/contracts/analysis.ts';
import { simulatedShotCsv, WARM_UP_PARAMETERS, warmUpDeepPasses, warmUpShot } from '../../shared/simulate/warm-up-shot.ts';
import { writeCaptureLayout } from '../../fixtures/lib/write-capture-layout.ts';
import { writeChannelFiles } from '../../server/traces/write-channel-files.ts';
import { readStoredChannels } from '../../server/traces/read-stored-channels.ts';
import { LocalDiskStore } from '../../server/storage/local-disk-store.ts';
import { warmFolder } from '../../server/lib/warm-folder.ts';
import { automaticVersionIn, readyCaptures } from '../../server/modules/analyses/service.ts';
import { endCaptureRead } from '../../server/modules/shots/end-capture-read.ts';
import { settleShot } from '../../server/modules/shots/settle-shot.ts';
import { readCaptureStream } from '../import/read-capture-stream.ts';
import { workerContext } from '../context.ts';
import { readStoredCapture } from '../read-stored-capture.ts';
import { assertStorageRoom } from '../../server/modules/storage/service.ts';
import { Analysis, Campaign, Capture, GateRig, Projectile, Shot } from '../../server/db/models/index.ts';

/**
 * Rounds of each step on the warm-up shot: V8 optimises a function after it ran hot for a while, not on its first
 * call. Two rounds of the reader (of a record as deep as a common capture, so the heap has grown to its size too),
 * three of the engine.
 */
const READ_ROUNDS = 2;
const ANALYSIS_ROUNDS = 3;

/** Thrown to end the warm-up's transaction: it rolls back, so nothing it touched is kept. */
class WarmRollback extends Error {}

/**
 * The statements a job makes, on rows no id names (the all-zero id), in a transaction that is rolled back: the
 * connection (kept open by the thread's pool, worker/context.ts), PostgreSQL's per-connection catalogue caches and
 * Sequelize's first pass over each model's updates and the shot's settling happen here, not in the first job.
 */
export async function warmDatabase(kind: 'ingest' | 'analysis'): Promise<void> {
  const ctx = workerContext();
  const none = '00000000-0000-0000-0000-000000000000';
  await ctx.sequelize.authenticate();
  await Promise.all([
    Capture.findByPk(none), Shot.findByPk(none), Analysis.findByPk(none),
    // What the shot's automatic version reads (its default parameters) and the analysis job's captures.
    GateRig.findByPk(none), Projectile.findByPk(none), Campaign.findByPk(none, { attributes: ['analysisSettings'] }),
    Capture.findAll({ where: { id: { [Op.in]: [none] } } }),
    // The job queues' Redis connection of this thread, which queues the next job.
    ctx.queues.failedAnalysis({ analysisId: none }),
  ]);
  if (kind === 'ingest') await assertStorageRoom(ctx.config, none, 0, 'Warm-up');
  await ctx.sequelize.transaction(async (transaction) => {
    // Making a version: the shot locked, an earlier version with the key, the ready files, the last version number.
    await Shot.findByPk(none, { transaction, lock: transaction.LOCK.UPDATE });
    await Analysis.findOne({ where: { jobKey: `warm-${none}` }, transaction });
    await readyCaptures(none, transaction);
    await Analysis.max('version', { where: { shotId: none }, transaction });
    // An instance update as the jobs make it (UPDATE … WHERE id = the zero id: no row). The instances stand for rows
    // read from the table, so they carry only their id: `as never` skips the attributes a new row would need.
    const capture = Capture.build({ id: none } as never, { isNewRecord: false });
    await capture.update({ state: 'reading', progress: 10, error: null }, { transaction });
    const analysis = Analysis.build({ id: none } as never, { isNewRecord: false });
    await analysis.update({ state: 'running', progress: 10 }, { transaction });
    await Analysis.update({ state: 'done', progress: 100, completedAt: new Date(), error: null }, { where: { id: none }, transaction });
    await settleShot(none, transaction);
    // What an ingest job's end asks under the shot's lock (endCaptureRead): files still pending, files read.
    if (kind === 'ingest') await automaticVersionIn(Shot.build({ id: none } as never, { isNewRecord: false }), transaction);
    throw new WarmRollback();
  }).catch((err: unknown) => {
    if (!(err instanceof WarmRollback)) throw err;
  });
  // For a shot that does not exist: it stops at the shot's lock, before anything is written or queued.
  if (kind === 'ingest') await endCaptureRead(ctx, none);
  await settleShot(none);
}

/**
 * Readies a processor thread for its first job while it waits in the pool: opens the worker context and keeps a
 * database connection (warmDatabase), and runs the code its jobs run (reading a capture from disk and from a stream,
 * writing its channel files, reading them back, analysing it) a few times on a simulated shot in a throwaway
 * folder, so the first real job pays neither for the connection nor for the JIT's first passes. bench:pipeline
 * measured the first job after a start at 4.5× a warm one with no warm-up, 1.83–2.16× with one pass over the reader
 * and the engine and no database work but a connection that its pool closed after 10 s idle, 1.27–1.79× with this
 * (three runs each, alternated, 2 December 2026; issue 13: ≤ 2×). Later the same day, on a machine shared with
 * other work (load average 3–5): 1.22–2.53× (six runs) with this as it then was, 1.29–1.82× (five runs) once it read
 * through the job's own functions on capture rows (readStoredCapture, readStoredChannels on model instances) and made
 * the statements of an automatic version, and the API readied its upload path too (server/modules/shots/warm-upload.ts);
 * 1.15–1.76× in 16 of 17 runs and 2.00× in one (median 1.46×) once the warm-up shot had noise and a rise time
 * (before, its clean square pulses left the engine's crossing and noise paths cold: the first analysis job took
 * 1.5–2.8× a warm one's median, and 2.7–3.3× before any of these changes; now 0.6–2.2×, median 1.15×).
 * Nothing is written to the database or the lab's storage; a failure (database not up yet) only means the first job
 * does the work itself.
 */
export async function warmThread(kind: 'ingest' | 'analysis'): Promise<void> {
  await warmDatabase(kind).catch(() => {});
  const shot = warmUpShot();
  const source = { t0: shot.time.t0, dt: shot.time.dt, channels: shot.channels };
  const none = '00000000-0000-0000-0000-000000000000';
  const { config } = workerContext();
  const limits = { maxChannels: config.maxChannelsPerCapture, maxSamples: config.maxSamplesPerChannel };
  const dir = await warmFolder('gatepost-warm');
  try {
    const store = new LocalDiskStore(path.join(dir, 'blobs'));
    // Plain decimal times and volts (what most scopes and our own exports write) and exponent times.
    const files = [writeCaptureLayout('plain-time', source).bytes, simulatedShotCsv(shot)];
    if (kind === 'ingest') {
      for (let round = 0; round < READ_ROUNDS; round++) {
        for (const [i, bytes] of files.entries()) {
          const file = path.join(dir, `warm-${i}.csv`);
          await writeFile(file, bytes);
          const key = `labs/${none}/raw/warm-${i}`;
          await store.putFile(key, file);
          // Both readers an ingest uses (the disk reader for the local store, through readStoredCapture on a capture
          // row as the job reads it, with the installation's limits; the stream reader for S3), and the channel
          // files it writes.
          const row = Capture.build({ id: none, storageKey: key, sizeBytes: bytes.length, importOptions: null } as never, { isNewRecord: false });
          const imported = await readStoredCapture(store, row, limits);
          await readCaptureStream((async function* () { yield bytes; })(), { sizeHint: bytes.length });
          await writeChannelFiles(store, 'warm', `warm-${round}-${i}`, imported);
        }
      }
    } else {
      const file = path.join(dir, 'warm.csv');
      await writeFile(file, files[0]);
      const key = `labs/${none}/raw/warm`;
      await store.putFile(key, file);
      const imported = await readStoredCapture(store, Capture.build({ id: none, storageKey: key, sizeBytes: files[0].length, importOptions: null } as never, { isNewRecord: false }));
      // A capture row as the analysis job reads it (a model instance, not a plain object).
      const row = Capture.build({
        id: none, channels: await writeChannelFiles(store, 'warm', 'warm', imported), layout: imported.layout, warnings: imported.warnings,
      } as never, { isNewRecord: false });
      const parameters = analysisOptionsSchema.parse(WARM_UP_PARAMETERS);
      let results: unknown = null;
      for (let round = 0; round < ANALYSIS_ROUNDS; round++) {
        const capture = await readStoredChannels(store, row);
        if (capture) results = analyzeShot(capture, parameters);
        if (capture && round === 0) warmUpDeepPasses(capture.channels.map((c) => c.values));
      }
      // The job's final write of a version's results (a large JSON value), on no row, rolled back.
      if (results !== null) await warmResultsWrite(JSON.parse(JSON.stringify(results)) as Record<string, unknown>).catch(() => {});
    }
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

/** The analysis job's write of the results, as it makes it, on the all-zero id in a transaction that is rolled back. */
async function warmResultsWrite(results: Record<string, unknown>): Promise<void> {
  const none = '00000000-0000-0000-0000-000000000000';
  await workerContext().sequelize.transaction(async (transaction) => {
    await Analysis.update(
      { state: 'done', progress: 100, results, completedAt: new Date(), error: null },
      { where: { id: none, state: { [Op.ne]: 'done' } }, transaction },
    );
    throw new WarmRollback();
  }).catch((err: unknown) => {
    if (!(err instanceof WarmRollback)) throw err;
  });
}
