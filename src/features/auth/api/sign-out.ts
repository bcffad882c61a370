import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { meKey } from './me.ts';

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<void>('/api/auth/logout'),
    // Only a sign-out the server recorded ends the session here: after a failure the session is still valid, and
    // the page says so rather than pretending (issue 12, item 11).
    onSuccess: () => {
      // Nothing of the previous user may stay in the cache for the next one.
      queryClient.clear();
      queryClient.setQueryData(meKey, null);
    },
  });
}
