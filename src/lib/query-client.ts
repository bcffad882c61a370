import { QueryClient } from '@tanstack/react-query';
import { ApiError } from './api-client.ts';

export function createQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        // Retrying a 4xx cannot help; network blips and 503s (database restarting) get two more tries.
        retry: (count, error) => count < 2 && (!(error instanceof ApiError) || error.status === 0 || error.status >= 500),
        refetchOnWindowFocus: false,
      },
    },
  });
}
