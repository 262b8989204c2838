// POST /api/account/password { currentPassword, newPassword }
import { useMutation } from '@tanstack/react-query';
import type { z } from 'zod';
import type { passwordChangeBodySchema } from '@contracts/api';
import { api } from '../../lib/api';

export type PasswordChangeBody = z.input<typeof passwordChangeBodySchema>;

export async function changePassword(body: PasswordChangeBody): Promise<void> {
  await api('/api/account/password', { method: 'POST', body });
}

export function useChangePassword() {
  return useMutation({ mutationFn: changePassword });
}
