import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { ImportOverrides } from '../../../../shared/contracts/shots.ts';
import type { CaptureInfo } from './types.ts';
import { shotKeys } from './shot.ts';

export interface UploadedCapture { id: string; fileName: string; state: string; duplicate: boolean }

/** Uploads one file (one request per file, so each gets its own progress bar). */
export function uploadCapture(shotId: string, file: File, onProgress: (fraction: number) => void) {
  const form = new FormData();
  form.append('files', file, file.name);
  return api.upload<{ captures: UploadedCapture[] }>(`/api/shots/${shotId}/captures`, form, onProgress);
}

/** One channel's full-precision-enough samples (Float32) for the browser's live preview. */
export async function fetchSamples(captureId: string, channel: number): Promise<Float32Array> {
  return new Float32Array(await api.binary(`/api/captures/${captureId}/samples?channel=${channel}`));
}

export async function fetchTimes(captureId: string): Promise<Float64Array> {
  return new Float64Array(await api.binary(`/api/captures/${captureId}/samples?channel=time`));
}

export function useReingest(shotId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ captureId, importOptions }: { captureId: string; importOptions: ImportOverrides }) =>
      api.post<{ capture: CaptureInfo }>(`/api/shots/${shotId}/captures/${captureId}/reingest`, { importOptions }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: shotKeys.detail(shotId) }),
  });
}
