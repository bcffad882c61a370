import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { reviewRequestBody, type ReviewRequestBody } from '../../../../shared/contracts/review.ts';
import { parseBody } from './parse-body.ts';
import { reviewKeys } from './types.ts';

export { reviewRequestBody };

/** POST /api/shots/:shotId/review-requests: the shot's current version goes to the lab's reviewers. */
export const requestReview = (shotId: string, body: ReviewRequestBody) => api.post<{ request: { id: string } }>(`/api/shots/${shotId}/review-requests`, body);

export function useRequestReview(shotId: string, labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: ReviewRequestBody) => requestReview(shotId, parseBody(reviewRequestBody, body)),
    onSuccess: () => Promise.all([
      queryClient.invalidateQueries({ queryKey: reviewKeys.shot(shotId) }),
      queryClient.invalidateQueries({ queryKey: reviewKeys.queue(labId) }),
    ]),
  });
}
