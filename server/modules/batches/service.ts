import { literal, Op, type FindAttributeOptions, type Sequelize } from 'sequelize';
import { applySettings, type AnalysisSettings } from '../../../shared/contracts/analysis-settings.ts';
import { analysisOptionsSchema, type AnalysisOptionsInput } from '../../../shared/contracts/analysis.ts';
import { Analysis, AnalysisBatch, Capture, Shot, User, type SkippedShot } from '../../db/models/index.ts';
import { badRequest, conflict } from '../../lib/errors.ts';
import { combinedChannelNames, createAnalysisVersion, defaultParameters, parameterProblems, readyCaptures } from '../analyses/service.ts';
import { compareOutcomes, outcomeOf } from './compare-results.ts';

interface PlannedShot { shot: Shot; parameters: AnalysisOptionsInput; previousAnalysisId: string | null }

/**
 * Works out each chosen shot's new parameters (its current version's, or its defaults, with the settings laid over
 * them) and checks every one before anything is stored: a setting the engine refuses, or a gate on a channel a shot
 * does not have, refuses the whole batch with one line per problem. Shots with no file read yet, or with files still
 * being read, are left out with the reason.
 */
async function planBatch(shots: Shot[], settings: AnalysisSettings): Promise<{ planned: PlannedShot[]; skipped: SkippedShot[] }> {
  const planned: PlannedShot[] = [];
  const skipped: SkippedShot[] = [];
  const problems: string[] = [];
  for (const shot of shots) {
    const pending = await Capture.count({ where: { shotId: shot.id, state: { [Op.in]: ['queued', 'reading'] } } });
    if (pending > 0) {
      skipped.push({ shotId: shot.id, number: shot.number, reason: 'its files are still being read' });
      continue;
    }
    const ready = await readyCaptures(shot.id);
    if (ready.length === 0) {
      skipped.push({ shotId: shot.id, number: shot.number, reason: 'it has no file that could be read' });
      continue;
    }
    const channels = combinedChannelNames(ready);
    const current = shot.currentAnalysisId ? await Analysis.findByPk(shot.currentAnalysisId, { attributes: ['id', 'parameters'] }) : null;
    const base = (current?.parameters as AnalysisOptionsInput | undefined) ?? (await defaultParameters(shot, channels));
    const parameters = applySettings(base, settings);
    const parsed = analysisOptionsSchema.safeParse(parameters);
    if (!parsed.success) {
      problems.push(`shot #${shot.number}: ${parameterProblems(parsed.error)}`);
      continue;
    }
    const unknown = (parsed.data.gates ?? []).map((g) => g.channel).filter((c) => !channels.includes(c));
    if (unknown.length > 0) {
      problems.push(`shot #${shot.number}: gates.channel: ${[...new Set(unknown)].map((c) => `"${c}"`).join(', ')} is not a channel of this shot (it has ${channels.join(', ')})`);
      continue;
    }
    planned.push({ shot, parameters: parsed.data, previousAnalysisId: current?.id ?? null });
  }
  if (problems.length > 0) {
    throw badRequest(`Nothing was queued. Please correct the settings: ${problems.join('; ')}`, { problems });
  }
  return { planned, skipped };
}

/**
 * A batch recompute: one new analysis version per chosen shot, all made in one transaction together with the batch
 * row (rows before jobs), keyed `batch-<batch>-<shot>` so a rerun adds nothing. The caller queues the jobs after.
 */
