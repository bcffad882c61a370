import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { ApiTokenBody } from '../../../../shared/contracts/auth.ts';

export interface TokenRow {
  id: string; name: string; prefix: string; createdAt: string; expiresAt: string | null; lastUsedAt: string | null; revokedAt: string | null;
}

const tokensKey = ['me', 'tokens'] as const;

export const tokensQueryOptions = () =>
  queryOptions({ queryKey: tokensKey, queryFn: () => api.get<{ tokens: TokenRow[] }>('/api/me/tokens') });

export const useTokens = () => useQuery(tokensQueryOptions());

export function useCreateToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: ApiTokenBody) => api.post<{ token: TokenRow; secret: string }>('/api/me/tokens', body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: tokensKey }),
  });
}

export function useRevokeToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api.delete(`/api/me/tokens/${id}`),
    onSettled: () => queryClient.invalidateQueries({ queryKey: tokensKey }),
  });
}
