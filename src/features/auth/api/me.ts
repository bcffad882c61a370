import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { MeView } from '../../../../shared/contracts/auth.ts';

export const meKey = ['me'] as const;

/**
 * The signed-in user, or null when nobody is signed in. Asked of /api/auth/session, which answers 200 either way: a
 * 401 from /api/auth/me would be logged by the browser as a failed request on every visit to the sign-in page.
 */
export async function fetchMe(): Promise<MeView | null> {
  return (await api.get<{ user: MeView | null }>('/api/auth/session')).user;
}

export const meQueryOptions = () => queryOptions({ queryKey: meKey, queryFn: fetchMe, staleTime: 60_000 });

export const useMe = () => useQuery(meQueryOptions());
