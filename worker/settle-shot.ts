import { Capture, Shot } from '../server/db/models/index.ts';

/**
 * A shot still "processing" whose captures have all failed is marked failed, so its page and the campaign table
 * stop waiting for it. Returns the shot (null if it is gone).
 */
export async function settleShotFromCaptures(shotId: string): Promise<Shot | null> {
  const shot = await Shot.findByPk(shotId);
  if (!shot) return null;
  const states = (await Capture.findAll({ where: { shotId }, attributes: ['state'] })).map((c) => c.state);
  if (states.length > 0 && states.every((s) => s === 'failed') && shot.status === 'processing') {
    await shot.update({ status: 'failed' });
  }
  return shot;
}

/** After an analysis failed: a shot still "processing" with no current analysis is marked failed. */
export async function settleShotFromAnalysis(shotId: string): Promise<void> {
  const shot = await Shot.findByPk(shotId);
  if (shot && shot.status === 'processing' && !shot.currentAnalysisId) await shot.update({ status: 'failed' });
}
