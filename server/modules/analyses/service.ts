import { createHash } from 'node:crypto';
import { Op, type Sequelize, type Transaction } from 'sequelize';
import { analysisOptionsSchema, type AnalysisOptionsInput } from '../../../shared/contracts/analysis.ts';
import { ENGINE_VERSION } from '../../../shared/analysis/engine-version.ts';
import { applySettings, analysisSettingsSchema } from '../../../shared/contracts/analysis-settings.ts';
import { Analysis, Campaign, Capture, GateRig, Projectile, Shot } from '../../db/models/index.ts';
import { badRequest, conflict } from '../../lib/errors.ts';
import type { AnalysisJobData } from '../../../shared/contracts/jobs.ts';
import { settleShot } from '../shots/settle-shot.ts';
import { finishVersion, type WithdrawnReview } from './finish-version.ts';

export interface StoredChannel { name: string }

/** Ready captures of a shot in the order the analysis combines them (upload order). */
export async function readyCaptures(shotId: string, transaction?: Transaction) {
  return Capture.findAll({ where: { shotId, state: 'ready', removedAt: null }, order: [['uploadedAt', 'ASC'], ['id', 'ASC']], transaction });
}

/**
 * Channel names as the analysis will see them after combining one-file-per-channel captures: a name already
 * taken gets the file name appended, the same rule as shared/import/combine-captures.ts.
 */
export function combinedChannelNames(captures: { fileName: string; channels: unknown }[]): string[] {
  const seen = new Set<string>();
  const names: string[] = [];
  for (const c of captures) {
    for (const ch of ((c.channels as { channels?: StoredChannel[] } | null)?.channels ?? [])) {
      names.push(seen.has(ch.name) ? `${ch.name} (${c.fileName})` : ch.name);
      seen.add(ch.name);
    }
  }
  return names;
}

/**
 * The analysis a shot gets by default: the rig's gates on the captured channels in order (first channel = first
 * gate), the rig's position tolerance, the projectile's length and mass with their tolerances, the shot's ambient
 * temperature, and the engine's automatic levels and thresholds, with the campaign's default settings (if it keeps
 * any) laid over them.
 */
export async function defaultParameters(shot: Shot, channelNames: string[], transaction?: Transaction): Promise<AnalysisOptionsInput> {
  const [rig, projectile] = await Promise.all([
    shot.gateRigId ? GateRig.findByPk(shot.gateRigId, { transaction }) : null,
    shot.projectileId ? Projectile.findByPk(shot.projectileId, { transaction }) : null,
  ]);
  const params: AnalysisOptionsInput = {};
  if (rig && channelNames.length > 0) {
    const n = Math.min(rig.gates.length, channelNames.length);
    params.gates = rig.gates.slice(0, n).map((g, i) => ({ channel: channelNames[i], position: g.position_m }));
    params.positionTolerance = Math.max(0, ...rig.gates.map((g) => g.position_uncertainty_m));
  }
  if (projectile) {
    params.projectile = {
      length: projectile.diameterM,
      lengthTolerance: projectile.diameterToleranceM,
      mass: projectile.massKg,
      massTolerance: projectile.massToleranceKg,
    };
  }
  if (shot.ambientTemperatureK) params.ambient = { temperature: shot.ambientTemperatureK };
  // The campaign's default settings (threshold, smoothing, polarity, edges, gate mapping) win over the engine's.
  const campaign = await Campaign.findByPk(shot.campaignId, { attributes: ['analysisSettings'], transaction });
  const settings = analysisSettingsSchema.safeParse(campaign?.analysisSettings ?? {});
  return settings.success ? applySettings(params, settings.data) : params;
}

/**
 * Creates the next analysis version of a shot, or returns the existing one with the same `jobKey` (so a retried
 * request or a rerun job never makes a second row). Versions are numbered under a lock on the shot row.
 */
export async function createAnalysisVersion(
  sequelize: Sequelize,
  input: {
    shotId: string; parametersInput: AnalysisOptionsInput; requestedBy: string | null; jobKey: string;
    /** The batch recompute this version belongs to, and the version that was current when it was made. */
    batchId?: string; previousAnalysisId?: string | null;
  },
  /** Run inside this transaction (a batch makes all its versions in one); otherwise in a transaction of its own. */
  outer?: Transaction,
): Promise<{ analysis: Analysis; created: boolean }> {
  const parsed = analysisOptionsSchema.safeParse(input.parametersInput);
  if (!parsed.success) {
    throw badRequest(`Please correct the analysis parameters: ${parameterProblems(parsed.error)}`);
  }
  const work = async (transaction: Transaction) => {
    const shot = await Shot.findByPk(input.shotId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!shot) throw conflict('The shot no longer exists.');
    const existing = await Analysis.findOne({ where: { jobKey: input.jobKey }, transaction });
    if (existing) return { analysis: existing, created: false };
    const captures = await readyCaptures(shot.id, transaction);
    if (captures.length === 0) throw conflict('This shot has no capture that has been read yet; upload a file first.');
    const last = (await Analysis.max('version', { where: { shotId: shot.id }, transaction })) as number | null;
    const analysis = await Analysis.create(
      {
        labId: shot.labId,
        shotId: shot.id,
        version: (last ?? 0) + 1,
        parameters: parsed.data,
        engineVersion: ENGINE_VERSION,
        jobKey: input.jobKey,
        requestedBy: input.requestedBy,
        captureIds: captures.map((c) => c.id),
        batchId: input.batchId ?? null,
        previousAnalysisId: input.previousAnalysisId ?? null,
      },
      { transaction },
    );
    await settleShot(shot.id, transaction);
    return { analysis, created: true };
  };
  return outer ? work(outer) : sequelize.transaction(work);
}

