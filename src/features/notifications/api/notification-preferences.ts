import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { NotificationPreferences, NotificationPreferencesBody } from '../../../../shared/contracts/review.ts';

export const notificationKeys = { preferences: ['me', 'notifications'] as const };

/** GET /api/me/notifications: which kinds of e-mail the signed-in user receives. */
export const fetchNotificationPreferences = () => api.get<{ preferences: NotificationPreferences }>('/api/me/notifications').then((r) => r.preferences);

export const notificationPreferencesQueryOptions = () =>
  queryOptions({ queryKey: notificationKeys.preferences, queryFn: fetchNotificationPreferences });

export const useNotificationPreferences = () => useQuery(notificationPreferencesQueryOptions());

/** PATCH /api/me/notifications with the kinds that change; the answer is the whole new set. */
export function useUpdateNotificationPreferences() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: NotificationPreferencesBody) => api.patch<{ preferences: NotificationPreferences }>('/api/me/notifications', body).then((r) => r.preferences),
    // The switch moves at once; a refusal puts it back and the card shows why.
    onMutate: async (body) => {
      await queryClient.cancelQueries({ queryKey: notificationKeys.preferences });
      const before = queryClient.getQueryData<NotificationPreferences>(notificationKeys.preferences);
      if (before) queryClient.setQueryData<NotificationPreferences>(notificationKeys.preferences, { ...before, ...body } as NotificationPreferences);
      return { before };
    },
    onError: (_error, _body, context) => {
      if (context?.before) queryClient.setQueryData(notificationKeys.preferences, context.before);
    },
    onSuccess: (preferences) => queryClient.setQueryData(notificationKeys.preferences, preferences),
  });
}
