import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { labKeys } from '../../labs/api/members.ts';

export interface AuditRow {
  id: string; at: string; action: string; actor: string | null; targetType: string | null; targetId: string | null;
  details: Record<string, unknown>;
}

export const auditQueryOptions = (labId: string) =>
  queryOptions({ queryKey: labKeys.audit(labId), queryFn: () => api.get<{ events: AuditRow[] }>(`/api/labs/${labId}/audit?limit=200`) });

export const useAudit = (labId: string) => useQuery(auditQueryOptions(labId));
