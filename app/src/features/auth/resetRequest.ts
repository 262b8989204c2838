// POST /api/auth/password-reset/request. The answer never says whether the address has an account.
import { useMutation } from '@tanstack/react-query';
import type { z } from 'zod';
import type { resetRequestBodySchema } from '@contracts/api';
import { api } from '../../lib/api';

export type ResetRequestBody = z.input<typeof resetRequestBodySchema>;

export async function requestPasswordReset(body: ResetRequestBody): Promise<void> {
  await api('/api/auth/password-reset/request', { method: 'POST', body });
}

export function useRequestPasswordReset() {
  return useMutation({ mutationFn: requestPasswordReset });
}
