import { Op } from 'sequelize';
import {
  commentBody, reviewDecisionBody, reviewRequestBody,
  type CommentBody, type ReviewDecisionBody, type ReviewRequestBody,
} from '../../../shared/contracts/review.ts';
import { Analysis, AuditEvent, Campaign, Review, ReviewRequest, Shot, ShotComment } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { badRequest } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { TIME_BASE_ATTRIBUTES, timeBaseStatus } from '../analyses/time-base-status.ts';
import { notifyQueueOn, notifySafely, reviewersOf } from '../notifications/notify-people.ts';
import { labOfShot, shotInLab } from '../shots/routes.ts';
import { shotSummary } from '../shots/view.ts';
import { namesOf, person } from './people.ts';
import { decideReview, requestReview } from './service.ts';

const finiteOrNull = (x: unknown) => (typeof x === 'number' && Number.isFinite(x) ? x : null);

/**
 * Review workflow of a shot (status in shots.status):
 *   analysed | returned --request--> in_review --approved--> approved
 *                                              --returned--> returned
 * A request is about the current analysis version, which must be done; the version is remembered in
 * shots.review_analysis_id. Approval copies it to shots.approved_analysis_id. A later finished recomputation
 * (worker/processors/analyse-shot.ts) makes the new version current and puts the shot back to `analysed`, withdrawing
 * a pending request; earlier requests and decisions stay on record.
 */
