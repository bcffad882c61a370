import { useQueries } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { ComparedShot } from './types.ts';

/** GET /api/shots/:shotId for each compared shot (the shot workspace's key, so an open shot is not fetched twice). */
export const fetchComparedShot = (shotId: string) => api.get<ComparedShot>(`/api/shots/${shotId}`);

export function useComparedShots(shotIds: string[]) {
  return useQueries({
    queries: shotIds.map((id) => ({ queryKey: ['shots', id] as const, queryFn: () => fetchComparedShot(id) })),
  });
}
