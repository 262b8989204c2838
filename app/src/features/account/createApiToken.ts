// POST /api/account/tokens { name } → 201 { token, secret }: the secret is in this answer only
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiTokenCreatedSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { apiTokensQuery } from './listApiTokens';

export async function createApiToken(name: string) {
  return api('/api/account/tokens', { method: 'POST', body: { name } }, apiTokenCreatedSchema);
}

export function useCreateApiToken() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: createApiToken, onSettled: () => qc.invalidateQueries({ queryKey: apiTokensQuery().queryKey }) });
}
