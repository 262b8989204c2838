// DELETE /api/account/tokens/:tokenId: requests with the token get 401 from then on
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { apiTokensQuery } from './listApiTokens';

export async function revokeApiToken(tokenId: number): Promise<void> {
  await api(`/api/account/tokens/${tokenId}`, { method: 'DELETE' });
}

export function useRevokeApiToken() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: revokeApiToken, onSettled: () => qc.invalidateQueries({ queryKey: apiTokensQuery().queryKey }) });
}
