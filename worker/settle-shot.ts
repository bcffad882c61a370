import { createHash } from 'node:crypto';
import { Op } from 'sequelize';
import { Capture, Shot } from '../server/db/models/index.ts';
import { combinedChannelNames, createAnalysisVersion, defaultParameters, readyCaptures } from '../server/modules/analyses/service.ts';
import { settleShot } from '../server/modules/shots/settle-shot.ts';
import { workerContext } from './context.ts';

/**
 * After a capture of the shot finished reading, well or badly: once no file of the shot is still being read, the
 * files that were read get their automatic analysis (unless that exact set already has one), and the shot's status
 * is written. So a bad file beside a good one ends in a result, whichever of the two finishes last.
 */
export async function afterCaptureFinished(shotId: string): Promise<Shot | null> {
  const { sequelize, queues, logger } = workerContext();
  // Pending first, then ready: once nothing is pending, the ready set read afterwards is final, so two ingests
  // finishing together compute the same key. Read the other way round, one could key a stale ready set (itself
  // only) while the other capture turned ready in between, and the shot got two automatic analyses.
  const pending = await Capture.count({ where: { shotId, removedAt: null, state: { [Op.in]: ['queued', 'reading'] } } });
  const ready = pending === 0 ? await readyCaptures(shotId) : [];
  const shot = await Shot.findByPk(shotId);
  if (shot && !shot.deletedAt && ready.length > 0) {
    // Keyed by exactly which capture attempts it reads: two ingests finishing together make one analysis.
    const key = createHash('sha256').update(ready.map((c) => `${c.id}:${c.ingestAttempt}`).join(',')).digest('hex').slice(0, 32);
    const parameters = await defaultParameters(shot, combinedChannelNames(ready));
    const { analysis, created } = await createAnalysisVersion(sequelize, { shotId, parametersInput: parameters, requestedBy: null, jobKey: `auto-${shotId}-${key}` });
    if (created || analysis.state === 'queued') await queues.addAnalysisOrDefer({ analysisId: analysis.id }, logger);
  }
  return settleShot(shotId);
}
