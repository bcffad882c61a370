import type { Transaction } from 'sequelize';
import { deriveShotStatus, type ShotStatusInputs } from '../../../shared/contracts/shot-status.ts';
import { Analysis, Capture, Review, Shot } from '../../db/models/index.ts';
import { publishLabEvent } from '../../lib/lab-events.ts';

/** Where the current version stands in review, from the shot's pointers and the decisions recorded about it. */
async function reviewOfCurrent(shot: Shot, transaction: Transaction): Promise<ShotStatusInputs['review']> {
  const current = shot.currentAnalysisId;
  if (!current) return null;
  if (shot.reviewAnalysisId) return 'in_review';
  if (shot.approvedAnalysisId === current) return 'approved';
  const last = await Review.findOne({ where: { shotId: shot.id, analysisId: current }, order: [['createdAt', 'DESC'], ['id', 'DESC']], attributes: ['decision'], transaction });
  return last?.decision === 'returned' ? 'returned' : null;
}

async function settleIn(shotId: string, transaction: Transaction): Promise<Shot | null> {
  // The row lock orders concurrent settles (two jobs finishing together): the second reads what the first wrote.
  const shot = await Shot.findByPk(shotId, { transaction, lock: transaction.LOCK.UPDATE });
  if (!shot) return null;
  const [captures, analyses] = await Promise.all([
    Capture.findAll({ where: { shotId, removedAt: null }, attributes: ['state'], transaction }),
    Analysis.findAll({ where: { shotId }, attributes: ['id', 'state'], transaction }),
  ]);
  const hasCurrentVersion = !!shot.currentAnalysisId && analyses.some((a) => a.id === shot.currentAnalysisId && a.state === 'done');
  const status = deriveShotStatus({
    captures: captures.map((c) => c.state),
    analyses: analyses.map((a) => a.state),
    hasCurrentVersion,
    review: await reviewOfCurrent(shot, transaction),
  });
  if (shot.status !== status) await shot.update({ status }, { transaction });
  return shot;
}

/**
 * Writes the shot's status from its captures, versions and reviews (the rule is deriveShotStatus), then tells the
 * lab's event stream. Call it after every change to any of those, inside the change's transaction when it has one
 * (the event then goes out after the commit). Returns the shot, or null when it is gone.
 */
export async function settleShot(shotId: string, transaction?: Transaction): Promise<Shot | null> {
  const sequelize = Shot.sequelize!;
  const shot = transaction ? await settleIn(shotId, transaction) : await sequelize.transaction((t) => settleIn(shotId, t));
  if (!shot) return null;
  const event = { type: 'shot' as const, shotId: shot.id, campaignId: shot.campaignId, state: shot.status, currentVersionId: shot.currentAnalysisId ?? null };
  const publish = () => void publishLabEvent(shot.labId, event);
  if (transaction) transaction.afterCommit(publish);
  else publish();
  return shot;
}
