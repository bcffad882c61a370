import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { ShotDetail } from './types.ts';

export const shotKeys = {
  detail: (shotId: string) => ['shots', shotId] as const,
  analysis: (shotId: string, analysisId: string) => ['shots', shotId, 'analyses', analysisId] as const,
  diff: (shotId: string, a: string, b: string) => ['shots', shotId, 'diff', a, b] as const,
  samples: (captureId: string, channel: string) => ['captures', captureId, 'samples', channel] as const,
};

/**
 * True while anything of the shot is pending: the page then polls. The shot's own status counts, since the server
 * derives it from every capture and version (shared/contracts/shot-status.ts): between "file read" and "analysis
 * created" no row is queued, yet the shot is still processing.
 */
export function isBusy(d: ShotDetail | undefined): boolean {
  if (!d) return false;
  return d.shot.status === 'processing' || d.captures.some((c) => c.state === 'queued' || c.state === 'reading') || d.analyses.some((a) => a.state === 'queued' || a.state === 'running');
}

/**
 * The shot with its captures, versions and current analysis. Changes reach the page two ways: the lab's event
 * stream (src/app/use-lab-events.ts) makes it read the shot again whenever the server changed its state, and
 * while work is under way this request is also polled every second (progress bars, and the fallback when the
 * stream is cut by a proxy). Polling stops by itself once nothing is pending.
 */
export const shotQueryOptions = (shotId: string) =>
  queryOptions({
    queryKey: shotKeys.detail(shotId),
    queryFn: () => api.get<ShotDetail>(`/api/shots/${shotId}`),
    refetchInterval: (query) => (isBusy(query.state.data) ? 1000 : false),
  });

export const useShot = (shotId: string) => useQuery(shotQueryOptions(shotId));
