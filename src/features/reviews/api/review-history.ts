import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { reviewKeys, type ReviewHistory } from './types.ts';

/** GET /api/shots/:shotId/reviews: requests and decisions, oldest first, and which version is signed off. */
export const fetchReviewHistory = (shotId: string) => api.get<ReviewHistory>(`/api/shots/${shotId}/reviews`);

export const reviewHistoryQueryOptions = (shotId: string, status: string) =>
  queryOptions({ queryKey: reviewKeys.history(shotId, status), queryFn: () => fetchReviewHistory(shotId) });

export const useReviewHistory = (shotId: string, status: string) => useQuery(reviewHistoryQueryOptions(shotId, status));
