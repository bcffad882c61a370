import type { Sequelize } from 'sequelize';
import type { ReviewDecision } from '../../../shared/contracts/review.ts';
import { Analysis, Review, ReviewRequest, Shot } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { conflict, notFound } from '../../lib/errors.ts';
import { TIME_BASE_ATTRIBUTES, timeBaseStatus, timeBaseUncheckedError } from '../analyses/time-base-status.ts';
import { settleShot } from '../shots/settle-shot.ts';

/**
 * Sends a shot's current analysis version for review, audited: the one way a request is made, for the route and
 * the demo's opening scene (server/db/seeders/demo-reviews.ts). Notifying the reviewers is the caller's part.
 */
export async function requestReview(sequelize: Sequelize, input: { shotId: string; labId: string; userId: string; message?: string; ip?: string | null }) {
  const { userId } = input;
  const { shot, request, analysis } = await sequelize.transaction(async (transaction) => {
    const shot = await Shot.findOne({ where: { id: input.shotId, labId: input.labId }, transaction, lock: transaction.LOCK.UPDATE });
    if (!shot) throw notFound('No such shot.');
    if (shot.status === 'in_review') throw conflict('This shot is already waiting for review.');
    if (shot.status === 'approved') throw conflict('This shot is already signed off; recompute it to make a new version that can be reviewed.');
    const analysis = shot.currentAnalysisId ? await Analysis.findByPk(shot.currentAnalysisId, { transaction, attributes: ['id', 'version', 'state', 'results', ...TIME_BASE_ATTRIBUTES] }) : null;
    if (!analysis || analysis.state !== 'done') throw conflict('This shot has no finished analysis to review yet; wait for the analysis to finish (or upload a capture first).');
    if (shot.status === 'processing') throw conflict('A recomputation of this shot is still running; send it for review when it has finished.');
    const request = await ReviewRequest.create({ labId: shot.labId, shotId: shot.id, analysisId: analysis.id, requestedBy: userId, message: input.message ?? '' }, { transaction });
    await shot.update({ reviewAnalysisId: analysis.id }, { transaction });
    await settleShot(shot.id, transaction);
    await shot.reload({ transaction });
    return { shot, request, analysis };
  });
  // Sending a version marked "check the time base" is allowed (a reviewer may return it, asking for the fix), but the
  // sender is warned, the audit entry records it, and only its sign-off is refused (decideReview).
  const timeBaseUnchecked = timeBaseStatus(analysis).blocksApproval;
  await recordAudit({ labId: shot.labId, actorId: userId, action: 'review.requested', targetType: 'shot', targetId: shot.id, details: { requestId: request.id, version: analysis.version, message: request.message, ...(timeBaseUnchecked ? { timeBaseUnchecked: true } : {}) }, ip: input.ip ?? null });
  const warnings = timeBaseUnchecked
    ? [{ code: 'time_base_unchecked', message: `Version ${analysis.version} is marked "check the time base": a reviewer can return it but cannot sign it off until an analyst confirms the read ("I checked the time base") or fixes it in a new version.` }]
    : [];
  return { shot, request, analysis, warnings };
}

/**
 * Signs off (approves) or returns the version under review, audited: the one way a decision is recorded, for the
 * route and the demo's opening scene. Approval of a version marked "check the time base" is refused until confirmed.
 */
export async function decideReview(sequelize: Sequelize, input: { shotId: string; labId: string; userId: string; decision: ReviewDecision; comment?: string; ip?: string | null }) {
  const { userId, decision } = input;
  const { shot, review, version, request } = await sequelize.transaction(async (transaction) => {
    const shot = await Shot.findOne({ where: { id: input.shotId, labId: input.labId }, transaction, lock: transaction.LOCK.UPDATE });
    if (!shot) throw notFound('No such shot.');
    if (shot.status !== 'in_review' || !shot.reviewAnalysisId) {
      throw conflict(`This shot is not waiting for review (it is ${shot.status.replace('_', ' ')}); someone must send it for review first.`);
    }
    const analysisId = shot.reviewAnalysisId;
    if (decision === 'approved') {
      const reviewed = await Analysis.findByPk(analysisId, { transaction });
      if (reviewed && timeBaseStatus(reviewed).blocksApproval) throw timeBaseUncheckedError(reviewed);
    }
    const request = await ReviewRequest.findOne({ where: { shotId: shot.id, analysisId }, order: [['createdAt', 'DESC'], ['id', 'DESC']], transaction });
    const review = await Review.create({ labId: shot.labId, shotId: shot.id, analysisId, reviewerId: userId, decision, comment: input.comment ?? '', requestId: request?.id ?? null }, { transaction });
    await shot.update(decision === 'approved' ? { approvedAnalysisId: analysisId, reviewAnalysisId: null } : { reviewAnalysisId: null }, { transaction });
    await settleShot(shot.id, transaction);
    await shot.reload({ transaction });
    const version = (await Analysis.findByPk(analysisId, { attributes: ['version'], transaction }))?.version ?? null;
    return { shot, review, version, request };
  });
  await recordAudit({ labId: shot.labId, actorId: userId, action: `review.${decision}`, targetType: 'shot', targetId: shot.id, details: { reviewId: review.id, version, comment: review.comment }, ip: input.ip ?? null });
  return { shot, review, version, request };
}
