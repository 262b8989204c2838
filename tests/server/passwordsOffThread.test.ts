/**
 * bcrypt runs off the request thread (server/workers/passwordHash.ts). bcryptjs is JavaScript: at cost 12 a hash or a
 * comparison held the thread that answers requests for ~270 ms, in slices of up to ~100 ms (measured with
 * perf_hooks.monitorEventLoopDelay: max 101.9 ms). The server's sign-up, sign-in, wrong password, unknown address and
 * password change must not call bcryptjs on this thread at all, and the hashes made in the worker must be ones that
 * bcryptjs itself (the npm reference library) verifies here.
 */
import bcrypt from 'bcryptjs';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { passwordHasher } from '../../server/workers/passwordHash';
import { TEST_PASSWORD, newUser, startTestEnv, uniqueEmail, type TestEnv } from './helpers';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.stop();
});
afterEach(() => {
  vi.restoreAllMocks();
});

describe('passwords are hashed and compared off the request thread', () => {
  it('sign-up, sign-in, a wrong password, an unknown address and a password change call bcryptjs on no request', async () => {
    const hash = vi.spyOn(bcrypt, 'hash');
    const compare = vi.spyOn(bcrypt, 'compare');
    const hashSync = vi.spyOn(bcrypt, 'hashSync');
    const compareSync = vi.spyOn(bcrypt, 'compareSync');
    const { client, email } = await newUser(env, 'offthread');
    await client.signOut();
    expect((await client.post('/api/auth/sign-in', { email, password: 'not the password at all' })).status).toBe(401);
    expect((await client.post('/api/auth/sign-in', { email: uniqueEmail('nobody'), password: TEST_PASSWORD })).status).toBe(401);
    const me = await client.signIn(email);
    expect(me.email).toBe(email);
    const changed = await client.post('/api/account/password', { currentPassword: TEST_PASSWORD, newPassword: 'a new long passphrase 2026' });
    expect(changed.status).toBeLessThan(300);
    await client.signOut();
    expect((await client.post('/api/auth/sign-in', { email, password: 'a new long passphrase 2026' })).status).toBe(200);
    for (const spy of [hash, compare, hashSync, compareSync]) expect(spy).not.toHaveBeenCalled();
  });

  it('makes hashes that bcryptjs verifies on this thread, and compares like bcryptjs', async () => {
    const hasher = passwordHasher({ rounds: 6, maxThreads: 1 });
    try {
      const h = await hasher.hash('silicon donor row');
      // the modular crypt format of bcrypt: $2b$ (or $2a$/$2y$), the cost, 53 characters of salt and digest
      expect(h).toMatch(/^\$2[aby]\$06\$[./A-Za-z0-9]{53}$/);
      expect(bcrypt.compareSync('silicon donor row', h)).toBe(true);
      expect(await hasher.compare('silicon donor row', h)).toBe(true);
      expect(await hasher.compare('silicon donor rows', h)).toBe(false);
      // and a hash bcryptjs made here compares the same in the worker
      const here = bcrypt.hashSync('phosphorus', 5);
      expect(await hasher.compare('phosphorus', here)).toBe(true);
      expect(await hasher.compare('arsenic', here)).toBe(false);
    } finally {
      await hasher.close();
    }
  });
});
