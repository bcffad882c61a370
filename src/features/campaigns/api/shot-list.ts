import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { labKeys } from '../../labs/api/members.ts';
import type { ShotRow } from './campaigns.ts';

export const SHOT_SORT_FIELDS = ['number', 'firedAt', 'tubePressure', 'speed', 'status'] as const;
export type ShotSortField = (typeof SHOT_SORT_FIELDS)[number];
export type SortDirection = 'asc' | 'desc';

export interface ShotListParams {
  campaignId: string;
  sort: ShotSortField;
  direction: SortDirection;
  /** Comma-separated statuses, or '' for all. */
  status: string;
  q: string;
  limit: number;
  offset: number;
}

/** A row of the campaign's shot table: the shot, the current speed (m/s) and the latest review decision. */
export interface ShotListRow extends ShotRow {
  projectileId: string | null;
  gateRigId: string | null;
  speed: { value: number; uncertainty: number | null; method: string | null; basis: string | null } | null;
  review: { decision: 'approved' | 'returned'; decidedAt: string } | null;
}

export interface ShotListPage { shots: ShotListRow[]; total: number; limit: number; offset: number }

export const shotListKeys = {
  all: (labId: string) => [...labKeys.all(labId), 'shots'] as const,
  list: (labId: string, params: ShotListParams) => [...shotListKeys.all(labId), 'list', params] as const,
};

export function fetchShotList(labId: string, p: ShotListParams): Promise<ShotListPage> {
  const search = new URLSearchParams({ campaignId: p.campaignId, sort: `${p.sort}:${p.direction}`, limit: String(p.limit), offset: String(p.offset) });
  if (p.status) search.set('status', p.status);
  if (p.q.trim()) search.set('q', p.q.trim());
  return api.get<ShotListPage>(`/api/labs/${labId}/shots?${search}`);
}

export const shotListQueryOptions = (labId: string, params: ShotListParams) =>
  queryOptions({
    queryKey: shotListKeys.list(labId, params),
    queryFn: () => fetchShotList(labId, params),
    // The table keeps the last page on screen while the next sort, filter or page loads, instead of flashing empty.
    placeholderData: keepPreviousData,
  });

export const useShotList = (labId: string, params: ShotListParams) => useQuery(shotListQueryOptions(labId, params));
