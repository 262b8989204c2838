/**
 * Sign-up with e-mail confirmation, following the OWASP Authentication cheat sheet on account
 * enumeration: the sign-up answer is the same for a new address and for one that already has
 * an account; only the e-mail (read by the owner of the address alone) differs. A confirmation
 * link is single use and expiring (as the OWASP Forgot Password cheat sheet asks of reset
 * links), and following it renews the session id like any sign-in (OWASP Session Management
 * cheat sheet: renew the id at a privilege change).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { errorBodySchema, signUpResponseSchema } from '@contracts/api';
import {
  countMail,
  expectSessionRotated,
  lastMailId,
  linkToken,
  newUser,
  sessionCookie,
  startTestEnv,
  TEST_PASSWORD,
  uniqueEmail,
  VERIFY_SUBJECT,
  waitForMail,
  type TestEnv,
} from './helpers';

const ATTEMPT_SUBJECT = /Someone tried to create a Tetrawell account/;

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv({ publicUrl: 'https://tetrawell.lab.test' });
});
afterAll(async () => {
  await env?.stop();
});

/** POST the sign-up form from a fresh client; the raw answer. */
function signUpForm(email: string, password = TEST_PASSWORD, displayName = 'Form Filler') {
  return env.client().post('/api/auth/sign-up', { email, password, displayName });
}

/** Sign up without confirming; resolves to the confirmation link's token. */
async function pendingSignUp(email: string, password = TEST_PASSWORD, displayName = 'Pending Person'): Promise<string> {
  const sinceId = await lastMailId(env.knex);
  expect((await signUpForm(email, password, displayName)).status).toBe(202);
  return linkToken((await waitForMail(env.knex, email, VERIFY_SUBJECT, { sinceId })).text, env.mailBase, 'verify');
}

