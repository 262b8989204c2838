// POST /api/auth/password-reset/confirm: set a new password with the token from the e-mailed link.
import { useMutation } from '@tanstack/react-query';
import type { z } from 'zod';
import type { resetConfirmBodySchema } from '@contracts/api';
import { api } from '../../lib/api';

export type ResetConfirmBody = z.input<typeof resetConfirmBodySchema>;

export async function confirmPasswordReset(body: ResetConfirmBody): Promise<void> {
  await api('/api/auth/password-reset/confirm', { method: 'POST', body });
}

export function useConfirmPasswordReset() {
  return useMutation({ mutationFn: confirmPasswordReset });
}
