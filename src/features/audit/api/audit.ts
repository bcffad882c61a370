import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { labKeys } from '../../labs/api/members.ts';

export interface AuditRow {
  id: string; at: string; action: string; actor: string | null; actorId: string | null; targetType: string | null; targetId: string | null;
  details: Record<string, unknown>;
  shot: { id: string; number: number; campaignId: string; campaignName: string | null } | null;
  campaign: { id: string; name: string | null } | null;
}

/** The latest 500 events; the page filters them by shot, person and kind without asking again. */
export const auditQueryOptions = (labId: string) =>
  queryOptions({ queryKey: labKeys.audit(labId), queryFn: () => api.get<{ events: AuditRow[] }>(`/api/labs/${labId}/audit?limit=500`) });

export const useAudit = (labId: string) => useQuery(auditQueryOptions(labId));
