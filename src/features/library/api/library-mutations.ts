import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { GateRigBody, GateRigPatchBody, ProjectileBody, ProjectilePatchBody } from '../../../../shared/contracts/library.ts';
import { api } from '../../../lib/api-client.ts';
import { labKeys } from '../../labs/api/members.ts';
import type { GateRigRow, ProjectileRow } from './library.ts';

/** Saves a projectile: a new one when `id` is absent, otherwise a correction of that one. */
export function useSaveProjectile(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, body }: { id?: string; body: ProjectileBody | ProjectilePatchBody }) =>
      id
        ? api.patch<{ projectile: ProjectileRow }>(`/api/labs/${labId}/projectiles/${id}`, body)
        : api.post<{ projectile: ProjectileRow }>(`/api/labs/${labId}/projectiles`, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: labKeys.projectiles(labId) }),
  });
}

/** Saves a gate rig: a new one when `id` is absent, otherwise a correction of that one. */
export function useSaveGateRig(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, body }: { id?: string; body: GateRigBody | GateRigPatchBody }) =>
      id
        ? api.patch<{ gateRig: GateRigRow }>(`/api/labs/${labId}/gate-rigs/${id}`, body)
        : api.post<{ gateRig: GateRigRow }>(`/api/labs/${labId}/gate-rigs`, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: labKeys.gateRigs(labId) }),
  });
}
