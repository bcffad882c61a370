import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { LauncherFitView } from '../../../../shared/contracts/launcher-fit.ts';
import type { ShotSelection, TrendGroupStats, TrendPoint } from '../../../../shared/contracts/review.ts';

export type GroupBy = 'seal' | 'projectile' | 'vacuum' | 'none';

export type { ShotSelection, TrendPoint };

/** What the trends page asks for: the grouping, which shots, and (grouped by vacuum) the bin edges in Pa (null: per decade). */
export interface TrendsRequest { groupBy: GroupBy; shots: ShotSelection; vacuumEdgesPa: number[] | null }

export interface CampaignTrends {
  /** With the campaign's launcher tube (m; null when not logged). */
  campaign: { id: string; name: string; tubeLengthM: number | null; boreM: number | null };
  groupBy: GroupBy;
  shots?: ShotSelection;
  points: TrendPoint[];
  groups: TrendGroupStats[];
  /** The launcher model with losses fitted to the campaign's shots (its tube and most used projectile). */
  launcherFit: LauncherFitView;
}

/** The group a point belongs to: the server's key on the point, else (older servers) the same rule as its statistics. */
export const groupKeyOf = (p: TrendPoint, groupBy: GroupBy) =>
  p.group ?? (groupBy === 'seal' ? p.sealType : groupBy === 'projectile' ? p.projectileId ?? '' : 'all');

/** The query string of a trends request (the export links use its `shots` too). */
export function trendsSearch(r: TrendsRequest): string {
  const q = new URLSearchParams({ groupBy: r.groupBy });
  if (r.shots !== 'all') q.set('shots', r.shots);
  if (r.groupBy === 'vacuum' && r.vacuumEdgesPa) q.set('vacuumEdgesPa', r.vacuumEdgesPa.join(','));
  return q.toString();
}

/** GET /api/labs/:labId/campaigns/:campaignId/trends?groupBy=…&shots=…&vacuumEdgesPa=… */
export const fetchCampaignTrends = (labId: string, campaignId: string, r: TrendsRequest) =>
  api.get<CampaignTrends>(`/api/labs/${labId}/campaigns/${campaignId}/trends?${trendsSearch(r)}`);

export const campaignTrendsQueryOptions = (labId: string, campaignId: string, r: TrendsRequest) =>
  queryOptions({
    queryKey: ['labs', labId, 'campaigns', campaignId, 'trends', r.groupBy, r.shots, r.groupBy === 'vacuum' ? r.vacuumEdgesPa?.join(',') ?? 'decade' : null] as const,
    queryFn: () => fetchCampaignTrends(labId, campaignId, r),
    placeholderData: keepPreviousData,
  });

export const useCampaignTrends = (labId: string, campaignId: string, r: TrendsRequest) => useQuery(campaignTrendsQueryOptions(labId, campaignId, r));
