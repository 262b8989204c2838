// GET and PUT /api/account/notifications { jobMail }: the job e-mail switch
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { accountNotificationsSchema } from '@contracts/api';
import { api } from '../../lib/api';

export const notificationsQuery = () =>
  queryOptions({
    queryKey: ['account', 'notifications'] as const,
    queryFn: ({ signal }) => api('/api/account/notifications', { signal }, accountNotificationsSchema),
  });

export function useNotifications() {
  return useQuery(notificationsQuery());
}

export function useSetNotifications() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (jobMail: boolean) => api('/api/account/notifications', { method: 'PUT', body: { jobMail } }, accountNotificationsSchema),
    onSettled: () => qc.invalidateQueries({ queryKey: notificationsQuery().queryKey }),
  });
}
