/**
 * A 401 Unauthorized answer (RFC 9110 §15.5.2) on any read or write means the session is gone:
 * the client marks the user signed out so the route guard sends them to sign in. Other
 * refusals (403 Forbidden, 409 Conflict) leave the session alone.
 */
import { describe, expect, it } from 'vitest';
import type { User } from '@contracts/api';
import { ApiError } from '../../app/src/lib/api';
import { createQueryClient } from '../../app/src/lib/queryClient';
import { meQuery } from '../../app/src/features/auth/me';

const user: User = { id: 1, email: 'a@lab.example', displayName: 'A', siteRole: 'member', version: 1 };

function failingRead(status: number) {
  return { queryKey: ['projects', status], queryFn: async () => { throw new ApiError(status, 'forbidden', 'no'); }, retry: false } as const;
}

describe('session loss', () => {
  it('a 401 on a read marks the user signed out; 403 and 409 do not', async () => {
    for (const status of [401, 403, 409]) {
      const qc = createQueryClient();
      qc.setQueryData(meQuery().queryKey, user);
      await qc.fetchQuery(failingRead(status)).catch(() => undefined);
      expect(qc.getQueryData(meQuery().queryKey)).toEqual(status === 401 ? null : user);
    }
  });

  it('a 401 on a write marks the user signed out; a 422 does not', async () => {
    for (const status of [401, 422]) {
      const qc = createQueryClient();
      qc.setQueryData(meQuery().queryKey, user);
      const mutation = qc.getMutationCache().build(qc, { mutationFn: async () => { throw new ApiError(status, 'unauthenticated', 'no'); } });
      await mutation.execute(undefined).catch(() => undefined);
      expect(qc.getQueryData(meQuery().queryKey)).toEqual(status === 401 ? null : user);
    }
  });
});
