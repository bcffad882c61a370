import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { labKeys } from '../../labs/api/members.ts';

export interface OutboxMessage { id: string; receivedAt: string; from: string; to: string[]; subject: string; text: string }

export const outboxQueryOptions = (labId: string) =>
  queryOptions({
    queryKey: labKeys.outbox(labId),
    queryFn: () => api.get<{ messages: OutboxMessage[] }>(`/api/labs/${labId}/outbox`),
    refetchInterval: 5_000,
  });

export const useOutbox = (labId: string) => useQuery(outboxQueryOptions(labId));
