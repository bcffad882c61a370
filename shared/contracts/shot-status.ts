/**
 * A shot's status, derived from its captures, its analysis versions and the review records of its current
 * version. This is the one rule: the server writes its answer on every transition (server/modules/shots/settle-shot.ts)
 * and nothing else sets `shots.status`.
 */
export const SHOT_STATUSES = ['draft', 'processing', 'analysed', 'in_review', 'approved', 'returned', 'failed'] as const;
export type ShotStatus = (typeof SHOT_STATUSES)[number];

/**
 * The one word people read for each status, on every page, CSV export, e-mail and report: "signed off" (never
 * "approved"), "returned" (never "sent back"), "awaiting files" (never "draft"). The API keeps the enum values.
 */
export const SHOT_STATUS_LABELS: Record<ShotStatus, string> = {
  draft: 'Awaiting files',
  processing: 'Processing',
  analysed: 'Analysed',
  in_review: 'In review',
  approved: 'Signed off',
  returned: 'Returned',
  failed: 'Failed',
};

/** A review decision in the same words. */
export const REVIEW_DECISION_LABELS: Record<'approved' | 'returned', string> = { approved: 'Signed off', returned: 'Returned' };

/** Words people must not read for a status: the other names the same states have had. */
export const BANNED_STATUS_WORDS = [/\bapproved\b/i, /\bsent back\b/i, /\bdraft\b/i];

/** A status in words; an unknown value is shown as it is rather than hidden. */
export const shotStatusLabel = (status: string): string => SHOT_STATUS_LABELS[status as ShotStatus] ?? status;

export type CaptureState = 'queued' | 'reading' | 'ready' | 'failed';
export type AnalysisState = 'queued' | 'running' | 'done' | 'failed';

export interface ShotStatusInputs {
  /** States of the shot's captures (removed files left out). */
  captures: readonly string[];
  /** States of all the shot's analysis versions. */
  analyses: readonly string[];
  /** The shot points at a finished version (its numbers are the ones shown). */
  hasCurrentVersion: boolean;
  /**
   * Where the current version stands in review: a request is pending, a reviewer signed it off, or sent it back.
   * null when it was never sent (or a newer version replaced the one that was).
   */
  review: 'in_review' | 'approved' | 'returned' | null;
}

const pending = (s: string) => s === 'queued' || s === 'reading' || s === 'running';

/** True while a file is being read or a version computed. */
export function shotHasPendingWork(inputs: Pick<ShotStatusInputs, 'captures' | 'analyses'>): boolean {
  return inputs.captures.some(pending) || inputs.analyses.some(pending);
}

/**
 * - A review state of the current version (waiting, signed off, returned) stays shown while more work runs: the
 *   numbers reviewed are still the ones on screen, and a newer version, once finished, replaces the current one
 *   (withdrawing a pending request), which then has no review yet.
 * - Otherwise any pending work makes the shot `processing`, and only pending work does: a failed file or a failed
 *   recomputation beside a finished version is a warning on that file or version, not a stuck shot.
 * - With nothing pending: a finished current version gives `analysed` (or its review state); files but no finished
 *   version gives `failed`; no files gives `draft` ("awaiting files").
 */
export function deriveShotStatus(inputs: ShotStatusInputs): ShotStatus {
  const { captures, hasCurrentVersion, review } = inputs;
  if (hasCurrentVersion && review) return review;
  if (shotHasPendingWork(inputs)) return 'processing';
  if (hasCurrentVersion) return 'analysed';
  if (captures.length === 0) return 'draft';
  return 'failed';
}
