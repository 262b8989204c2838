// POST /api/auth/sign-up. Creates the account and signs it in (a new session: drop the CSRF token).
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { signUpBodySchema } from '@contracts/api';
import { api, forgetCsrfToken } from '../../lib/api';
import { meQuery } from './me';

export type SignUpBody = z.input<typeof signUpBodySchema>;

export async function signUp(body: SignUpBody): Promise<void> {
  await api('/api/auth/sign-up', { method: 'POST', body });
  forgetCsrfToken();
}

export function useSignUp() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: signUp,
    onSuccess: async () => {
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== meQuery().queryKey[0] });
      await qc.invalidateQueries({ queryKey: meQuery().queryKey });
    },
  });
}
