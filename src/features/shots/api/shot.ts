import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { ShotDetail } from './types.ts';

export const shotKeys = {
  detail: (shotId: string) => ['shots', shotId] as const,
  analysis: (shotId: string, analysisId: string) => ['shots', shotId, 'analyses', analysisId] as const,
  diff: (shotId: string, a: string, b: string) => ['shots', shotId, 'diff', a, b] as const,
  samples: (captureId: string, channel: string) => ['captures', captureId, 'samples', channel] as const,
};

/** True while a capture is being read or an analysis computed: the page then polls. */
export function isBusy(d: ShotDetail | undefined): boolean {
  if (!d) return false;
  return d.captures.some((c) => c.state === 'queued' || c.state === 'reading') || d.analyses.some((a) => a.state === 'queued' || a.state === 'running');
}

/**
 * The shot with its captures, versions and current analysis. Progress reaches the page by polling this one
 * request every second while work is under way: states change a handful of times per shot, so polling costs
 * little, survives proxies and reconnects without extra code, and stops by itself when nothing is running.
 */
export const shotQueryOptions = (shotId: string) =>
  queryOptions({
    queryKey: shotKeys.detail(shotId),
    queryFn: () => api.get<ShotDetail>(`/api/shots/${shotId}`),
    refetchInterval: (query) => (isBusy(query.state.data) ? 1000 : false),
  });

export const useShot = (shotId: string) => useQuery(shotQueryOptions(shotId));
