import { useQueries, type UseQueryResult } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { ComparedShot } from './types.ts';

/** GET /api/shots/:shotId for each compared shot (the shot workspace's key, so an open shot is not fetched twice). */
export const fetchComparedShot = (shotId: string) => api.get<ComparedShot>(`/api/shots/${shotId}`);

export interface ComparedShots { data: ComparedShot[] | null; error: Error | null; pending: boolean }

// Module-level so TanStack Query re-runs it only when a result changes: the shots array then keeps its identity
// between renders, and the comparison's memoized alignments and ranges with it.
function combine(results: UseQueryResult<ComparedShot>[]): ComparedShots {
  const error = results.find((r) => r.isError)?.error ?? null;
  const pending = results.some((r) => r.isPending);
  return { data: error || pending ? null : results.map((r) => r.data!), error, pending };
}

export function useComparedShots(shotIds: string[]): ComparedShots {
  return useQueries({
    queries: shotIds.map((id) => ({ queryKey: ['shots', id] as const, queryFn: () => fetchComparedShot(id) })),
    combine,
  });
}
