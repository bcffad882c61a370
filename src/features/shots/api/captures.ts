import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { ImportOverrides } from '../../../../shared/contracts/shots.ts';
import type { CaptureInfo } from './types.ts';
import { shotKeys } from './shot.ts';

export interface UploadedCapture { id: string; fileName: string; state: string; duplicate: boolean }

/**
 * Uploads the files dropped or chosen together in one request, so the server records them all before any is read and
 * the shot's automatic analysis reads them together. (One request per file let the first file of a pair be read and
 * analysed alone before the second arrived: an extra automatic version from one gate, then the real one.) Each file
 * still gets its own progress: multipart sends the files in order, so the bytes sent so far fall in one file's share
 * of the body (the few bytes of part headers aside). A single file goes as the whole request body, named in the URL:
 * the server then has no multipart to parse (less of its processor time for a deep record).
 */
export function uploadCaptures(shotId: string, files: File[], onProgress: (fractions: number[]) => void) {
  if (files.length === 1) {
    const [file] = files;
    return api.upload<{ captures: UploadedCapture[] }>(`/api/shots/${shotId}/captures?fileName=${encodeURIComponent(file.name)}`, file, (fraction) => onProgress([fraction]));
  }
  const form = new FormData();
  for (const file of files) form.append('files', file, file.name);
  const total = files.reduce((sum, f) => sum + f.size, 0);
  return api.upload<{ captures: UploadedCapture[] }>(`/api/shots/${shotId}/captures`, form, (fraction) => {
    const sent = fraction * total;
    let before = 0;
    onProgress(files.map((f) => {
      const share = f.size === 0 ? (sent >= before ? 1 : 0) : Math.min(1, Math.max(0, (sent - before) / f.size));
      before += f.size;
      return share;
    }));
  });
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
