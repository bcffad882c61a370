import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { TimeBaseConfirmationBody } from '../../../../shared/contracts/shots.ts';
import { shotKeys } from './shot.ts';
import type { TimeBaseStatus } from './types.ts';

/** POST /api/shots/:shotId/analyses/:analysisId/time-base-confirmation: "I checked the time base", with how. */
export const confirmTimeBase = (shotId: string, analysisId: string, body: TimeBaseConfirmationBody) =>
  api.post<{ analysisId: string; version: number; timeBaseCheck: TimeBaseStatus }>(`/api/shots/${shotId}/analyses/${analysisId}/time-base-confirmation`, body);

export function useConfirmTimeBase(shotId: string, analysisId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    // The form checks the note is there; the server's 400 says anything else in words.
    mutationFn: (body: TimeBaseConfirmationBody) => confirmTimeBase(shotId, analysisId, body),
    onSuccess: () => Promise.all([
      queryClient.invalidateQueries({ queryKey: shotKeys.detail(shotId) }),
      queryClient.invalidateQueries({ queryKey: shotKeys.analysis(shotId, analysisId) }),
    ]),
  });
}
