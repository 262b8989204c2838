import { MutationCache, QueryCache, QueryClient } from '@tanstack/react-query';
import { ApiError } from './api';
import { meQuery } from '../features/auth/me';

/** Client errors (4xx) will not change on retry; network blips and 5xx get two more tries. */
export function shouldRetry(failureCount: number, error: unknown): boolean {
  if (error instanceof ApiError && error.status >= 400 && error.status < 500) return false;
  return failureCount < 2;
}

export function createQueryClient(): QueryClient {
  const client: QueryClient = new QueryClient({
    queryCache: new QueryCache({
      // A 401 on any read means the session ended (expired, or signed out in another tab):
      // mark the user signed out and the route guard sends them to sign in.
      onError: (error, query) => {
        if (error instanceof ApiError && error.status === 401 && query.queryKey[0] !== meQuery().queryKey[0]) {
          client.setQueryData(meQuery().queryKey, null);
        }
      },
    }),
    // The same for writes: a 401 answer to a write means there is no session any more.
    mutationCache: new MutationCache({
      onError: (error) => {
        if (error instanceof ApiError && error.status === 401) client.setQueryData(meQuery().queryKey, null);
      },
    }),
    defaultOptions: {
      queries: { retry: shouldRetry, staleTime: 10_000, refetchOnWindowFocus: true },
      mutations: { retry: false },
    },
  });
  return client;
}
