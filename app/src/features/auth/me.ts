// GET /api/auth/me: who is signed in. A 401 here is not an error, it means "signed out" (null).
import { queryOptions, useQuery } from '@tanstack/react-query';
import { meResponseSchema, type User } from '@contracts/api';
import { api, ApiError } from '../../lib/api';

export async function fetchMe(signal?: AbortSignal): Promise<User | null> {
  try {
    const { user } = await api('/api/auth/me', { signal }, meResponseSchema);
    return user;
  } catch (err) {
    if (err instanceof ApiError && err.status === 401) return null;
    throw err;
  }
}

export const meQuery = () =>
  queryOptions({
    queryKey: ['auth', 'me'] as const,
    queryFn: ({ signal }) => fetchMe(signal),
    staleTime: 60_000,
  });

export function useMe() {
  return useQuery(meQuery());
}
