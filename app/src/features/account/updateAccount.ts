// PATCH /api/account { displayName, version }: a stale version is answered 409.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { accountUpdateBodySchema } from '@contracts/api';
import { api } from '../../lib/api';
import { meQuery } from '../auth/me';

export type AccountUpdateBody = z.input<typeof accountUpdateBodySchema>;

export async function updateAccount(body: AccountUpdateBody): Promise<void> {
  await api('/api/account', { method: 'PATCH', body });
}

export function useUpdateAccount() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: updateAccount,
    onSuccess: () => qc.invalidateQueries({ queryKey: meQuery().queryKey }),
  });
}
