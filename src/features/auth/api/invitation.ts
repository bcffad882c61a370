import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { AcceptInvitationBody, MeView } from '../../../../shared/contracts/auth.ts';
import type { Role } from '../../../../shared/contracts/roles.ts';
import { meKey } from './me.ts';

export interface InvitationOffer {
  labName: string;
  email: string;
  role: Role;
  invitedBy: string | null;
  expiresAt: string;
  accountExists: boolean;
}

export const invitationQueryOptions = (token: string) =>
  queryOptions({
    queryKey: ['invitation', token],
    queryFn: () => api.get<InvitationOffer>(`/api/invitations/${encodeURIComponent(token)}`),
    retry: false,
  });

export const useInvitation = (token: string) => useQuery(invitationQueryOptions(token));

export function useAcceptInvitation(token: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: AcceptInvitationBody) => api.post<MeView>(`/api/invitations/${encodeURIComponent(token)}/accept`, body),
    onSuccess: (me) => {
      queryClient.clear();
      queryClient.setQueryData(meKey, me);
    },
  });
}
