import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { UpdateShotBody } from '../../../../shared/contracts/shots.ts';
import { api } from '../../../lib/api-client.ts';
import { labKeys } from '../../labs/api/members.ts';
import type { ShotRow } from './campaigns.ts';

/** PATCH /api/shots/:shotId: correct a logged shot's conditions (refused once it is signed off). */
export const updateShot = (shotId: string, body: UpdateShotBody) => api.patch<{ shot: ShotRow }>(`/api/shots/${shotId}`, body);

export function useUpdateShot(labId: string, shotId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateShotBody) => updateShot(shotId, body),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: ['shots', shotId] }),
        queryClient.invalidateQueries({ queryKey: labKeys.all(labId) }),
      ]),
  });
}
