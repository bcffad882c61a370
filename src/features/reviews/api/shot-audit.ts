import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';

export interface ShotAuditEvent { id: string; at: string; action: string; actor: string | null; details: Record<string, unknown> | null }

/** GET /api/shots/:shotId/audit (admins and reviewers): everything done to the shot, oldest first. */
export const fetchShotAudit = (shotId: string) => api.get<{ events: ShotAuditEvent[] }>(`/api/shots/${shotId}/audit`).then((r) => r.events);

export const shotAuditQueryOptions = (shotId: string, status: string) =>
  queryOptions({ queryKey: ['shots', shotId, 'audit', status] as const, queryFn: () => fetchShotAudit(shotId) });

export const useShotAudit = (shotId: string, status: string, enabled: boolean) => useQuery({ ...shotAuditQueryOptions(shotId, status), enabled });
