/**
 * Password reset end to end, and password change. Follows the OWASP Forgot Password cheat
 * sheet: the same answer whether or not the account exists, single-use expiring tokens
 * sent by e-mail, other sessions ended after the change.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import { countMail, linkToken, newUser, sessionCookie, startTestEnv, TEST_PASSWORD, uniqueEmail, waitForMail, type TestEnv } from './helpers';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.stop();
});

describe('password reset', () => {
  it('mails a link; the new password works, the old one and the used link do not', async () => {
    const u = await newUser(env, 'reset');
    // a second browser signed in with the old password
    const other = env.client();
    await other.signIn(u.email);

    const asked = await env.client().post('/api/auth/password-reset/request', { email: u.email });
    expect(asked.status).toBe(202);
    expect(asked.body).toEqual({ ok: true });
    const mail = await waitForMail(env.knex, u.email, /Reset your Tetrawell password/);
    const token = linkToken(mail.text, env.url, 'reset');

    const newPassword = 'a-new-and-longer-passphrase';
    const done = await env.client().post('/api/auth/password-reset/confirm', { token, password: newPassword });
    expect(done.status).toBe(200);

    expect((await env.client().post('/api/auth/sign-in', { email: u.email, password: TEST_PASSWORD })).status).toBe(401);
    expect((await env.client().post('/api/auth/sign-in', { email: u.email, password: newPassword })).status).toBe(200);
    // sessions that knew the old password are gone
    expect((await other.get('/api/auth/me')).status).toBe(401);
    expect((await u.client.get('/api/auth/me')).status).toBe(401);

    const reuse = await env.client().post('/api/auth/password-reset/confirm', { token, password: 'yet-another-passphrase' });
    expect(reuse.status).toBe(422);
    expect(reuse.body.error.details[0].path).toEqual(['token']);
    expect(await env.knex('audit_events').where({ actor_id: u.user.id, action: 'account.password_reset' }).count<{ n: string }[]>({ n: '*' })).toEqual([{ n: '1' }]);
  });

  it('answers an unknown address exactly like a known one and sends nothing', async () => {
    const email = uniqueEmail('ghost');
    const known = await newUser(env, 'known');
    const a = await env.client().post('/api/auth/password-reset/request', { email });
    const b = await env.client().post('/api/auth/password-reset/request', { email: known.email });
    expect(a.status).toBe(b.status);
    expect(a.body).toEqual(b.body);
    await waitForMail(env.knex, known.email, /Reset/); // the known one got its mail…
    expect(await countMail(env.knex, email)).toBe(0); // …the unknown one got none
  });

  it('refuses an expired link', async () => {
    const u = await newUser(env, 'expired');
    await env.client().post('/api/auth/password-reset/request', { email: u.email });
    const token = linkToken((await waitForMail(env.knex, u.email, /Reset/)).text, env.url, 'reset');
    await env.knex('password_resets').where({ user_id: u.user.id }).update({ expires_at: new Date(Date.now() - 1000) });
    expect((await env.client().post('/api/auth/password-reset/confirm', { token, password: 'does-not-matter-now' })).status).toBe(422);
  });
});

describe('password change', () => {
  it('needs the current password; keeps this session, ends the others', async () => {
    const u = await newUser(env, 'change');
    const other = env.client();
    await other.signIn(u.email);

    const wrong = await u.client.post('/api/account/password', { currentPassword: 'not-my-password', newPassword: 'another-passphrase' });
    expect(wrong.status).toBe(422);
    expect(wrong.body.error.details[0].path).toEqual(['currentPassword']);

    const ok = await u.client.post('/api/account/password', { currentPassword: TEST_PASSWORD, newPassword: 'another-passphrase' });
    expect(ok.status).toBe(200);
    expect((await u.client.get('/api/auth/me')).status).toBe(200);
    expect((await other.get('/api/auth/me')).status).toBe(401);

    const fresh = env.client();
    const token = await fresh.refreshCsrf();
    const signIn = await fresh.agent.post('/api/auth/sign-in').set('x-csrf-token', token).send({ email: u.email, password: 'another-passphrase' });
    expect(signIn.status).toBe(200);
    const sid = sessionCookie(signIn.headers['set-cookie']);
    expect((await supertest(env.url).get('/api/auth/me').set('Cookie', `tetrawell.sid=${sid}`)).status).toBe(200);
  });
});
