// GET /api/admin/mail: e-mails caught by the local fake SMTP server (site admins only).
import { queryOptions, useQuery } from '@tanstack/react-query';
import { capturedMailListSchema } from '@contracts/api';
import { api } from '../../lib/api';

export async function fetchCapturedMail(signal?: AbortSignal) {
  return (await api('/api/admin/mail', { signal }, capturedMailListSchema)).messages;
}

export const capturedMailQuery = () =>
  queryOptions({
    queryKey: ['admin', 'mail'] as const,
    queryFn: ({ signal }) => fetchCapturedMail(signal),
    refetchInterval: 15_000,
  });

export function useCapturedMail() {
  return useQuery(capturedMailQuery());
}
