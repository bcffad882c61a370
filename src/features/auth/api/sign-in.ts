import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { LoginBody, MeView } from '../../../../shared/contracts/auth.ts';
import { meKey } from './me.ts';

export const signIn = (body: LoginBody) => api.post<MeView>('/api/auth/login', body);

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signIn,
    onSuccess: (me) => {
      queryClient.clear();
      queryClient.setQueryData(meKey, me);
    },
  });
}
