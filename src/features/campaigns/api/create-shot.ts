import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CreateShotBody } from '../../../../shared/contracts/shots.ts';
import { api } from '../../../lib/api-client.ts';
import { labKeys } from '../../labs/api/members.ts';
import type { ShotRow } from './campaigns.ts';
import { shotListKeys } from './shot-list.ts';

export const createShot = (labId: string, body: CreateShotBody) => api.post<{ shot: ShotRow }>(`/api/labs/${labId}/shots`, body);

export function useCreateShot(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateShotBody) => createShot(labId, body),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: shotListKeys.all(labId) }),
        queryClient.invalidateQueries({ queryKey: labKeys.campaigns(labId) }),
      ]),
  });
}