/** A zod error of the parameter set as one line a person can act on: "threshold.level: …; smoothing: …". */
export function parameterProblems(error: { issues: { path: PropertyKey[]; message: string }[] }): string {
  return error.issues.map((i) => `${i.path.map(String).join('.') || 'parameters'}: ${i.message}`).join('; ');
}

/** Captures still being read, or analyses not yet finished: the shot is busy. */
export async function shotIsBusy(shotId: string): Promise<boolean> {
  const [captures, analyses] = await Promise.all([
    Capture.count({ where: { shotId, removedAt: null, state: { [Op.in]: ['queued', 'reading'] } } }),
    Analysis.count({ where: { shotId, state: { [Op.in]: ['queued', 'running'] } } }),
  ]);
  return captures + analyses > 0;
}

/**
 * Once no file of the shot is still being read, the files that were read get their automatic analysis, keyed by
 * exactly which capture attempts it reads (so a set that already has one gets no other). Runs inside `transaction`,
 * which holds the shot's row lock (server/modules/shots/end-capture-read.ts takes it before the capture's final
 * state is written): so the files of the shot are seen as they are, and a file another job is ending waits for this
 * one. Returns the version (`analysisId`, or null when none is due) and its job to queue once the transaction is
 * committed, or null: none when the version is running or done, or when `precomputed` fits it. Numbers worked out
 * already for exactly these captures and parameters (by the API, in the thread that read the upload: uploads.ts)
 * are stored on the version here, in this transaction (finishVersion), with `withdrawn` to audit after the commit:
 * no job hand-over, no worker between them and the shot. Measured with the 10-million-sample upload (4 December
 * 2026), handing them to a job cost 15-45 ms between the capture being recorded as read and the job's commit.
 */
export async function automaticVersionIn(
  shot: Shot,
  transaction: Transaction,
  /** Numbers already worked out for these captures and parameters (uploads.ts): stored on the version when they fit. */
  precomputed?: PrecomputedVersion,
): Promise<{ created: boolean; analysisId: string | null; job: AnalysisJobData | null; withdrawn: WithdrawnReview | null }> {
  const none = { created: false, analysisId: null, job: null, withdrawn: null };
  if (shot.deletedAt) return none;
  const pending = await Capture.count({ where: { shotId: shot.id, removedAt: null, state: { [Op.in]: ['queued', 'reading'] } }, transaction });
  if (pending > 0) return none;
  const ready = await readyCaptures(shot.id, transaction);
  if (ready.length === 0) return none;
  const key = createHash('sha256').update(ready.map((c) => `${c.id}:${c.ingestAttempt}`).join(',')).digest('hex').slice(0, 32);
  const parameters = await defaultParameters(shot, combinedChannelNames(ready), transaction);
  const { analysis, created } = await createAnalysisVersion(
    shot.sequelize, { shotId: shot.id, parametersInput: parameters, requestedBy: null, jobKey: `auto-${shot.id}-${key}` }, transaction,
  );
  // A version made earlier whose job may never have reached Redis is queued again (its job id is fixed).
  const waiting = created || analysis.state === 'queued';
  const fits = precomputed !== undefined && JSON.stringify(precomputed.captureIds) === JSON.stringify(ready.map((c) => c.id))
    && JSON.stringify(precomputed.parameters) === JSON.stringify(parameters);
  if (waiting && fits) {
    const { withdrawn } = await finishVersion(analysis, precomputed.results, transaction, precomputed.ranAt);
    return { created, analysisId: analysis.id, job: null, withdrawn };
  }
  return { created, analysisId: analysis.id, job: waiting ? { analysisId: analysis.id } : null, withdrawn: null };
}

/** The automatic version's numbers worked out before its version was made, with when the engine ran. */
export type PrecomputedVersion = NonNullable<AnalysisJobData['precomputed']> & { ranAt?: { startedAt: Date; completedAt: Date } };