describe('sign-up does not reveal whether an account exists', () => {
  it('answers a new and a known address with the same status and body, and mails each owner the right message', async () => {
    const known = await newUser(env, 'known');
    const fresh = uniqueEmail('fresh');
    const sinceId = await lastMailId(env.knex);

    const ca = env.client();
    const cb = env.client();
    const a = await ca.post('/api/auth/sign-up', { email: fresh, password: TEST_PASSWORD, displayName: 'Form Filler' });
    const b = await cb.post('/api/auth/sign-up', { email: known.email, password: TEST_PASSWORD, displayName: 'Form Filler' });
    expect(a.status).toBe(202);
    expect(b.status).toBe(a.status);
    expect(b.body).toEqual(a.body);
    expect(signUpResponseSchema.parse(a.body)).toEqual({ status: 'check-email' });
    expect(b.headers['content-type']).toBe(a.headers['content-type']);
    // neither answer signs anybody in
    expect((await ca.get('/api/auth/me')).status).toBe(401);
    expect((await cb.get('/api/auth/me')).status).toBe(401);

    // new address: a confirmation link under PUBLIC_URL, and an unconfirmed account
    const confirm = await waitForMail(env.knex, fresh, VERIFY_SUBJECT, { sinceId });
    expect(confirm.text).toMatch(/https:\/\/tetrawell\.lab\.test\/verify\/[A-Za-z0-9_-]{43}/);
    const row = await env.knex('users').where({ email: fresh }).first();
    expect(row.email_verified_at).toBeNull();
    // only the token's sha256 is stored
    const token = linkToken(confirm.text, env.mailBase, 'verify');
    const stored = await env.knex('email_verifications').where({ user_id: row.id }).first();
    expect(stored.token_hash).toMatch(/^[0-9a-f]{64}$/);
    expect(stored.token_hash).not.toContain(token);

    // known address: a note to the owner with the sign-in and reset links, no confirmation link
    const note = await waitForMail(env.knex, known.email, ATTEMPT_SUBJECT, { sinceId });
    expect(note.text).toContain('https://tetrawell.lab.test/sign-in');
    expect(note.text).toContain('https://tetrawell.lab.test/reset');
    expect(note.text).not.toMatch(/\/verify\//);
    expect(await countMail(env.knex, fresh)).toBe(1);

    // both are audited
    expect(await env.knex('audit_events').where({ actor_id: row.id, action: 'auth.sign_up' }).count<{ n: string }[]>({ n: '*' })).toEqual([{ n: '1' }]);
    const attempt = await env.knex('audit_events').where({ action: 'auth.sign_up_existing' }).whereRaw("detail->>'userId' = ?", [String(known.user.id)]);
    expect(attempt).toHaveLength(1);
    expect(attempt[0].actor_id).toBeNull();
  });

  it('hashes the password of a sign-up for a known address too (same work either way), and stores it nowhere', async () => {
    const known = await newUser(env, 'samework');
    const before = await env.knex('users').where({ id: known.user.id }).first();
    expect((await signUpForm(known.email, 'a-different-passphrase')).status).toBe(202);
    const after = await env.knex('users').where({ id: known.user.id }).first();
    expect(after.password_hash).toBe(before.password_hash);
    expect(after.version).toBe(before.version);
  });
});

describe('an unconfirmed account', () => {
  it('cannot sign in, and is refused with the same text as a wrong password, even with the right password', async () => {
    const email = uniqueEmail('unconfirmed');
    await pendingSignUp(email);
    const right = await env.client().post('/api/auth/sign-in', { email, password: TEST_PASSWORD });
    const wrong = await env.client().post('/api/auth/sign-in', { email, password: 'not-the-password' });
    const unknown = await env.client().post('/api/auth/sign-in', { email: uniqueEmail('nobody'), password: TEST_PASSWORD });
    expect(right.status).toBe(401);
    expect(errorBodySchema.parse(right.body)).toEqual(errorBodySchema.parse(wrong.body));
    expect(errorBodySchema.parse(right.body)).toEqual(errorBodySchema.parse(unknown.body));
    expect(JSON.stringify(right.body)).not.toMatch(/unverified|not confirmed|exist|unknown/i);
  });

  // issue 8, item 2: B signing up with A's unconfirmed address must not take the account over
  it('a repeated sign-up changes neither the password nor the name, and the first link still works', async () => {
    const email = uniqueEmail('again');
    const first = await pendingSignUp(email, TEST_PASSWORD, 'First Try');
    const second = await pendingSignUp(email, 'second-try-passphrase', 'Second Try');
    expect(await env.knex('users').whereRaw('lower(email) = ?', [email]).count<{ n: string }[]>({ n: '*' })).toEqual([{ n: '1' }]);
    // the first link was not spent by the second sign-up
    const c = env.client();
    const user = await c.verify(first);
    expect(user.displayName).toBe('First Try');
    expect((await env.client().post('/api/auth/sign-in', { email, password: 'second-try-passphrase' })).status).toBe(401);
    expect((await env.client().post('/api/auth/sign-in', { email, password: TEST_PASSWORD })).status).toBe(200);
    // the address is confirmed now: the second link is spent, and could not have set the second password anyway
    expect((await env.client().post('/api/auth/verify', { token: second })).status).toBe(422);
  });

  it('the newest link confirms the account as the first sign-up made it (only "confirmed" changes)', async () => {
    const email = uniqueEmail('newest');
    await pendingSignUp(email, TEST_PASSWORD, 'Owner');
    const before = await env.knex('users').whereRaw('lower(email) = ?', [email]).first();
    const sinceId = await lastMailId(env.knex);
    const second = await pendingSignUp(email, 'intruder-passphrase', 'Intruder');
    // the second mail tells the mailbox owner what the link does and where to reset the password
    const mail = await waitForMail(env.knex, email, VERIFY_SUBJECT, { sinceId });
    expect(mail.text).toContain('earlier sign-up');
    expect(mail.text).toContain('https://tetrawell.lab.test/reset');
    expect(mail.text).not.toContain('Intruder');
    const user = await env.client().verify(second);
    expect(user.displayName).toBe('Owner');
    const after = await env.knex('users').whereRaw('lower(email) = ?', [email]).first();
    expect(after.password_hash).toBe(before.password_hash);
    expect(after.display_name).toBe(before.display_name);
    expect(after.email_verified_at).not.toBeNull();
    expect((await env.client().post('/api/auth/sign-in', { email, password: 'intruder-passphrase' })).status).toBe(401);
    expect((await env.client().post('/api/auth/sign-in', { email, password: TEST_PASSWORD })).status).toBe(200);
  });

  it('a password reset confirms the address too (the link came through the same mailbox)', async () => {
    const email = uniqueEmail('resetconfirms');
    await pendingSignUp(email);
    const sinceId = await lastMailId(env.knex);
    expect((await env.client().post('/api/auth/password-reset/request', { email })).status).toBe(202);
    const token = linkToken((await waitForMail(env.knex, email, /Reset/, { sinceId })).text, env.mailBase, 'reset');
    expect((await env.client().post('/api/auth/password-reset/confirm', { token, password: 'reset-made-passphrase' })).status).toBe(200);
    expect((await env.client().post('/api/auth/sign-in', { email, password: 'reset-made-passphrase' })).status).toBe(200);
  });
});

describe('POST /api/auth/verify', () => {
  it('confirms the address, signs in, and issues a new session id (the pre-confirmation id is not signed in)', async () => {
    const email = uniqueEmail('verifyfix');
    const token = await pendingSignUp(email);

    const c = env.client();
    const csrf = await c.agent.get('/api/auth/csrf').expect(200);
    const before = sessionCookie(csrf.headers['set-cookie']);
    expect(before).not.toBeNull();

    const r = await c.agent.post('/api/auth/verify').set('x-csrf-token', csrf.body.csrfToken).send({ token });
    expect(r.status).toBe(200);
    expect(r.body.user.email).toBe(email);
    const after = sessionCookie(r.headers['set-cookie']);
    expect(after).not.toBeNull();
    expect(after).not.toBe(before);

    const legit = await expectSessionRotated(env.url, before, after);
    expect(legit.body.user.email).toBe(email);

    const row = await env.knex('users').where({ email }).first();
    expect(row.email_verified_at).not.toBeNull();
    expect(await env.knex('audit_events').where({ actor_id: row.id }).orderBy('id').pluck('action')).toEqual(['auth.sign_up', 'auth.email_verify', 'auth.sign_in']);
  });

  it('is CSRF protected like every POST', async () => {
    const token = await pendingSignUp(uniqueEmail('verifycsrf'));
    const r = await env.client().request('post', '/api/auth/verify', { token }, { csrf: false });
    expect(r.status).toBe(403);
    expect(r.body.error.code).toBe('csrf_failed');
    // the link is still good afterwards
    expect((await env.client().post('/api/auth/verify', { token })).status).toBe(200);
  });

  it('refuses a used link with 422 and a plain message', async () => {
    const token = await pendingSignUp(uniqueEmail('used'));
    expect((await env.client().post('/api/auth/verify', { token })).status).toBe(200);
    const again = await env.client().post('/api/auth/verify', { token });
    expect(again.status).toBe(422);
    const e = errorBodySchema.parse(again.body).error;
    expect(e.code).toBe('unprocessable');
    expect(e.message).toMatch(/not valid/);
    expect(e.details?.[0].path).toEqual(['token']);
  });

  it('refuses an expired link with 422 and leaves the account unconfirmed', async () => {
    const email = uniqueEmail('expired');
    const token = await pendingSignUp(email);
    const row = await env.knex('users').where({ email }).first();
    await env.knex('email_verifications').where({ user_id: row.id }).update({ expires_at: new Date(Date.now() - 1000) });
    const r = await env.client().post('/api/auth/verify', { token });
    expect(r.status).toBe(422);
    expect(r.body.error.details[0].path).toEqual(['token']);
    expect((await env.knex('users').where({ email }).first()).email_verified_at).toBeNull();
  });

  it('refuses a made-up token (422) and a malformed body (422 validation_failed)', async () => {
    const made = await env.client().post('/api/auth/verify', { token: 'A'.repeat(43) });
    expect(made.status).toBe(422);
    expect(made.body.error.code).toBe('unprocessable');
    const bad = await env.client().post('/api/auth/verify', { token: 42 });
    expect(bad.status).toBe(422);
    expect(bad.body.error.code).toBe('validation_failed');
    expect(bad.body.error.details[0].path).toEqual(['token']);
  });

  it('sets the expiry from the configured lifetime (48 h by default)', async () => {
    const email = uniqueEmail('ttl');
    const t0 = Date.now();
    await pendingSignUp(email);
    const row = await env.knex('users').where({ email }).first();
    const v = await env.knex('email_verifications').where({ user_id: row.id }).first();
    const ttl = new Date(v.expires_at).getTime() - t0;
    // 48 h = 172 800 000 ms (server/index.ts default); a few seconds of slack for the request itself
    expect(ttl).toBeGreaterThan(48 * 3_600_000 - 10_000);
    expect(ttl).toBeLessThanOrEqual(48 * 3_600_000 + 1_000);
  });
});
