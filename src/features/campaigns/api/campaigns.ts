import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { CampaignBody, CampaignPatchBody } from '../../../../shared/contracts/auth.ts';
import type { AnalysisSettings } from '../../../../shared/contracts/analysis-settings.ts';
import type { NeededCondition } from '../../../../shared/contracts/shots.ts';
import { labKeys } from '../../labs/api/members.ts';

export interface CampaignRow {
  id: string; name: string; description: string; startedOn: string | null;
  /** The launcher tube, m; null when not logged. */
  tubeLengthM: number | null; boreM: number | null;
  /** Default analysis settings of new shots (threshold, smoothing, polarity, edges, gates); null when none. */
  analysisSettings: AnalysisSettings | null;
  shotCount: number;
  /** What this campaign's shots must log for its analysis and trends (shared/contracts/shots.ts neededConditions). */
  neededConditions: NeededCondition[];
}
export interface ShotRow {
  id: string; number: number; firedAt: string | null; status: string;
  conditions: { tubePressurePa: number | null; sealType: string; ambientTemperatureK: number | null; ambientPressurePa: number | null };
  notes: string;
  /** Labels of the needed conditions the shot lacks ("conditions missing"); absent from servers before this field. */
  missingConditions?: string[];
}

export const campaignsQueryOptions = (labId: string) =>
  queryOptions({ queryKey: labKeys.campaigns(labId), queryFn: () => api.get<{ campaigns: CampaignRow[] }>(`/api/labs/${labId}/campaigns`) });

export const campaignQueryOptions = (labId: string, campaignId: string) =>
  queryOptions({
    queryKey: labKeys.campaign(labId, campaignId),
    queryFn: () => api.get<{ campaign: CampaignRow; shots: ShotRow[] }>(`/api/labs/${labId}/campaigns/${campaignId}`),
  });

export const useCampaigns = (labId: string) => useQuery(campaignsQueryOptions(labId));
export const useCampaign = (labId: string, campaignId: string) => useQuery(campaignQueryOptions(labId, campaignId));

export function useCreateCampaign(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CampaignBody) => api.post<{ campaign: CampaignRow }>(`/api/labs/${labId}/campaigns`, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: labKeys.campaigns(labId) }),
  });
}

/** Corrects a campaign; its list, its page and its trends (keyed under the campaign) are fetched again. */
export function useUpdateCampaign(labId: string, campaignId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CampaignPatchBody) => api.patch<{ campaign: CampaignRow }>(`/api/labs/${labId}/campaigns/${campaignId}`, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: labKeys.campaigns(labId) }),
  });
}
