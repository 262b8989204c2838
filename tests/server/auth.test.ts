/**
 * Accounts and sessions: sign-up with e-mail confirmation / sign-in / sign-out, session
 * fixation, CSRF, cookie flags, generic sign-in errors. Expectations follow the OWASP
 * Session Management and CSRF Prevention cheat sheets (session id renewed at privilege
 * change; synchronizer token on state-changing requests; HttpOnly + SameSite cookies), the
 * OWASP Authentication cheat sheet on account enumeration (sign-up and sign-in answer alike
 * whether or not an account exists) and RFC 6265bis for cookie attributes.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import { errorBodySchema, meResponseSchema, signUpResponseSchema } from '@contracts/api';
import { expectSessionRotated, lastMailId, linkToken, sessionCookie, startTestEnv, TEST_PASSWORD, uniqueEmail, VERIFY_SUBJECT, waitForMail, type TestEnv } from './helpers';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.stop();
});

describe('sign-up, sign-in, sign-out', () => {
  it('signs up (confirmed by the e-mailed link, which signs in), signs out, signs back in', async () => {
    const c = env.client();
    const email = uniqueEmail('flow');
    const sinceId = await lastMailId(env.knex);
    const signUp = await c.post('/api/auth/sign-up', { email: `  ${email.toUpperCase()} `, password: TEST_PASSWORD, displayName: 'Ada Flow' });
    expect(signUp.status).toBe(202);
    expect(signUpResponseSchema.parse(signUp.body)).toEqual({ status: 'check-email' });
    // not signed in until the address is confirmed
    expect((await c.get('/api/auth/me')).status).toBe(401);

    // zod contract: e-mail trimmed and lower-cased (the mail goes to the normalised address)
    const mail = await waitForMail(env.knex, email, VERIFY_SUBJECT, { sinceId });
    const verified = await c.post('/api/auth/verify', { token: linkToken(mail.text, env.mailBase, 'verify') });
    expect(verified.status).toBe(200);
    expect(verified.body.user.email).toBe(email);
    expect(verified.body.user.siteRole).toBe('member');
    expect(verified.body.user).not.toHaveProperty('passwordHash');

    await c.refreshCsrf();
    const me = await c.get('/api/auth/me');
    expect(me.status).toBe(200);
    expect(meResponseSchema.parse(me.body).user.email).toBe(email);

    await c.signOut();
    expect((await c.get('/api/auth/me')).status).toBe(401);

    const user = await c.signIn(email.toUpperCase());
    expect(user.email).toBe(email);
    expect((await c.get('/api/auth/me')).status).toBe(200);

    const audit = await env.knex('audit_events').where({ actor_id: user.id }).orderBy('id').pluck('action');
    // confirming the address signs in, so it counts as a sign-in too
    expect(audit).toEqual(['auth.sign_up', 'auth.email_verify', 'auth.sign_in', 'auth.sign_in']);
  });

  it('stores a bcrypt hash, never the password', async () => {
    const c = env.client();
    const email = uniqueEmail('hash');
    await c.signUp(email);
    const row = await env.knex('users').where({ email }).first();
    expect(row.password_hash).not.toContain(TEST_PASSWORD);
    // bcrypt modular crypt format: $2a$/$2b$ + 2-digit cost + 53 chars (Provos & Mazières 1999; OpenBSD bcrypt)
    expect(row.password_hash).toMatch(/^\$2[aby]\$\d{2}\$[./A-Za-z0-9]{53}$/);
  });

  it('makes no second account with the same e-mail, and answers as for a new one', async () => {
    const email = uniqueEmail('dup');
    await env.client().signUp(email);
    const before = await env.knex('users').whereRaw('lower(email) = ?', [email]).count<{ n: string }[]>({ n: '*' });
    const r = await env.client().post('/api/auth/sign-up', { email: email.toUpperCase(), password: TEST_PASSWORD, displayName: 'Twin' });
    expect(r.status).toBe(202);
    expect(r.body).toEqual({ status: 'check-email' });
    const after = await env.knex('users').whereRaw('lower(email) = ?', [email]).count<{ n: string }[]>({ n: '*' });
    expect(after[0].n).toBe(before[0].n);
    // the existing account is untouched: its name and password stay
    const row = await env.knex('users').where({ email }).first();
    expect(row.display_name).not.toBe('Twin');
  });

  it('gives the same answer for an unknown account and a wrong password', async () => {
    const email = uniqueEmail('known');
    await env.client().signUp(email);
    const unknown = await env.client().post('/api/auth/sign-in', { email: uniqueEmail('nobody'), password: TEST_PASSWORD });
    const wrong = await env.client().post('/api/auth/sign-in', { email, password: 'not-the-password' });
    expect(unknown.status).toBe(401);
    expect(wrong.status).toBe(401);
    expect(errorBodySchema.parse(unknown.body)).toEqual(errorBodySchema.parse(wrong.body));
    expect(JSON.stringify(unknown.body)).not.toMatch(/exist|unknown|no such|not found/i);
  });
});

describe('session fixation', () => {
  it('issues a new session id at sign-in, and the pre-sign-in id is not signed in', async () => {
    const email = uniqueEmail('fix');
    await env.client().signUp(email);

    const c = env.client();
    const csrf = await c.agent.get('/api/auth/csrf').expect(200);
    const before = sessionCookie(csrf.headers['set-cookie']);
    expect(before).not.toBeNull();

    const signIn = await c.agent.post('/api/auth/sign-in').set('x-csrf-token', csrf.body.csrfToken).send({ email, password: TEST_PASSWORD });
    expect(signIn.status).toBe(200);
    const after = sessionCookie(signIn.headers['set-cookie']);
    expect(after).not.toBeNull();
    expect(after).not.toBe(before);

    // an attacker holding the old (planted) id gets nothing; the new id is signed in
    await expectSessionRotated(env.url, before, after);
  });

  it('ends the session at sign-out: the old cookie no longer signs anyone in', async () => {
    const c = env.client();
    const email = uniqueEmail('out');
    await c.signUp(email);
    await c.signOut();
    const csrf = await c.refreshCsrf();
    const signIn = await c.agent.post('/api/auth/sign-in').set('x-csrf-token', csrf).send({ email, password: TEST_PASSWORD });
    const sid = sessionCookie(signIn.headers['set-cookie']);
    expect(sid).not.toBeNull();
    expect((await supertest(env.url).get('/api/auth/me').set('Cookie', `tetrawell.sid=${sid}`)).status).toBe(200);
    await c.refreshCsrf();
    await c.signOut();
    const replay = await supertest(env.url).get('/api/auth/me').set('Cookie', `tetrawell.sid=${sid}`);
    expect(replay.status).toBe(401);
  });
});

describe('CSRF defence', () => {
  it('rejects state-changing requests without the token (403 csrf_failed) and writes nothing', async () => {
    const client = env.client();
    await client.signUp();
    const before = await env.knex('projects').count<{ n: string }[]>({ n: '*' });
    const r = await client.request('post', '/api/projects', { name: 'Forged' }, { csrf: false });
    expect(r.status).toBe(403);
    expect(r.body.error.code).toBe('csrf_failed');
    const wrong = await client.agent.post('/api/projects').set('x-csrf-token', 'f'.repeat(64)).send({ name: 'Forged' });
    expect(wrong.status).toBe(403);
    expect(wrong.body.error.code).toBe('csrf_failed');
    const after = await env.knex('projects').count<{ n: string }[]>({ n: '*' });
    expect(after[0].n).toBe(before[0].n);
    // with the token it goes through
    expect((await client.post('/api/projects', { name: 'Real' })).status).toBe(201);
  });

  it('does not accept a token from another session', async () => {
    const a = env.client();
    await a.signUp();
    const b = env.client();
    await b.signUp();
    const r = await a.agent.post('/api/projects').set('x-csrf-token', b.csrf!).send({ name: 'Cross' });
    expect(r.status).toBe(403);
  });

  it('protects sign-in too (login CSRF)', async () => {
    const email = uniqueEmail('logincsrf');
    await env.client().signUp(email);
    const r = await env.client().request('post', '/api/auth/sign-in', { email, password: TEST_PASSWORD }, { csrf: false });
    expect(r.status).toBe(403);
  });
});

describe('cookies and headers', () => {
  it('session cookie is HttpOnly and SameSite=Lax, not Secure over plain HTTP', async () => {
    const r = await supertest(env.url).get('/api/auth/csrf');
    const c = (r.headers['set-cookie'] as unknown as string[]).find((s) => s.startsWith('tetrawell.sid='))!;
    expect(c).toMatch(/;\s*HttpOnly/i);
    expect(c).toMatch(/;\s*SameSite=Lax/i);
    expect(c).not.toMatch(/;\s*Secure/i);
  });

  it('helmet headers are present and no stack or framework name leaks', async () => {
    const r = await supertest(env.url).get('/api/health');
    expect(r.headers['x-content-type-options']).toBe('nosniff');
    expect(r.headers['content-security-policy']).toContain("default-src 'self'");
    expect(r.headers['x-powered-by']).toBeUndefined();
  });
});

describe('behind an HTTPS proxy', () => {
  let proxied: TestEnv;
  beforeAll(async () => {
    proxied = await startTestEnv({ trustProxy: 1 });
  });
  afterAll(async () => {
    await proxied?.stop();
  });

  it('marks the session cookie Secure when the proxy says the request came over HTTPS', async () => {
    const r = await supertest(proxied.url).get('/api/auth/csrf').set('X-Forwarded-Proto', 'https');
    const c = (r.headers['set-cookie'] as unknown as string[]).find((s) => s.startsWith('tetrawell.sid='))!;
    expect(c).toMatch(/;\s*Secure/i);
    expect(c).toMatch(/;\s*HttpOnly/i);
  });
});
