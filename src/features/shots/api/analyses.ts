import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { AnalysisOptionsInput } from '../../../../shared/contracts/analysis.ts';
import type { AnalysisFull, AnalysisSummary, VersionDiff } from './types.ts';
import { shotKeys } from './shot.ts';

export const analysisQueryOptions = (shotId: string, analysisId: string) =>
  queryOptions({
    queryKey: shotKeys.analysis(shotId, analysisId),
    queryFn: () => api.get<{ analysis: AnalysisFull }>(`/api/shots/${shotId}/analyses/${analysisId}`).then((r) => r.analysis),
    // A finished version never changes.
    staleTime: Infinity,
  });

export const useAnalysis = (shotId: string, analysisId: string | null) =>
  useQuery({ ...analysisQueryOptions(shotId, analysisId ?? 'none'), enabled: !!analysisId });

export const useVersionDiff = (shotId: string, a: string | null, b: string | null) =>
  useQuery({
    queryKey: shotKeys.diff(shotId, a ?? '', b ?? ''),
    queryFn: () => api.get<VersionDiff>(`/api/shots/${shotId}/analyses/${a}/diff/${b}`),
    enabled: !!a && !!b && a !== b,
    staleTime: Infinity,
  });

/** Queues a new analysis version; the key makes a double click or a retried request create one version only. */
export function useRecompute(shotId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ parameters, key }: { parameters: AnalysisOptionsInput; key: string }) =>
      api.post<{ analysis: AnalysisSummary }>(`/api/shots/${shotId}/analyses`, { parameters }, { 'Idempotency-Key': key }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: shotKeys.detail(shotId) }),
  });
}
