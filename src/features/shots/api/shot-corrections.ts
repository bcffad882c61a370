import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { shotKeys } from './shot.ts';
import type { ShotInfo } from './types.ts';

/** Re-reads the shot and every lab list it appears in (campaign table, trends, review queue). */
function useRefreshShot(labId: string, shotId: string) {
  const queryClient = useQueryClient();
  return () => Promise.all([
    queryClient.invalidateQueries({ queryKey: shotKeys.detail(shotId) }),
    queryClient.invalidateQueries({ queryKey: ['labs', labId] }),
  ]);
}

/** DELETE /api/shots/:shotId: a shot logged by mistake is marked deleted (a lab admin can restore it). */
export function useDeleteShot(labId: string, shotId: string) {
  const refresh = useRefreshShot(labId, shotId);
  return useMutation({ mutationFn: () => api.delete<{ shot: ShotInfo }>(`/api/shots/${shotId}`), onSuccess: refresh });
}

/** POST /api/shots/:shotId/restore (lab admins). */
export function useRestoreShot(labId: string, shotId: string) {
  const refresh = useRefreshShot(labId, shotId);
  return useMutation({ mutationFn: () => api.post<{ shot: ShotInfo }>(`/api/shots/${shotId}/restore`, {}), onSuccess: refresh });
}

/** DELETE /api/shots/:shotId/captures/:captureId: the file leaves the shot (its bytes stay stored); the shot is analysed again. */
export function useRemoveCapture(labId: string, shotId: string) {
  const refresh = useRefreshShot(labId, shotId);
  return useMutation({ mutationFn: (captureId: string) => api.delete<unknown>(`/api/shots/${shotId}/captures/${captureId}`), onSuccess: refresh });
}
