import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { reviewDecisionBody, type ReviewDecisionBody } from '../../../../shared/contracts/review.ts';
import { parseBody } from './parse-body.ts';
import { reviewKeys } from './types.ts';

export { reviewDecisionBody };

/** POST /api/shots/:shotId/reviews: approve the version under review, or return it with a comment. */
export const decideReview = (shotId: string, body: ReviewDecisionBody) => api.post<{ review: { id: string } }>(`/api/shots/${shotId}/reviews`, body);

export function useDecideReview(shotId: string, labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: ReviewDecisionBody) => decideReview(shotId, parseBody(reviewDecisionBody, body)),
    onSuccess: () => Promise.all([
      queryClient.invalidateQueries({ queryKey: reviewKeys.shot(shotId) }),
      queryClient.invalidateQueries({ queryKey: reviewKeys.queue(labId) }),
    ]),
  });
}
