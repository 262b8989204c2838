// POST /api/auth/sign-out. Clears every cached read: none of it may outlive the session.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, forgetCsrfToken } from '../../lib/api';
import { meQuery } from './me';

export async function signOut(): Promise<void> {
  try {
    await api('/api/auth/sign-out', { method: 'POST' });
  } finally {
    forgetCsrfToken();
  }
}

export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: signOut,
    onSettled: () => {
      qc.clear();
      qc.setQueryData(meQuery().queryKey, null);
    },
  });
}
