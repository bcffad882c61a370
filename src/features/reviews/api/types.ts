/** Shapes the review routes answer (server/modules/reviews/routes.ts); dates arrive as ISO strings. */

export interface Person { id: string; name: string | null }

export interface QueueRow {
  shotId: string;
  campaignId: string;
  campaignName: string | null;
  number: number;
  firedAt: string | null;
  speed: { value: number; uncertainty: number | null; method: string | null } | null;
  analysisId: string | null;
  analysisVersion: number | null;
  /** "Check the time base": flagged, and whether it still blocks approval (absent from servers before issue 10). */
  timeBaseCheck?: { flagged: boolean; blocksApproval: boolean } | null;
  requestId: string | null;
  requestedBy: Person | null;
  requestedAt: string | null;
  message: string;
}

export type HistoryEntry =
  | { type: 'request'; id: string; at: string; by: Person | null; analysisId: string; analysisVersion: number | null; message: string }
  | {
    type: 'decision'; id: string; at: string; by: Person | null; analysisId: string; analysisVersion: number | null;
    decision: 'approved' | 'returned'; comment: string; requestId: string | null;
  };

export interface ReviewHistory {
  status: string;
  currentAnalysisId: string | null;
  reviewAnalysisId: string | null;
  approvedAnalysisId: string | null;
  approvedAnalysisVersion: number | null;
  history: HistoryEntry[];
}

export interface ShotComment { id: string; body: string; replyTo: string | null; author: Person | null; createdAt: string }

/**
 * Query keys under the shot's own key (['shots', shotId], the shot workspace's), so invalidating the shot after a
 * review also refreshes its history and comments.
 */
export const reviewKeys = {
  queue: (labId: string) => ['labs', labId, 'review-queue'] as const,
  /** With the shot's status, so the history reloads when a recomputation or a decision moves the shot on. */
  history: (shotId: string, status: string) => ['shots', shotId, 'reviews', status] as const,
  comments: (shotId: string) => ['shots', shotId, 'comments'] as const,
  shot: (shotId: string) => ['shots', shotId] as const,
};
