import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { reviewKeys, type ShotComment } from './types.ts';

/** GET /api/shots/:shotId/comments, oldest first. */
export const fetchShotComments = (shotId: string) => api.get<{ comments: ShotComment[] }>(`/api/shots/${shotId}/comments`).then((r) => r.comments);

export const shotCommentsQueryOptions = (shotId: string) =>
  queryOptions({ queryKey: reviewKeys.comments(shotId), queryFn: () => fetchShotComments(shotId) });

export const useShotComments = (shotId: string) => useQuery(shotCommentsQueryOptions(shotId));
