import type { Sequelize } from 'sequelize';
import { Analysis, Campaign, Lab, ReviewRequest, Shot, User } from '../models/index.ts';
import { decideReview, requestReview } from '../../modules/reviews/service.ts';

/**
 * The demo's opening scene of review (invented, like the rest of the scenario): once the worker has analysed the
 * sweep's files, Priya Okafor (analyst) sends shots 3 and 5 for review and Tomas Reyl (experimenter) shot 7; Marek
 * Vintner (reviewer) signs off shot 3 and returns shot 5, whose gate C missed, with a comment. So the demo opens with
 * work for every role: a shot waiting in the reviewer's queue, one returned to the analyst, one signed off, and
 * their audit entries. Recorded through the same review service the API's routes use.
 */
export const DEMO_REVIEW_SCENE = {
  approved: { number: 3, by: 'priya.okafor@hollowmere.example', message: 'Three-gate fit, residuals flat. Ready for the autumn report.', comment: 'Signed off for the autumn report.' },
  returned: {
    number: 5, by: 'priya.okafor@hollowmere.example', message: 'Gate C missed (its dip reached about 40 %); the speed comes from gates A and B.',
    comment: 'This rests on one gate pair. Please write the gate C alignment check (logged with shot 6) into this shot’s notes, so the file says why C missed, then send it again.',
  },
  waiting: { number: 7, by: 'tomas.reyl@hollowmere.example', message: 'Best vacuum of the day so far (1.5 kPa). Fired with the new ear defenders on the bench.' },
  reviewer: 'marek.vintner@hollowmere.example',
} as const;

export type DemoReviewOutcome = 'recorded' | 'already-recorded' | 'not-seeded' | 'not-analysed';

/**
 * Records the scene once the three shots are analysed (waiting up to `waitMs` for the worker, checking every
 * `pollMs`). Runs once: a lab that already has review requests is left as it is.
 */
export async function recordDemoReviews(sequelize: Sequelize, options: { waitMs?: number; pollMs?: number } = {}): Promise<DemoReviewOutcome> {
  const { waitMs = 0, pollMs = 1000 } = options;
  const lab = await Lab.findOne({ where: { slug: 'hollowmere' } });
  const campaign = lab && (await Campaign.findOne({ where: { labId: lab.id, name: 'Vacuum sweep, autumn 2026' } }));
  if (!lab || !campaign) return 'not-seeded';
  if ((await ReviewRequest.count({ where: { labId: lab.id } })) > 0) return 'already-recorded';
  const scene = DEMO_REVIEW_SCENE;
  const numbers = [scene.approved.number, scene.returned.number, scene.waiting.number];
  const until = Date.now() + waitMs;
  let shots: Shot[] = [];
  for (;;) {
    shots = await Shot.findAll({ where: { campaignId: campaign.id, number: numbers } });
    const ready = await Promise.all(shots.map(async (s) => s.status === 'analysed' && !!s.currentAnalysisId && (await Analysis.findByPk(s.currentAnalysisId, { attributes: ['state'] }))?.state === 'done'));
    if (shots.length === numbers.length && ready.every(Boolean)) break;
    if (Date.now() >= until) return 'not-analysed';
    await new Promise((resolve) => setTimeout(resolve, pollMs));
  }
  const people = await User.findAll({ where: { email: [scene.approved.by, scene.waiting.by, scene.reviewer] } });
  const id = (email: string) => people.find((u) => u.email === email)!.id;
  const shotId = (n: number) => shots.find((s) => s.number === n)!.id;
  const labId = lab.id;
  await requestReview(sequelize, { shotId: shotId(scene.approved.number), labId, userId: id(scene.approved.by), message: scene.approved.message });
  await decideReview(sequelize, { shotId: shotId(scene.approved.number), labId, userId: id(scene.reviewer), decision: 'approved', comment: scene.approved.comment });
  await requestReview(sequelize, { shotId: shotId(scene.returned.number), labId, userId: id(scene.returned.by), message: scene.returned.message });
  await decideReview(sequelize, { shotId: shotId(scene.returned.number), labId, userId: id(scene.reviewer), decision: 'returned', comment: scene.returned.comment });
  await requestReview(sequelize, { shotId: shotId(scene.waiting.number), labId, userId: id(scene.waiting.by), message: scene.waiting.message });
  return 'recorded';
}
