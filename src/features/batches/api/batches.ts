import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AnalysisSettings, BatchRequestBody } from '../../../../shared/contracts/analysis-settings.ts';
import { api } from '../../../lib/api-client.ts';
import { labKeys } from '../../labs/api/members.ts';

export interface Outcome {
  speed: { value: number; uncertainty: number; method: string; basis: string } | null;
  gates: { channel: string; position: number; status: 'ok' | 'missed' }[];
  warnings: string[];
}

export interface BatchShotRow {
  shotId: string;
  number: number | null;
  shotStatus: string | null;
  before: (Outcome & { analysisId: string; version: number; state: string }) | null;
  after: Outcome & { analysisId: string; version: number; state: 'queued' | 'running' | 'done' | 'failed'; error: string | null };
  change: { delta: number | null; deltaInU: number | null; methodChanged: boolean; gatesGained: string[]; gatesLost: string[] } | null;
}

export interface BatchSummary {
  id: string;
  campaignId: string;
  settings: AnalysisSettings;
  requestedBy: string | null;
  requestedByName: string | null;
  createdAt: string;
  state: 'running' | 'done';
  counts: { total: number; queued: number; running: number; done: number; failed: number };
  skipped: { shotId: string; number: number; reason: string }[];
}

export interface BatchView { batch: BatchSummary; shots: BatchShotRow[] }

export const batchKeys = {
  list: (labId: string, campaignId: string) => [...labKeys.campaign(labId, campaignId), 'batches'] as const,
  detail: (labId: string, batchId: string) => [...labKeys.all(labId), 'batches', batchId] as const,
};

export const batchListQueryOptions = (labId: string, campaignId: string) =>
  queryOptions({
    queryKey: batchKeys.list(labId, campaignId),
    queryFn: () => api.get<{ batches: BatchSummary[] }>(`/api/labs/${labId}/campaigns/${campaignId}/batches`),
    // Progress moves on the server: read again on each visit, and every few seconds while a batch runs.
    staleTime: 0,
    refetchInterval: (query) => (query.state.data?.batches.some((b) => b.state === 'running') ? 3000 : false),
  });

/** One batch; polled every second while any of its versions is queued or running (one progress display). */
export const batchQueryOptions = (labId: string, batchId: string) =>
  queryOptions({
    queryKey: batchKeys.detail(labId, batchId),
    queryFn: () => api.get<BatchView>(`/api/labs/${labId}/batches/${batchId}`),
    refetchInterval: (query) => (query.state.data?.batch.state === 'done' ? false : 1000),
  });

export const useBatchList = (labId: string, campaignId: string) => useQuery(batchListQueryOptions(labId, campaignId));
export const useBatch = (labId: string, batchId: string) => useQuery(batchQueryOptions(labId, batchId));

export function useStartBatch(labId: string, campaignId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: BatchRequestBody) => api.post<BatchView>(`/api/labs/${labId}/campaigns/${campaignId}/batches`, body),
    // The campaign's shots are being recomputed: its table, its batches and the shots' pages are fetched again.
    onSuccess: () => queryClient.invalidateQueries({ queryKey: labKeys.all(labId) }),
  });
}

export function useSaveCampaignSettings(labId: string, campaignId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (settings: AnalysisSettings | null) =>
      api.put<{ campaignId: string; analysisSettings: AnalysisSettings | null }>(`/api/labs/${labId}/campaigns/${campaignId}/analysis-settings`, { settings }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: labKeys.campaigns(labId) }),
  });
}
