import { queryOptions, useQuery } from '@tanstack/react-query';
import { api, ApiError } from '../../../lib/api-client.ts';
import type { MeView } from '../../../../shared/contracts/auth.ts';

export const meKey = ['me'] as const;

/** The signed-in user, or null when nobody is signed in (a 401 is an answer here, not an error). */
export async function fetchMe(): Promise<MeView | null> {
  try {
    return await api.get<MeView>('/api/auth/me');
  } catch (err) {
    if (err instanceof ApiError && err.status === 401) return null;
    throw err;
  }
}

export const meQueryOptions = () => queryOptions({ queryKey: meKey, queryFn: fetchMe, staleTime: 60_000 });

export const useMe = () => useQuery(meQueryOptions());
