import { z } from 'zod';

/**
 * Review and sign-off, comments, notification preferences, exports and campaign trends: request bodies and query
 * strings shared by the client and the server (issue 7).
 */

/** POST /api/shots/:shotId/review-requests */
export const reviewRequestBody = z.object({
  message: z.string().trim().max(2000, 'message must be at most 2000 characters').optional(),
});
export type ReviewRequestBody = z.infer<typeof reviewRequestBody>;

export const REVIEW_DECISIONS = ['approved', 'returned'] as const;
export type ReviewDecision = (typeof REVIEW_DECISIONS)[number];

/** POST /api/shots/:shotId/reviews — a returned shot must say why. */
export const reviewDecisionBody = z
  .object({
    decision: z.enum(REVIEW_DECISIONS, 'decision must be "approved" or "returned"'),
    comment: z.string().trim().max(4000, 'comment must be at most 4000 characters').optional(),
  })
  .refine((b) => b.decision !== 'returned' || (b.comment ?? '').length > 0, {
    message: 'a returned shot needs a comment saying what to fix',
    path: ['comment'],
  });
export type ReviewDecisionBody = z.infer<typeof reviewDecisionBody>;

/** POST /api/shots/:shotId/comments — a flat list; `replyTo` names the comment answered. */
export const commentBody = z.object({
  body: z.string().trim().min(1, 'body must not be empty').max(4000, 'body must be at most 4000 characters'),
  replyTo: z.uuid('replyTo must be a comment id').optional(),
});
export type CommentBody = z.infer<typeof commentBody>;

/** The kinds of e-mail a user can turn off; every kind is on until turned off. */
export const NOTIFICATION_KINDS = ['reviewRequested', 'approved', 'returned', 'jobFailed'] as const;
export type NotificationKind = (typeof NOTIFICATION_KINDS)[number];
export type NotificationPreferences = Record<NotificationKind, boolean>;

/** PATCH /api/me/notifications */
export const notificationPreferencesBody = z
  .object({
    reviewRequested: z.boolean().optional(),
    approved: z.boolean().optional(),
    returned: z.boolean().optional(),
    jobFailed: z.boolean().optional(),
  })
  .strict();
export type NotificationPreferencesBody = z.infer<typeof notificationPreferencesBody>;

/** GET …/export?format=csv|json */
export const exportQuery = z.object({
  format: z.enum(['csv', 'json'], 'format must be csv or json').default('csv'),
});
export type ExportQuery = z.infer<typeof exportQuery>;

const positive = (name: string) => z.coerce.number().positive(`${name} must be a positive number (SI units)`).optional();

/** GET /api/labs/:labId/campaigns/:campaignId/trends */
export const trendsQuery = z.object({
  groupBy: z.enum(['seal', 'projectile', 'none'], 'groupBy must be seal, projectile or none').default('none'),
  /** Launcher tube length, m (for the client's model overlay; echoed back). */
  tubeLengthM: positive('tubeLengthM'),
  /** Tube bore, m. */
  boreM: positive('boreM'),
  /** Projectile mass, kg. */
  massKg: positive('massKg'),
  /** Exit speed, m/s, for the launcher fit's inverse question: what tube vacuum gives it. */
  targetSpeedMs: positive('targetSpeedMs'),
});
export type TrendsQuery = z.infer<typeof trendsQuery>;

/**
 * One analysed shot of a campaign as the trends page, the launcher fit and the campaign report read it (SI units).
 * `When` is a Date on the server and its ISO string once sent as JSON.
 */
export interface TrendPoint<When = string> {
  shotId: string;
  number: number;
  firedAt: When | null;
  tubePressurePa: number | null;
  sealType: string;
  /** The outside air logged with the shot, Pa and K. */
  ambientPressurePa: number | null;
  ambientTemperatureK: number | null;
  projectileId: string | null;
  projectileName: string | null;
  speed: number | null;
  /** Expanded uncertainty U (k = 2), m/s. */
  uncertainty: number | null;
  method: string | null;
  status: string;
  analysisVersion: number;
  /** "unchecked": the speed is marked "check the time base" and not confirmed by an analyst, so it is left out of
   * statistics, fits and plots; "confirmed": it was; null: not marked (absent from servers before issue 10). */
  timeBase?: 'unchecked' | 'confirmed' | null;
}

/** Summary of one group of shots' speeds, m/s. Standard deviation is the sample one (n − 1); null below two shots. */
export interface TrendGroupStats {
  key: string;
  label: string;
  count: number;
  mean: number | null;
  standardDeviation: number | null;
  /** max − min, m/s */
  extremeSpread: number | null;
}
