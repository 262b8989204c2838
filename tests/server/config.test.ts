/** Rate-limit and mail settings read from the environment by server/main.ts. */
import { describe, expect, it } from 'vitest';
import { DEFAULT_RATE_LIMITS, planMail, rateLimitsFromEnv } from '../../server/config';

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
  it('reads the per-address sign-in ceiling, which stays looser than the per-account limit by default', () => {
    expect(rateLimitsFromEnv({ NODE_ENV: 'production', TETRAWELL_RATE_LIMIT_SIGN_IN_ADDRESS: 9 }).signInAddress.limit).toBe(9);
    expect(DEFAULT_RATE_LIMITS.signInAddress.limit).toBeGreaterThan(DEFAULT_RATE_LIMITS.signIn.limit);
  });
});

describe('rateLimitsFromEnv: confirmation, reset confirm and password change', () => {
  it('has a rule for each, lifted under NODE_ENV=test, explicit settings winning', () => {
    const r = rateLimitsFromEnv({ NODE_ENV: 'test', TETRAWELL_RATE_LIMIT_VERIFY: 5, TETRAWELL_RATE_LIMIT_RESET_CONFIRM: 6, TETRAWELL_RATE_LIMIT_PASSWORD_CHANGE: 7 });
    expect([r.verifyEmail.limit, r.resetConfirm.limit, r.passwordChange.limit]).toEqual([5, 6, 7]);
    const lifted = rateLimitsFromEnv({ NODE_ENV: 'test' });
    expect(lifted.verifyEmail.limit).toBe(Math.max(1000, DEFAULT_RATE_LIMITS.verifyEmail.limit));
    expect(lifted.passwordChange.windowMs).toBe(DEFAULT_RATE_LIMITS.passwordChange.windowMs);
  });
});

describe('planMail', () => {
  it('uses a real SMTP host whenever one is set, also in production', () => {
    expect(planMail({ NODE_ENV: 'production', SMTP_HOST: 'smtp.lab.example', TETRAWELL_FAKE_SMTP_PORT: 2525 })).toEqual({ kind: 'smtp' });
    expect(planMail({ SMTP_HOST: 'smtp.lab.example' })).toEqual({ kind: 'smtp' });
  });
  it('runs the loopback mail sink in development and tests', () => {
    expect(planMail({ NODE_ENV: 'development', TETRAWELL_FAKE_SMTP_PORT: 2525 })).toEqual({ kind: 'fake', port: 2525 });
    expect(planMail({ NODE_ENV: 'test', TETRAWELL_FAKE_SMTP_PORT: 0 })).toEqual({ kind: 'fake', port: 0 });
    expect(planMail({})).toEqual({ kind: 'none' });
  });
  it('refuses the mail sink under NODE_ENV=production and says to set SMTP_HOST', () => {
    expect(() => planMail({ NODE_ENV: 'production', TETRAWELL_FAKE_SMTP_PORT: 2525 })).toThrow(/SMTP_HOST/);
    expect(() => planMail({ NODE_ENV: 'production', TETRAWELL_FAKE_SMTP_PORT: 2525 })).toThrow(/mail sink/);
  });
  it('refuses production without any SMTP server (confirmation links could not be sent)', () => {
    expect(() => planMail({ NODE_ENV: 'production' })).toThrow(/SMTP_HOST/);
  });
});
