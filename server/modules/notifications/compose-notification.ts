import type { NotifyJobData } from '../../../shared/contracts/jobs.ts';
import type { NotificationKind } from '../../../shared/contracts/review.ts';
import { Analysis, Campaign, NotificationPreference, Review, ReviewRequest, Shot, User } from '../../db/models/index.ts';
import type { OutgoingMail } from '../../lib/mailer.ts';

/** Each person's choices; a person who never changed them gets every kind. */
export async function preferencesOf(userId: string): Promise<Record<NotificationKind, boolean>> {
  const row = await NotificationPreference.findByPk(userId);
  return {
    reviewRequested: row?.reviewRequested ?? true,
    approved: row?.approved ?? true,
    returned: row?.returned ?? true,
    jobFailed: row?.jobFailed ?? true,
  };
}

/**
 * The e-mail for one notification job, read fresh from the database when it is sent; null when nothing should be
 * sent: the recipient turned this kind off, left, was disabled, or the shot is gone.
 */
export async function composeNotification(data: NotifyJobData, publicUrl: string): Promise<OutgoingMail | null> {
  const user = await User.findByPk(data.recipientId);
  if (!user || user.disabledAt) return null;
  if (!(await preferencesOf(user.id))[data.kind]) return null;
  const shot = await Shot.findOne({ where: { id: data.shotId, labId: data.labId } });
  if (!shot) return null;
  const campaign = await Campaign.findByPk(shot.campaignId, { attributes: ['name'] });
  const what = `shot #${shot.number} of ${campaign?.name ?? 'a campaign'}`;
  const link = `${publicUrl.replace(/\/$/, '')}/labs/${shot.labId}/shots/${shot.id}`;
  const nameOf = async (id: string | null) => (id ? (await User.findByPk(id, { attributes: ['name'] }))?.name ?? 'someone' : 'someone');
  const versionOf = async (id: string) => (await Analysis.findByPk(id, { attributes: ['version'] }))?.version;
  const lines: string[] = [`Hello ${user.name},`, ''];
  let subject: string;
  if (data.kind === 'reviewRequested') {
    const request = await ReviewRequest.findByPk(data.eventId);
    const version = request ? await versionOf(request.analysisId) : undefined;
    subject = `Review requested: ${what}`;
    lines.push(`${await nameOf(request?.requestedBy ?? null)} asks for a review of ${what}${version ? ` (analysis version ${version})` : ''}.`);
    if (request?.message) lines.push('', `Their note: ${request.message}`);
  } else if (data.kind === 'approved' || data.kind === 'returned') {
    const review = await Review.findByPk(data.eventId);
    const version = review ? await versionOf(review.analysisId) : undefined;
    const reviewer = await nameOf(review?.reviewerId ?? null);
    subject = data.kind === 'approved' ? `Signed off: ${what}` : `Returned for changes: ${what}`;
    lines.push(data.kind === 'approved'
      ? `${reviewer} signed off ${what}${version ? ` (analysis version ${version})` : ''}.`
      : `${reviewer} returned ${what}${version ? ` (analysis version ${version})` : ''} with this comment:`);
    if (review?.comment) lines.push('', review.comment);
  } else {
    subject = `Processing failed: ${what}`;
    lines.push(`Gatepost could not finish processing ${what}.`);
    if (data.error) lines.push('', `What went wrong: ${data.error}`);
  }
  lines.push('', `Open the shot: ${link}`, '', 'You can turn this kind of e-mail off under your account settings.');
  return { to: user.email, subject, text: lines.join('\n'), labId: data.labId };
}
