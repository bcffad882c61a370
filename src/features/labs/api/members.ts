import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { Role } from '../../../../shared/contracts/roles.ts';

export interface Member { userId: string; name: string; email: string; role: Role; since: string; active: boolean; disabledAt?: string | null }

export const labKeys = {
  all: (labId: string) => ['labs', labId] as const,
  members: (labId: string) => [...labKeys.all(labId), 'members'] as const,
  invitations: (labId: string) => [...labKeys.all(labId), 'invitations'] as const,
  outbox: (labId: string) => [...labKeys.all(labId), 'outbox'] as const,
  storage: (labId: string) => [...labKeys.all(labId), 'storage'] as const,
  audit: (labId: string) => [...labKeys.all(labId), 'audit'] as const,
  campaigns: (labId: string) => [...labKeys.all(labId), 'campaigns'] as const,
  campaign: (labId: string, id: string) => [...labKeys.campaigns(labId), id] as const,
  projectiles: (labId: string) => [...labKeys.all(labId), 'projectiles'] as const,
  gateRigs: (labId: string) => [...labKeys.all(labId), 'gate-rigs'] as const,
};

export const membersQueryOptions = (labId: string) =>
  queryOptions({ queryKey: labKeys.members(labId), queryFn: () => api.get<{ members: Member[] }>(`/api/labs/${labId}/members`) });

export const useMembers = (labId: string) => useQuery(membersQueryOptions(labId));

export function useChangeRole(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: Role }) => api.patch(`/api/labs/${labId}/members/${userId}`, { role }),
    onSettled: () => queryClient.invalidateQueries({ queryKey: labKeys.members(labId) }),
  });
}

/** Clears a member's failed sign-ins (lab admins), so a member refused after mistyped passwords can sign in at once. */
export function useUnlockSignIn(labId: string) {
  return useMutation({
    mutationFn: (userId: string) => api.post(`/api/labs/${labId}/members/${userId}/unlock-sign-in`, {}),
  });
}

/** Disables or enables a member's account (lab admins): disabled, it cannot sign in and its sessions and tokens stop. */
export function useSetMemberActive(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, active }: { userId: string; active: boolean }) =>
      api.post<{ userId: string; active: boolean }>(`/api/labs/${labId}/members/${userId}/${active ? 'enable' : 'disable'}`, {}),
    onSettled: () => {
      void queryClient.invalidateQueries({ queryKey: labKeys.members(labId) });
      void queryClient.invalidateQueries({ queryKey: labKeys.audit(labId) });
    },
  });
}
