// GET /api/account/tokens: the signed-in user's personal API tokens (never their secrets)
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiTokenListSchema } from '@contracts/api';
import { api } from '../../lib/api';

export async function fetchApiTokens(signal?: AbortSignal) {
  return (await api('/api/account/tokens', { signal }, apiTokenListSchema)).tokens;
}

export const apiTokensQuery = () => queryOptions({ queryKey: ['account', 'tokens'] as const, queryFn: ({ signal }) => fetchApiTokens(signal) });

export function useApiTokens() {
  return useQuery(apiTokensQuery());
}
