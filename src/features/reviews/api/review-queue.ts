import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { reviewKeys, type QueueRow } from './types.ts';

/** GET /api/labs/:labId/review-queue: shots waiting for review, oldest request first. */
export const fetchReviewQueue = (labId: string) => api.get<{ shots: QueueRow[] }>(`/api/labs/${labId}/review-queue`).then((r) => r.shots);

export const reviewQueueQueryOptions = (labId: string) =>
  queryOptions({ queryKey: reviewKeys.queue(labId), queryFn: () => fetchReviewQueue(labId), refetchInterval: 30_000 });

export const useReviewQueue = (labId: string) => useQuery(reviewQueueQueryOptions(labId));
