import { QueryClientProvider, useQueryClient } from '@tanstack/react-query';
import { useEffect, useState, type ReactNode } from 'react';
import { onUnauthorized } from '../lib/api-client.ts';
import { createQueryClient } from '../lib/query-client.ts';
import { meKey } from '../features/auth/api/me.ts';

/** When any request finds the session gone, forget the user; RequireAuth then sends them to sign in. */
function SessionWatcher() {
  const queryClient = useQueryClient();
  useEffect(() => onUnauthorized(() => queryClient.setQueryData(meKey, null)), [queryClient]);
  return null;
}

export function AppProvider({ children }: { children: ReactNode }) {
  const [queryClient] = useState(createQueryClient);
  return (
    <QueryClientProvider client={queryClient}>
      <SessionWatcher />
      {children}
    </QueryClientProvider>
  );
}
