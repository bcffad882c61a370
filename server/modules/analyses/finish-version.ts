import { Op, type Transaction } from 'sequelize';
import { Analysis, Shot } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';

/** A review request withdrawn because a newer version became current, to audit once the transaction is committed. */
export interface WithdrawnReview {
  labId: string;
  shotId: string;
  reviewedAnalysisId: string;
  /** The version whose finishing withdrew it. */
  version: number;
}

/**
 * Makes the finished version the shot's current one when it is the newest; returns the withdrawn review request's
 * details when an older version was waiting for review.
 */
async function makeCurrentVersion(analysis: Analysis, transaction: Transaction): Promise<WithdrawnReview | null> {
  const shot = await Shot.findByPk(analysis.shotId, { transaction, lock: transaction.LOCK.UPDATE });
  if (!shot) return null;
  const current = shot.currentAnalysisId ? await Analysis.findByPk(shot.currentAnalysisId, { transaction }) : null;
  if (current && current.version >= analysis.version) return null;
  // A newer version becomes current whatever the review state, and needs a review of its own: an approval of an
  // older version stays on record (shots.approved_analysis_id, the reviews table); a pending request about an
  // older version is withdrawn, so a reviewer never signs off numbers that are no longer the shot's.
  const wasInReview = shot.status === 'in_review' ? shot.reviewAnalysisId : null;
  await shot.update({ currentAnalysisId: analysis.id, reviewAnalysisId: null }, { transaction });
  return wasInReview ? { labId: shot.labId, shotId: shot.id, reviewedAnalysisId: wasInReview, version: analysis.version } : null;
}

/**
 * Stores a version's results (state "done") and makes it the shot's current one when it is the newest, in
 * `transaction`; the caller settles the shot's status in the same transaction, so nobody reads the new current
 * version beside the old status. Only a version not done yet is written (`finished` false otherwise). `ranAt`: when
 * the engine ran, when that was not in this job (default: started when the version was marked running, ended now).
 * Used by the analysis job, and by the API for the automatic version of an upload it read and worked out itself.
 */
export async function finishVersion(
  analysis: Analysis,
  results: Record<string, unknown>,
  transaction: Transaction,
  ranAt?: { startedAt: Date; completedAt: Date },
): Promise<{ finished: boolean; withdrawn: WithdrawnReview | null }> {
  const [updated] = await Analysis.update(
    {
      state: 'done', progress: 100, results: JSON.parse(JSON.stringify(results)) as Record<string, unknown>, error: null,
      completedAt: ranAt?.completedAt ?? new Date(), ...(ranAt && { startedAt: ranAt.startedAt }),
    },
    { where: { id: analysis.id, state: { [Op.ne]: 'done' } }, transaction },
  );
  if (updated === 0) return { finished: false, withdrawn: null };
  return { finished: true, withdrawn: await makeCurrentVersion(analysis, transaction) };
}

/** Audits a review request withdrawn by finishVersion (after the commit). */
export async function auditWithdrawnReview(withdrawn: WithdrawnReview): Promise<void> {
  await recordAudit({
    labId: withdrawn.labId, actorId: null, action: 'review.withdrawn', targetType: 'shot', targetId: withdrawn.shotId,
    details: { reason: `analysis version ${withdrawn.version} finished while an older version was in review`, reviewedAnalysisId: withdrawn.reviewedAnalysisId },
  });
}
