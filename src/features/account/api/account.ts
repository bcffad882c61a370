import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { ApiError, api } from '../../../lib/api-client.ts';
import type {
  ChangePasswordBody,
  MeView,
  PasswordResetCompleteBody,
  PasswordResetRequestBody,
  SignOutEverywhereBody,
} from '../../../../shared/contracts/auth.ts';
import { meKey } from '../../auth/api/me.ts';

/** Field messages of a 400/403 the API sent (`details.fields`), by field name, to show beside each field. */
export function fieldErrorsOf(error: unknown): Record<string, string> {
  if (!(error instanceof ApiError)) return {};
  const fields = (error.details as { fields?: { path: string; message: string }[] } | undefined)?.fields ?? [];
  return Object.fromEntries(fields.filter((f) => f.path).map((f) => [f.path, f.message]));
}

/** Change password: this browser gets a fresh session; the answer says how many tokens were revoked. */
export function useChangePassword() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: ChangePasswordBody) => api.post<MeView & { tokensRevoked: number }>('/api/me/password', body),
    onSuccess: ({ tokensRevoked: _revoked, ...me }) => {
      queryClient.setQueryData(meKey, me);
      void queryClient.invalidateQueries({ queryKey: ['me', 'tokens'] });
    },
  });
}

/** Sign out everywhere: this browser too, so the cache is emptied like a sign-out. */
export function useSignOutEverywhere() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: SignOutEverywhereBody) => api.post<{ sessionsSignedOut: 'all'; tokensRevoked: number }>('/api/me/sign-out-everywhere', body),
    onSuccess: () => {
      queryClient.clear();
      queryClient.setQueryData(meKey, null);
    },
  });
}

export function useRequestPasswordReset() {
  return useMutation({
    mutationFn: (body: PasswordResetRequestBody) => api.post<{ message: string }>('/api/auth/password-reset', body),
  });
}

export function useCompletePasswordReset() {
  return useMutation({
    mutationFn: (body: PasswordResetCompleteBody) => api.post<void>('/api/auth/password-reset/complete', body),
  });
}

/**
 * Whether the reset link of this page still works, asked once when the page opens (only a look: the link stays
 * usable). The secret goes in a POST body, never in a URL; the answer is not kept after the page closes.
 */
export function useCheckPasswordReset(token: string) {
  return useQuery({
    queryKey: ['password-reset-check', token],
    queryFn: () => api.post<{ expiresAt: string }>('/api/auth/password-reset/check', { token }),
    enabled: token.length > 0,
    retry: false,
    staleTime: Infinity,
    gcTime: 0,
    refetchOnWindowFocus: false,
  });
}
