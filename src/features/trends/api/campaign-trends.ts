import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { LauncherFitView } from '../../../../shared/contracts/launcher-fit.ts';
import type { TrendGroupStats, TrendPoint } from '../../../../shared/contracts/review.ts';

export type GroupBy = 'seal' | 'projectile' | 'none';

export type { TrendPoint };

export interface CampaignTrends {
  /** With the campaign's launcher tube (m; null when not logged). */
  campaign: { id: string; name: string; tubeLengthM: number | null; boreM: number | null };
  groupBy: GroupBy;
  points: TrendPoint[];
  groups: TrendGroupStats[];
  /** The launcher model with losses fitted to the campaign's shots (its tube and most used projectile). */
  launcherFit: LauncherFitView;
}

/** The group a point belongs to, by the same rule as the server's statistics. */
export const groupKeyOf = (p: TrendPoint, groupBy: GroupBy) => (groupBy === 'seal' ? p.sealType : groupBy === 'projectile' ? p.projectileId ?? '' : 'all');

/** GET /api/labs/:labId/campaigns/:campaignId/trends?groupBy=… */
export const fetchCampaignTrends = (labId: string, campaignId: string, groupBy: GroupBy) =>
  api.get<CampaignTrends>(`/api/labs/${labId}/campaigns/${campaignId}/trends?groupBy=${groupBy}`);

export const campaignTrendsQueryOptions = (labId: string, campaignId: string, groupBy: GroupBy) =>
  queryOptions({
    queryKey: ['labs', labId, 'campaigns', campaignId, 'trends', groupBy] as const,
    queryFn: () => fetchCampaignTrends(labId, campaignId, groupBy),
    placeholderData: keepPreviousData,
  });

export const useCampaignTrends = (labId: string, campaignId: string, groupBy: GroupBy) => useQuery(campaignTrendsQueryOptions(labId, campaignId, groupBy));
