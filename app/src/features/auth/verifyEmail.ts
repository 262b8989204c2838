// POST /api/auth/verify: confirm the address with the token from the e-mailed link. The server
// signs the user in with a new session, so the cached CSRF token is dropped.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import { meResponseSchema, type User, type verifyEmailBodySchema } from '@contracts/api';
import { api, forgetCsrfToken } from '../../lib/api';
import { meQuery } from './me';

export type VerifyEmailBody = z.input<typeof verifyEmailBodySchema>;

export async function verifyEmail(body: VerifyEmailBody): Promise<User> {
  const { user } = await api('/api/auth/verify', { method: 'POST', body }, meResponseSchema);
  forgetCsrfToken();
  return user;
}

export function useVerifyEmail() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: verifyEmail,
    onSuccess: (user) => {
      // Everything cached belonged to the previous session (or none).
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== meQuery().queryKey[0] });
      qc.setQueryData(meQuery().queryKey, user);
    },
  });
}
