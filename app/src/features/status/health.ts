// GET /api/health: is the server up and can it reach its database? Shown quietly in the footer.
import { queryOptions, useQuery } from '@tanstack/react-query';
import { healthSchema } from '@contracts/api';
import { api } from '../../lib/api';

export function fetchHealth(signal?: AbortSignal) {
  return api('/api/health', { signal }, healthSchema);
}

export const healthQuery = () =>
  queryOptions({
    queryKey: ['health'] as const,
    queryFn: ({ signal }) => fetchHealth(signal),
    refetchInterval: 60_000,
    retry: false,
  });

export function useHealth() {
  return useQuery(healthQuery());
}
