/** Rate-limit settings read from the environment by server/main.ts. */
import { describe, expect, it } from 'vitest';
import { DEFAULT_RATE_LIMITS, rateLimitsFromEnv } from '../../server/config';

describe('rateLimitsFromEnv', () => {
  it('keeps the defaults outside tests', () => {
    expect(rateLimitsFromEnv({ NODE_ENV: 'production' })).toEqual(DEFAULT_RATE_LIMITS);
  });
  it('lifts the defaults to at least 1000 under NODE_ENV=test', () => {
    const r = rateLimitsFromEnv({ NODE_ENV: 'test' });
    expect(r.signIn.limit).toBe(Math.max(1000, DEFAULT_RATE_LIMITS.signIn.limit));
    expect(r.signUp.windowMs).toBe(DEFAULT_RATE_LIMITS.signUp.windowMs);
  });
  it('explicit settings win, also under NODE_ENV=test', () => {
    const r = rateLimitsFromEnv({ NODE_ENV: 'test', TETRAWELL_RATE_LIMIT_SIGN_IN: 3, TETRAWELL_RATE_LIMIT_RESET: 4 });
    expect([r.signIn.limit, r.passwordReset.limit]).toEqual([3, 4]);
  });
});
