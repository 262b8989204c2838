/**
 * Rate limiting on sign-in, sign-up, password-reset requests, e-mail confirmation,
 * password-reset confirmation and password change (OWASP Authentication cheat sheet:
 * throttle credential and token guessing). Limits are configured small here so the test
 * reaches them; the production defaults live in server/config.ts.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { errorBodySchema } from '@contracts/api';
import { newUser, RELAXED_LIMITS, startTestEnv, TEST_PASSWORD, uniqueEmail, type TestEnv } from './helpers';

const SIGN_IN_LIMIT = 3;
const SIGN_UP_LIMIT = 2;
const RESET_LIMIT = 2;

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv({
    rateLimits: {
      signIn: { windowMs: 60_000, limit: SIGN_IN_LIMIT },
      signInAddress: { windowMs: 60_000, limit: 50 },
      signUp: { windowMs: 60_000, limit: SIGN_UP_LIMIT },
      passwordReset: { windowMs: 60_000, limit: RESET_LIMIT },
    },
  });
});
afterAll(async () => {
  await env?.stop();
});

describe('rate limits', () => {
  it(`answers 429 after ${SIGN_IN_LIMIT} failed sign-ins to one account, even with the right password`, async () => {
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

  // issue 8, item 4: one person's typos behind a shared address must not lock out the lab
  it('successful sign-ins do not count, and another account from the same address is not locked out', async () => {
    const email = uniqueEmail('rlok');
    await env.client().signUp(email); // the second sign-up of the SIGN_UP_LIMIT
    for (let i = 0; i < SIGN_IN_LIMIT + 3; i++) {
      expect((await env.client().post('/api/auth/sign-in', { email, password: TEST_PASSWORD })).status).toBe(200);
    }
    // a colleague's failures (on another account, from this same address) leave this account alone
    const c = env.client();
    for (let i = 0; i < SIGN_IN_LIMIT + 1; i++) await c.post('/api/auth/sign-in', { email: uniqueEmail('typo'), password: 'wrong-' + i });
    for (let i = 0; i < SIGN_IN_LIMIT; i++) expect((await c.post('/api/auth/sign-in', { email, password: 'wrong-again-' + i })).status).toBe(401);
    // failures on this account are counted per account, case and spaces aside
    expect((await c.post('/api/auth/sign-in', { email: ` ${email.toUpperCase()} `, password: TEST_PASSWORD })).status).toBe(429);
  });

  it(`answers 429 after ${SIGN_UP_LIMIT} sign-ups and creates no account`, async () => {
    // the first two tests used both sign-up slots
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

describe('per-address ceiling on failed sign-ins (password spraying)', () => {
  const ADDRESS_LIMIT = 4;
  let spray: TestEnv;
  beforeAll(async () => {
    spray = await startTestEnv({
      rateLimits: { ...RELAXED_LIMITS, signIn: { windowMs: 60_000, limit: 100 }, signInAddress: { windowMs: 60_000, limit: ADDRESS_LIMIT } },
    });
  });
  afterAll(async () => {
    await spray?.stop();
  });

  it(`answers 429 after ${ADDRESS_LIMIT} failures on as many different accounts from one address`, async () => {
    const victim = uniqueEmail('sprayed');
    await spray.client().signUp(victim);
    // a success does not use up the ceiling
    expect((await spray.client().post('/api/auth/sign-in', { email: victim, password: TEST_PASSWORD })).status).toBe(200);
    const c = spray.client();
    for (let i = 0; i < ADDRESS_LIMIT; i++) expect((await c.post('/api/auth/sign-in', { email: uniqueEmail('spray'), password: 'Summer2026!' })).status).toBe(401);
    const blocked = await c.post('/api/auth/sign-in', { email: uniqueEmail('spray'), password: 'Summer2026!' });
    expect(blocked.status).toBe(429);
    expect(errorBodySchema.parse(blocked.body).error.code).toBe('rate_limited');
    expect(blocked.headers['ratelimit-policy']).toContain(`q=${ADDRESS_LIMIT}`);
  });
});

const TOKEN_LIMIT = 3;

describe('rate limits on confirmation links, reset confirmation and password change', () => {
  let tight: TestEnv;
  beforeAll(async () => {
    tight = await startTestEnv({
      rateLimits: {
        ...RELAXED_LIMITS,
        verifyEmail: { windowMs: 60_000, limit: TOKEN_LIMIT },
        resetConfirm: { windowMs: 60_000, limit: TOKEN_LIMIT },
        passwordChange: { windowMs: 60_000, limit: TOKEN_LIMIT },
      },
    });
  });
  afterAll(async () => {
    await tight?.stop();
  });

  /** `TOKEN_LIMIT` refused guesses, then a 429 even for a request that would otherwise be answered differently */
  async function exhaust(call: (i: number) => Promise<{ status: number; body: unknown }>, refusedWith: number) {
    const statuses: number[] = [];
    for (let i = 0; i < TOKEN_LIMIT; i++) statuses.push((await call(i)).status);
    expect(statuses).toEqual(Array(TOKEN_LIMIT).fill(refusedWith));
    const blocked = await call(TOKEN_LIMIT);
    expect(blocked.status).toBe(429);
    expect(errorBodySchema.parse(blocked.body).error.code).toBe('rate_limited');
  }

  it(`POST /api/auth/password-reset/confirm answers 429 after ${TOKEN_LIMIT} attempts`, async () => {
    const c = tight.client();
    await exhaust((i) => c.post('/api/auth/password-reset/confirm', { token: `guess-${i}-`.padEnd(43, 'x'), password: 'some-new-passphrase' }), 422);
  });

  it(`POST /api/account/password answers 429 after ${TOKEN_LIMIT} attempts, even with the right current password`, async () => {
    const u = await newUser(tight, 'rlpw');
    await exhaust(
      (i) =>
        u.client.post('/api/account/password', {
          currentPassword: i < TOKEN_LIMIT ? `wrong-guess-${i}` : TEST_PASSWORD,
          newPassword: 'another-passphrase-9',
        }),
      422,
    );
    // the password did not change
    expect((await tight.client().post('/api/auth/sign-in', { email: u.email, password: TEST_PASSWORD })).status).toBe(200);
  });

  // last: newUser above confirmed its address through this route once, which counts against the limit
  it(`POST /api/auth/verify answers 429 after ${TOKEN_LIMIT} attempts`, async () => {
    const c = tight.client();
    const used = 1;
    const statuses: number[] = [];
    for (let i = used; i < TOKEN_LIMIT; i++) statuses.push((await c.post('/api/auth/verify', { token: `guess-${i}-`.padEnd(43, 'x') })).status);
    expect(statuses).toEqual(Array(TOKEN_LIMIT - used).fill(422));
    const blocked = await c.post('/api/auth/verify', { token: 'y'.repeat(43) });
    expect(blocked.status).toBe(429);
    expect(errorBodySchema.parse(blocked.body).error.code).toBe('rate_limited');
  });
});