export async function createBatch(
  sequelize: Sequelize,
  input: { labId: string; campaignId: string; settings: AnalysisSettings; shotIds: string[] | 'all'; requestedBy: string },
): Promise<{ batch: AnalysisBatch; analyses: Analysis[] }> {
  const where = input.shotIds === 'all'
    ? { campaignId: input.campaignId, labId: input.labId }
    : { campaignId: input.campaignId, labId: input.labId, id: { [Op.in]: input.shotIds } };
  const shots = await Shot.findAll({ where, order: [['number', 'ASC']] });
  if (input.shotIds !== 'all') {
    const found = new Set(shots.map((s) => s.id));
    const missing = input.shotIds.filter((id) => !found.has(id));
    if (missing.length > 0) throw badRequest(`Please correct the request: shotIds: ${missing.join(', ')} is not a shot of this campaign.`);
  }
  if (shots.length === 0) throw conflict('This campaign has no shots to recompute.');
  const { planned, skipped } = await planBatch(shots, input.settings);
  if (planned.length === 0) {
    throw conflict(`None of the chosen shots can be recomputed: ${skipped.map((s) => `#${s.number}: ${s.reason}`).join('; ')}.`);
  }
  return sequelize.transaction(async (transaction) => {
    const batch = await AnalysisBatch.create(
      {
        labId: input.labId, campaignId: input.campaignId, settings: input.settings as Record<string, unknown>,
        shotIds: planned.map((p) => p.shot.id), skipped, requestedBy: input.requestedBy,
      },
      { transaction },
    );
    const analyses: Analysis[] = [];
    // Shots are locked one after another in shot-number order, the same order in every batch.
    for (const p of planned) {
      const { analysis } = await createAnalysisVersion(
        sequelize,
        {
          shotId: p.shot.id, parametersInput: p.parameters, requestedBy: input.requestedBy, jobKey: `batch-${batch.id}-${p.shot.id}`,
          batchId: batch.id, previousAnalysisId: p.previousAnalysisId,
        },
        transaction,
      );
      analyses.push(analysis);
    }
    return { batch, analyses };
  });
}

export type BatchState = 'running' | 'done';

/** Only the parts of stored results the table reads (results also hold every channel's transitions). */
const OUTCOME_ATTRIBUTES = [
  'id', 'shotId', 'version', 'state', 'error', 'previousAnalysisId',
  [literal(`results -> 'speed'`), 'speed'], [literal(`results -> 'gates'`), 'gates'], [literal(`results -> 'warnings'`), 'warnings'],
] as FindAttributeOptions;

interface OutcomeRow { id: string; shotId: string; version: number; state: 'queued' | 'running' | 'done' | 'failed'; error: string | null; previousAnalysisId: string | null; speed: unknown; gates: unknown; warnings: unknown }

/** The batch itself, its progress counted from its versions' states, and who asked for it. */
async function batchSummary(batch: AnalysisBatch, states?: string[]) {
  const [versionStates, requester] = await Promise.all([
    states ?? Analysis.findAll({ where: { batchId: batch.id, labId: batch.labId }, attributes: ['state'] }).then((rows) => rows.map((r) => r.state as string)),
    batch.requestedBy ? User.findByPk(batch.requestedBy, { attributes: ['name'] }) : null,
  ]);
  const counts = { total: versionStates.length, queued: 0, running: 0, done: 0, failed: 0 };
  for (const state of versionStates) counts[state as 'queued' | 'running' | 'done' | 'failed'] += 1;
  const state: BatchState = counts.queued + counts.running > 0 ? 'running' : 'done';
  return {
    id: batch.id,
    campaignId: batch.campaignId,
    settings: batch.settings,
    requestedBy: batch.requestedBy,
    requestedByName: requester?.name ?? null,
    createdAt: batch.createdAt,
    state,
    counts,
    skipped: batch.skipped,
  };
}

export const batchListView = (batch: AnalysisBatch) => batchSummary(batch);

/** A batch with its progress and, per shot, the speed before and after and what changed. */
export async function batchView(batch: AnalysisBatch) {
  const [versions, shots] = await Promise.all([
    Analysis.findAll({ where: { batchId: batch.id, labId: batch.labId }, attributes: OUTCOME_ATTRIBUTES, raw: true }) as unknown as Promise<OutcomeRow[]>,
    Shot.findAll({ where: { id: { [Op.in]: batch.shotIds }, labId: batch.labId }, attributes: ['id', 'number', 'status'] }),
  ]);
  const previousIds = versions.map((v) => v.previousAnalysisId).filter((id): id is string => id != null);
  const previous = previousIds.length === 0 ? [] : ((await Analysis.findAll({
    where: { id: { [Op.in]: previousIds }, labId: batch.labId }, attributes: OUTCOME_ATTRIBUTES, raw: true,
  })) as unknown as OutcomeRow[]);
  const byShot = new Map(shots.map((s) => [s.id, s]));
  const rows = versions
    .map((after) => {
      const before = previous.find((p) => p.id === after.previousAnalysisId) ?? null;
      const outBefore = outcomeOf(before);
      const outAfter = outcomeOf(after);
      const shot = byShot.get(after.shotId);
      return {
        shotId: after.shotId,
        number: shot?.number ?? null,
        shotStatus: shot?.status ?? null,
        before: before ? { analysisId: before.id, version: before.version, state: before.state, ...outBefore } : null,
        after: { analysisId: after.id, version: after.version, state: after.state, error: after.error, ...outAfter },
        // Compared only once the new version is done: a queued one has no speed yet.
        change: after.state === 'done' && before ? compareOutcomes(outBefore, outAfter) : null,
      };
    })
    .sort((a, b) => (a.number ?? 0) - (b.number ?? 0));
  return { batch: await batchSummary(batch, versions.map((v) => v.state)), shots: rows };
}
