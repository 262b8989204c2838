/**
 * Rate limiting on sign-in, sign-up and password-reset requests (OWASP Authentication
 * cheat sheet: throttle credential guessing). Limits are configured small here so the
 * test reaches them; the production defaults live in server/config.ts.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { errorBodySchema } from '@contracts/api';
import { startTestEnv, TEST_PASSWORD, uniqueEmail, type TestEnv } from './helpers';

const SIGN_IN_LIMIT = 3;
const SIGN_UP_LIMIT = 2;
const RESET_LIMIT = 2;

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv({
    rateLimits: {
      signIn: { windowMs: 60_000, limit: SIGN_IN_LIMIT },
      signUp: { windowMs: 60_000, limit: SIGN_UP_LIMIT },
      passwordReset: { windowMs: 60_000, limit: RESET_LIMIT },
    },
  });
});
afterAll(async () => {
  await env?.stop();
});

describe('rate limits', () => {
  it(`answers 429 after ${SIGN_IN_LIMIT} sign-in attempts, even with the right password`, async () => {
    const email = uniqueEmail('rl');
    const owner = env.client();
    await owner.signUp(email); // one sign-up of the SIGN_UP_LIMIT
    const c = env.client();
    const statuses: number[] = [];
    for (let i = 0; i < SIGN_IN_LIMIT; i++) statuses.push((await c.post('/api/auth/sign-in', { email, password: 'wrong-guess-' + i })).status);
    expect(statuses).toEqual(Array(SIGN_IN_LIMIT).fill(401));
    const blocked = await c.post('/api/auth/sign-in', { email, password: TEST_PASSWORD });
    expect(blocked.status).toBe(429);
    expect(errorBodySchema.parse(blocked.body).error.code).toBe('rate_limited');
    // IETF draft-ietf-httpapi-ratelimit-headers (draft 8): RateLimit-Policy / RateLimit
    expect(blocked.headers['ratelimit-policy']).toContain(`q=${SIGN_IN_LIMIT}`);
  });

  it(`answers 429 after ${SIGN_UP_LIMIT} sign-ups and creates no account`, async () => {
    // the first test used one sign-up slot; use the rest
    const used = 1;
    for (let i = used; i < SIGN_UP_LIMIT; i++) expect((await env.client().post('/api/auth/sign-up', { email: uniqueEmail('rlsu'), password: TEST_PASSWORD, displayName: 'R' })).status).toBe(201);
    const email = uniqueEmail('rlblocked');
    const r = await env.client().post('/api/auth/sign-up', { email, password: TEST_PASSWORD, displayName: 'Blocked' });
    expect(r.status).toBe(429);
    expect(await env.knex('users').where({ email }).first()).toBeUndefined();
  });

  it(`answers 429 after ${RESET_LIMIT} password-reset requests`, async () => {
    for (let i = 0; i < RESET_LIMIT; i++) expect((await env.client().post('/api/auth/password-reset/request', { email: uniqueEmail('rr') })).status).toBe(202);
    expect((await env.client().post('/api/auth/password-reset/request', { email: uniqueEmail('rr') })).status).toBe(429);
  });
});
