import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { InvitationBody } from '../../../../shared/contracts/auth.ts';
import type { Role } from '../../../../shared/contracts/roles.ts';
import { labKeys } from '../../labs/api/members.ts';

export interface InvitationRow {
  id: string; email: string; role: Role; state: 'pending' | 'accepted' | 'revoked' | 'expired';
  createdAt: string; expiresAt: string; acceptedAt: string | null;
}

export const invitationsQueryOptions = (labId: string) =>
  queryOptions({
    queryKey: labKeys.invitations(labId),
    queryFn: () => api.get<{ invitations: InvitationRow[] }>(`/api/labs/${labId}/invitations`),
  });

export const useInvitations = (labId: string, enabled: boolean) => useQuery({ ...invitationsQueryOptions(labId), enabled });

export function useInvite(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: InvitationBody) => api.post(`/api/labs/${labId}/invitations`, body),
    onSuccess: () => {
      void queryClient.invalidateQueries({ queryKey: labKeys.invitations(labId) });
      void queryClient.invalidateQueries({ queryKey: labKeys.outbox(labId) });
    },
  });
}

export function useWithdrawInvitation(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api.delete(`/api/labs/${labId}/invitations/${id}`),
    onSettled: () => queryClient.invalidateQueries({ queryKey: labKeys.invitations(labId) }),
  });
}
