import { UnrecoverableError, type Job } from 'bullmq';
import { Op } from 'sequelize';
import { analyzeShot } from '../../shared/analysis/analyze-shot.ts';
import { analysisOptionsSchema, type AnalysisOptions } from '../../shared/contracts/analysis.ts';
import type { ImportedCapture } from '../../shared/contracts/capture.ts';
import { analysisJobData } from '../../shared/contracts/jobs.ts';
import { combineCaptures } from '../../shared/import/combine-captures.ts';
import { ImportError } from '../../shared/import/import-error.ts';
import { nonFinitePaths, nonFiniteResultMessage } from '../../shared/analysis/non-finite-paths.ts';
import { Analysis, Capture } from '../../server/db/models/index.ts';
import { auditWithdrawnReview, finishVersion } from '../../server/modules/analyses/finish-version.ts';
import { readStoredChannels } from '../../server/traces/read-stored-channels.ts';
import { workerContext } from '../context.ts';
import { readStoredCapture } from '../read-stored-capture.ts';
import { settleShot } from '../../server/modules/shots/settle-shot.ts';

/** The engine on the captures the version names, read from their stored channel files (or the raw files, for captures stored before those). */
async function analyseStored(job: Job, analysis: Analysis, parameters: AnalysisOptions): Promise<Record<string, unknown>> {
  const { blobStore } = workerContext();
  const ids = analysis.captureIds;
  const rows = await Capture.findAll({ where: { id: { [Op.in]: ids } } });
  const ordered = ids.map((id) => rows.find((r) => r.id === id)).filter((r): r is Capture => !!r);
  if (ordered.length !== ids.length) throw new ImportError('a capture this analysis reads no longer exists');
  const imported: ImportedCapture[] = [];
  // The channel files the ingest stored hold the importer's values whole; only captures stored before they did
  // (or whose files are missing) are imported from the raw file again.
  for (const c of ordered) imported.push((await readStoredChannels(blobStore, c)) ?? (await readStoredCapture(blobStore, c)));
  await analysis.update({ progress: 50 });
  await job.updateProgress(50);
  const capture = imported.length === 1 ? imported[0] : combineCaptures(imported, { labels: ordered.map((c) => c.fileName) });
  return analyzeShot(capture, parameters) as unknown as Record<string, unknown>;
}

/**
 * Analysis job: run the engine on the captures the version names (read from their stored channel files), with its stored parameters, and store the
 * results on that version. Idempotent: the row exists before the job, a finished version is left alone, and the
 * final write only happens while the row is not yet done.
 */
export default async function analyseShot(job: Job): Promise<{ analysisId: string; state: string }> {
  const data = analysisJobData.parse(job.data);
  const { sequelize } = workerContext();
  const analysis = await Analysis.findByPk(data.analysisId);
  if (!analysis) throw new UnrecoverableError(`analysis ${data.analysisId} no longer exists`);
  if (analysis.state === 'done' || analysis.state === 'failed') return { analysisId: analysis.id, state: analysis.state };

  await analysis.update({ state: 'running', progress: 10, startedAt: analysis.startedAt ?? new Date() });
  await settleShot(analysis.shotId);
  await job.updateProgress(10);
  let results: Record<string, unknown>;
  try {
    const parameters = analysisOptionsSchema.parse(analysis.parameters);
    // Worked out by the API in the thread that read the upload (the same engine on the same samples): taken only
    // when they are for exactly this version's captures and parameters. The API now stores such numbers on the
    // version itself (automaticVersionIn); a job queued with them by an earlier release still finds them here.
    const pre = data.precomputed;
    const fits = pre !== undefined && JSON.stringify(pre.captureIds) === JSON.stringify(analysis.captureIds)
      && JSON.stringify(analysisOptionsSchema.parse(pre.parameters)) === JSON.stringify(parameters);
    results = fits ? pre.results : await analyseStored(job, analysis, parameters);
    // Never store NaN or ±Infinity turned into null by JSON: the version fails with the reason instead.
    const nonFinite = nonFinitePaths(results);
    if (nonFinite.length > 0) throw new ImportError(nonFiniteResultMessage(nonFinite));
  } catch (err) {
    if (err instanceof ImportError || err instanceof RangeError || err instanceof TypeError || err instanceof Error && err.name === 'ZodError') {
      await analysis.update({ state: 'failed', progress: 100, error: err.message, completedAt: new Date() });
      await settleShot(analysis.shotId);
      throw new UnrecoverableError(err.message);
    }
    throw err;
  }

  // The version's state, the shot's pointer and the shot's status change in one transaction: nobody reads the new
  // current version beside the old status (e.g. still "approved" for the version before).
  const withdrawn = await sequelize.transaction(async (transaction) => {
    const { finished, withdrawn: moved } = await finishVersion(analysis, results, transaction);
    if (!finished) return null;
    await settleShot(analysis.shotId, transaction);
    return moved;
  });
  if (withdrawn) await auditWithdrawnReview(withdrawn);
  await job.updateProgress(100);
  return { analysisId: analysis.id, state: "done" };
}
