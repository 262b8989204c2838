/**
 * Issue 8, item 3: bounded anonymous sessions. A cookie-less GET /api/auth/csrf used to store a seven-day
 * session row each time. Now a session nobody signed in to lives one hour (the CSRF secret csrf-sync keeps in
 * it still works), sign-in brings the full lifetime, and expired rows are pruned.
 * OWASP Session Management cheat sheet: "Session Expiration" (short idle/absolute timeouts, server-side
 * invalidation); the one-hour figure is common practice, not from a standard.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import { newUser, sessionCookie, startTestEnv, TEST_PASSWORD, type TestEnv } from './helpers';

const ANON_MS = 60 * 60_000;
const SIGNED_IN_MS = 7 * 24 * 3_600_000;
const SLACK_MS = 60_000;

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv({ sessionPruneIntervalSeconds: 1 });
});
afterAll(async () => {
  await env?.stop();
});

/** the session id inside a signed cookie value `s:<id>.<signature>` (express-session's format) */
function sidOf(cookie: string): string {
  return decodeURIComponent(cookie).replace(/^s:/, '').replace(/\.[^.]*$/, '');
}

async function expiryOf(sid: string): Promise<number | null> {
  const row = await env.knex('sessions').where({ sid }).first('expire');
  return row ? new Date(row.expire as Date).getTime() : null;
}

describe('anonymous sessions', () => {
  it('a loop of cookie-less GET /api/auth/csrf leaves only short-lived rows', async () => {
    const sids: string[] = [];
    for (let i = 0; i < 20; i++) {
      const r = await supertest(env.url).get('/api/auth/csrf');
      expect(r.status).toBe(200);
      const c = sessionCookie(r.headers['set-cookie']);
      expect(c).not.toBeNull();
      sids.push(sidOf(c!));
      // the cookie says the same lifetime as the row (RFC 6265 Expires)
      const expires = /Expires=([^;]+)/i.exec([r.headers['set-cookie']].flat().join(';'))?.[1];
      expect(Date.parse(expires!) - Date.now()).toBeLessThanOrEqual(ANON_MS + SLACK_MS);
    }
    const now = Date.now();
    for (const sid of sids) {
      const exp = await expiryOf(sid);
      expect(exp).not.toBeNull();
      expect(exp! - now).toBeLessThanOrEqual(ANON_MS + SLACK_MS);
      expect(exp! - now).toBeGreaterThan(ANON_MS - 5 * SLACK_MS);
    }
  });

  // a control (it held before the fix too): without a CSRF secret there is nothing to store
  it('requests that need no CSRF token store no session at all', async () => {
    for (let i = 0; i < 10; i++) {
      const r = await supertest(env.url).get('/api/auth/me');
      expect(r.status).toBe(401);
      expect(sessionCookie(r.headers['set-cookie'])).toBeNull();
    }
  });

  it('the CSRF token of an anonymous session still works, and sign-in gives the full lifetime', async () => {
    const { email, client } = await newUser(env, 'sess');
    await client.signOut();
    const c = env.client();
    const csrf = await c.agent.get('/api/auth/csrf').expect(200);
    const anonSid = sidOf(sessionCookie(csrf.headers['set-cookie'])!);
    expect((await expiryOf(anonSid))! - Date.now()).toBeLessThanOrEqual(ANON_MS + SLACK_MS);
    const r = await c.agent.post('/api/auth/sign-in').set('x-csrf-token', csrf.body.csrfToken).send({ email, password: TEST_PASSWORD });
    expect(r.status).toBe(200);
    const sid = sidOf(sessionCookie(r.headers['set-cookie'])!);
    expect(sid).not.toBe(anonSid);
    const exp = (await expiryOf(sid))! - Date.now();
    expect(exp).toBeGreaterThan(SIGNED_IN_MS - 5 * SLACK_MS);
    // and the signed-in session works for a write
    c.csrf = null;
    expect((await c.post('/api/projects', { name: 'After anonymous CSRF' })).status).toBe(201);
  });

  it('expired rows are pruned', async () => {
    const sid = `expired-${Date.now()}`;
    await env.knex('sessions').insert({ sid, sess: JSON.stringify({ cookie: {} }), expire: new Date(Date.now() - 1000) });
    // any session lookup arms the store's prune timer; it runs within 1.5 × the 1 s interval
    await supertest(env.url).get('/api/auth/me').set('Cookie', 'tetrawell.sid=s%3Anone.x');
    const until = Date.now() + 8_000;
    while ((await expiryOf(sid)) !== null && Date.now() < until) await new Promise((r) => setTimeout(r, 200));
    expect(await expiryOf(sid)).toBeNull();
  });
});