export function reviewRoutes(deps: Deps): RouteDef[] {
  const log = (what: string) => (err: Error) => deps.logger.warn({ err: err.message }, `${what}: notification not queued`);
  return [
    {
      method: 'post',
      path: '/api/shots/:shotId/review-requests',
      access: { kind: 'lab', permission: 'reviews:request', labOf: labOfShot },
      summary: "Send the shot's current analysis version for review; the lab's reviewers are told by e-mail. A version marked \"check the time base\" " +
        'and not yet confirmed may be sent, but the answer carries a warning (warnings: [{code: "time_base_unchecked", message}]; empty otherwise): it cannot be signed off until confirmed',
      body: reviewRequestBody,
      response: { status: 201, description: 'The request and the shot, now in review' },
      async handler(req, res) {
        const { message } = req.body as ReviewRequestBody;
        const userId = req.auth!.userId;
        const { shot, request, analysis, warnings } = await requestReview(deps.sequelize, { shotId: req.params.shotId as string, labId: req.lab!.id, userId, message, ip: clientIp(req) });
        await notifySafely(notifyQueueOn(deps.redis), async () => ({
          kind: 'reviewRequested', labId: shot.labId, shotId: shot.id, eventId: request.id,
          recipientIds: (await reviewersOf(shot.labId)).filter((id) => id !== userId),
        }), log('review requested'));
        const names = await namesOf([userId]);
        res.status(201).json({
          request: { id: request.id, analysisId: analysis.id, analysisVersion: analysis.version, message: request.message, requestedBy: person(names, userId), requestedAt: request.createdAt },
          shot: shotSummary(shot),
          warnings,
        });
      },
    },
    {
      method: 'get',
      path: '/api/labs/:labId/review-queue',
      access: { kind: 'lab', permission: 'reviews:queue' },
      summary: 'Shots waiting for review, oldest request first, with speed ± U, who asked, the version under review and whether it is marked "check the time base"',
      async handler(req, res) {
        const labId = req.lab!.id;
        const shots = await Shot.findAll({ where: { labId, status: 'in_review', deletedAt: null } });
        const analysisIds = shots.map((s) => s.reviewAnalysisId ?? s.currentAnalysisId).filter((x): x is string => !!x);
        const [campaigns, analyses, requests] = await Promise.all([
          Campaign.findAll({ where: { labId, id: [...new Set(shots.map((s) => s.campaignId))] }, attributes: ['id', 'name'] }),
          Analysis.findAll({ where: { labId, id: analysisIds }, attributes: ['id', 'version', 'results', ...TIME_BASE_ATTRIBUTES] }),
          ReviewRequest.findAll({ where: { labId, shotId: shots.map((s) => s.id) }, order: [['createdAt', 'DESC'], ['id', 'DESC']] }),
        ]);
        const latest = new Map<string, ReviewRequest>();
        for (const r of requests) if (!latest.has(r.shotId)) latest.set(r.shotId, r);
        const names = await namesOf(requests.map((r) => r.requestedBy));
        const rows = shots.map((s) => {
          const analysis = analyses.find((a) => a.id === (s.reviewAnalysisId ?? s.currentAnalysisId));
          const speed = (analysis?.results as { speed?: Record<string, unknown> | null } | null)?.speed ?? null;
          const request = latest.get(s.id);
          const value = finiteOrNull(speed?.value);
          const check = analysis ? timeBaseStatus(analysis) : null;
          return {
            shotId: s.id, campaignId: s.campaignId, campaignName: campaigns.find((c) => c.id === s.campaignId)?.name ?? null, number: s.number,
            firedAt: s.firedAt,
            speed: value == null ? null : { value, uncertainty: finiteOrNull(speed?.uncertainty), method: typeof speed?.method === 'string' ? speed.method : null },
            analysisId: analysis?.id ?? null, analysisVersion: analysis?.version ?? null,
            /** "Check the time base": flagged, and whether that still blocks approval (no confirmation yet). */
            timeBaseCheck: check ? { flagged: check.flagged, blocksApproval: check.blocksApproval } : null,
            requestId: request?.id ?? null, requestedBy: person(names, request?.requestedBy), requestedAt: request?.createdAt ?? null, message: request?.message ?? '',
          };
        });
        rows.sort((a, b) => (a.requestedAt?.getTime() ?? 0) - (b.requestedAt?.getTime() ?? 0) || a.number - b.number);
        res.json({ shots: rows });
      },
    },
    {
      method: 'post',
      path: '/api/shots/:shotId/reviews',
      access: { kind: 'lab', permission: 'reviews:decide', labOf: labOfShot },
      summary:
        'Approve (sign off the version under review) or return the shot with a comment saying what to fix. Approval of a version ' +
        'marked "check the time base" is refused (409, code time_base_unchecked) until an analyst confirms its time base',
      body: reviewDecisionBody,
      response: { status: 201, description: 'The decision and the shot' },
      async handler(req, res) {
        const { decision, comment } = req.body as ReviewDecisionBody;
        const userId = req.auth!.userId;
        const { shot, review, version, request } = await decideReview(deps.sequelize, { shotId: req.params.shotId as string, labId: req.lab!.id, userId, decision, comment, ip: clientIp(req) });
        await notifySafely(notifyQueueOn(deps.redis), {
          kind: decision, labId: shot.labId, shotId: shot.id, eventId: review.id, recipientIds: [request?.requestedBy],
        }, log(`review ${decision}`));
        const names = await namesOf([userId]);
        res.status(201).json({
          review: { id: review.id, decision, comment: review.comment, reviewer: person(names, userId), analysisId: review.analysisId, analysisVersion: version, decidedAt: review.createdAt },
          shot: shotSummary(shot),
        });
      },
    },
    {
      method: 'get',
      path: '/api/shots/:shotId/reviews',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfShot },
      summary: "The shot's review history, oldest first: requests and decisions with comments, people and analysis versions",
      async handler(req, res) {
        const shot = await shotInLab(req);
        const [requests, reviews] = await Promise.all([
          ReviewRequest.findAll({ where: { shotId: shot.id } }),
          Review.findAll({ where: { shotId: shot.id } }),
        ]);
        const versions = new Map((await Analysis.findAll({
          where: { shotId: shot.id, id: [...requests, ...reviews].map((r) => r.analysisId) }, attributes: ['id', 'version'],
        })).map((a) => [a.id, a.version]));
        const names = await namesOf([...requests.map((r) => r.requestedBy), ...reviews.map((r) => r.reviewerId)]);
        const history = [
          ...requests.map((r) => ({
            type: 'request' as const, id: r.id, at: r.createdAt, by: person(names, r.requestedBy), analysisId: r.analysisId,
            analysisVersion: versions.get(r.analysisId) ?? null, message: r.message,
          })),
          ...reviews.map((r) => ({
            type: 'decision' as const, id: r.id, at: r.createdAt, by: person(names, r.reviewerId), analysisId: r.analysisId,
            analysisVersion: versions.get(r.analysisId) ?? null, decision: r.decision, comment: r.comment, requestId: r.requestId,
          })),
        ].sort((a, b) => a.at.getTime() - b.at.getTime() || (a.type === b.type ? 0 : a.type === 'request' ? -1 : 1));
        res.json({
          status: shot.status,
          currentAnalysisId: shot.currentAnalysisId,
          reviewAnalysisId: shot.reviewAnalysisId,
          approvedAnalysisId: shot.approvedAnalysisId,
          approvedAnalysisVersion: shot.approvedAnalysisId ? versions.get(shot.approvedAnalysisId) ?? null : null,
          history,
        });
      },
    },
    {
      method: 'get',
      path: '/api/shots/:shotId/comments',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfShot },
      summary: "The shot's comments, oldest first; `replyTo` names the comment a reply answers",
      async handler(req, res) {
        const shot = await shotInLab(req);
        const rows = await ShotComment.findAll({ where: { shotId: shot.id }, order: [['createdAt', 'ASC'], ['id', 'ASC']] });
        const names = await namesOf(rows.map((c) => c.authorId));
        res.json({ comments: rows.map((c) => ({ id: c.id, body: c.body, replyTo: c.replyTo, author: person(names, c.authorId), createdAt: c.createdAt })) });
      },
    },
    {
      method: 'post',
      path: '/api/shots/:shotId/comments',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfShot },
      summary: 'Comment on the shot (anyone in the lab), optionally as a reply to another comment',
      body: commentBody,
      response: { status: 201, description: 'The new comment' },
      async handler(req, res) {
        const shot = await shotInLab(req);
        const { body, replyTo } = req.body as CommentBody;
        if (replyTo && !(await ShotComment.count({ where: { id: replyTo, shotId: shot.id } }))) {
          throw badRequest('Please correct the request: replyTo: no such comment on this shot.');
        }
        const userId = req.auth!.userId;
        const c = await ShotComment.create({ labId: shot.labId, shotId: shot.id, authorId: userId, body, replyTo: replyTo ?? null });
        await recordAudit({ labId: shot.labId, actorId: userId, action: 'comment.added', targetType: 'shot', targetId: shot.id, details: { commentId: c.id, replyTo: c.replyTo }, ip: clientIp(req) });
        const names = await namesOf([userId]);
        res.status(201).json({ comment: { id: c.id, body: c.body, replyTo: c.replyTo, author: person(names, userId), createdAt: c.createdAt } });
      },
    },
    {
      method: 'get',
      path: '/api/shots/:shotId/audit',
      access: { kind: 'lab', permission: 'audit:read', labOf: labOfShot },
      summary: "The shot's audit trail, oldest first (append-only: no route edits or deletes an event)",
      async handler(req, res) {
        const shot = await shotInLab(req);
        const rows = await AuditEvent.findAll({ where: { labId: shot.labId, targetType: 'shot', targetId: { [Op.eq]: shot.id } }, order: [['id', 'ASC']] });
        const names = await namesOf(rows.map((e) => e.actorId));
        res.json({
          events: rows.map((e) => ({
            id: e.id, at: e.createdAt, action: e.action, actor: e.actorId ? names.get(e.actorId) ?? null : null, actorId: e.actorId,
            targetType: e.targetType, targetId: e.targetId, details: e.details,
          })),
        });
      },
    },
  ];
}
