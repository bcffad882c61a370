import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { labKeys } from './members.ts';

export interface LabStorage {
  storage: { rawBytes: number; channelBytes: number; usedBytes: number; quotaBytes: number | null };
  limits: { fileBytes: number; requestBytes: number; channelsPerCapture: number; samplesPerChannel: number };
}

export const labStorageQueryOptions = (labId: string) =>
  queryOptions({ queryKey: labKeys.storage(labId), queryFn: () => api.get<LabStorage>(`/api/labs/${labId}/storage`) });

/** Lab admins only (members:manage); pass enabled=false for other roles. */
export const useLabStorage = (labId: string, enabled: boolean) => useQuery({ ...labStorageQueryOptions(labId), enabled });
