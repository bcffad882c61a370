import * as z from 'zod';

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
/**
 * Which shots a campaign's trends or export cover: every analysed shot (the default, as before; the signed-off ones
 * are marked), or only those whose current version a reviewer signed off.
 */
export const SHOT_SELECTIONS = ['all', 'signed-off'] as const;
export type ShotSelection = (typeof SHOT_SELECTIONS)[number];
const shotSelection = z.enum(SHOT_SELECTIONS, 'shots must be all or signed-off').default('all')
  .describe('all (default): every shot, signed-off ones marked; signed-off: only shots whose current analysis version a reviewer signed off (approved)');

export const exportQuery = z.object({
  format: z.enum(['csv', 'json'], 'format must be csv or json').default('csv'),
  shots: shotSelection,
  precision: z.enum(['rounded', 'full'], 'precision must be rounded or full').default('rounded')
    .describe('CSV only. rounded (default): each value with an uncertainty is rounded to it (uncertainty to 2 significant digits, value to the same decimal place, JCGM 100:2008 §7.2.6); full: every number as computed. JSON is always full precision'),
});
export type ExportQuery = z.infer<typeof exportQuery>;

const positive = (name: string) => z.coerce.number().positive(`${name} must be a positive number (SI units)`).optional();

/** GET /api/labs/:labId/campaigns/:campaignId/trends */
export const trendsQuery = z.object({
  groupBy: z.enum(['seal', 'projectile', 'vacuum', 'none'], 'groupBy must be seal, projectile, vacuum or none').default('none')
    .describe('Statistics per seal type, projectile, tube vacuum level (binned, see vacuumEdgesPa) or for all shots'),
  shots: shotSelection,
  /**
   * Bin edges of tube pressure, Pa, increasing, comma separated ("1000,2000,5000,10000"); absent: one bin per decade
   * (1–10 kPa, 10–100 kPa, …). Only used with groupBy=vacuum.
   */
  vacuumEdgesPa: z.string().optional()
    .transform((text, ctx) => {
      if (text == null || text.trim() === '') return undefined;
      const parts = text.split(',').map((t) => t.trim());
      const edges: number[] = [];
      for (const [i, t] of parts.entries()) {
        const x = Number(t);
        if (t === '' || !Number.isFinite(x) || x <= 0) {
          ctx.addIssue({ code: 'custom', message: `vacuumEdgesPa: edge ${i + 1} ("${t}") is not a positive number of pascals` });
          return z.NEVER;
        }
        if (edges.length > 0 && x <= edges[edges.length - 1]) {
          ctx.addIssue({ code: 'custom', message: `vacuumEdgesPa: edge ${i + 1} (${x} Pa) must be greater than the one before (${edges[edges.length - 1]} Pa)` });
          return z.NEVER;
        }
        edges.push(x);
      }
      if (edges.length < 2 || edges.length > 20) {
        ctx.addIssue({ code: 'custom', message: `vacuumEdgesPa needs 2 to 20 edges; got ${edges.length}` });
        return z.NEVER;
      }
      return edges;
    })
    .describe('With groupBy=vacuum: bin edges of tube pressure in Pa, increasing, comma separated (e.g. 1000,2000,5000,10000). Default: one bin per decade'),
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
  /** A reviewer signed off the current analysis version (shot status "approved"). Absent from servers before issue 11. */
  signedOff?: boolean;
  /** Key of the statistics group this shot falls in (the `groups[].key` of the same answer). */
  group?: string;
}

/** Summary of one group of shots' speeds, m/s. Standard deviation is the sample one (n − 1); null below two shots. */
export interface TrendGroupStats {
  key: string;
  label: string;
  count: number;
  mean: number | null;
  standardDeviation: number | null;
  /** Standard error of the mean, s/√n, m/s; null below two shots. Absent from servers before issue 11. */
  standardError?: number | null;
  /** max − min, m/s */
  extremeSpread: number | null;
  /** For vacuum bins: the bin's tube pressure range, Pa (low inclusive, high exclusive; null: open end). */
  range?: { lowPa: number | null; highPa: number | null } | null;
}
