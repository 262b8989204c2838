// POST /api/auth/sign-in. The server regenerates the session, so the cached CSRF token is dropped.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { signInBodySchema } from '@contracts/api';
import { api, forgetCsrfToken } from '../../lib/api';
import { meQuery } from './me';

export type SignInBody = z.input<typeof signInBodySchema>;

export async function signIn(body: SignInBody): Promise<void> {
  await api('/api/auth/sign-in', { method: 'POST', body });
  forgetCsrfToken();
}

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: signIn,
    onSuccess: async () => {
      // Everything cached belonged to the previous session (or none).
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== meQuery().queryKey[0] });
      await qc.invalidateQueries({ queryKey: meQuery().queryKey });
    },
  });
}
