import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { commentBody, type CommentBody } from '../../../../shared/contracts/review.ts';
import { parseBody } from './parse-body.ts';
import { reviewKeys, type ShotComment } from './types.ts';

export { commentBody };

/** POST /api/shots/:shotId/comments: anyone in the lab may comment, or answer a comment. */
export const addComment = (shotId: string, body: CommentBody) => api.post<{ comment: ShotComment }>(`/api/shots/${shotId}/comments`, body);

export function useAddComment(shotId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CommentBody) => addComment(shotId, parseBody(commentBody, body)),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: reviewKeys.comments(shotId) }),
  });
}
