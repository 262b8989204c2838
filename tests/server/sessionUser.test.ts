/**
 * The session store reads the signed-in account in the same query as the session row (server/http/sessionStore.ts):
 * one database round trip for "who is this" instead of two (issue 8, "Done when": the signed-in read's p99).
 * Nothing is cached, so every change to the account or the session shows at the very next request; these tests
 * change rows behind the server's back and look at the next answer. The security properties are those of the
 * OWASP Session Management cheat sheet ("Session Expiration", server-side invalidation).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { newUser, sessionCookie, startTestEnv, type TestEnv } from './helpers';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.stop();
});

/** the session id inside a signed cookie value `s:<id>.<signature>` (express-session's format) */
function sidOf(cookie: string): string {
  return decodeURIComponent(cookie).replace(/^s:/, '').replace(/\.[^.]*$/, '');
}

/** counts the calls of services.auth.getUser, the separate user lookup the joined read replaces */
function countUserLookups(): { calls: () => number; restore: () => void } {
  const auth = env.server.services.auth;
  const original = auth.getUser;
  let n = 0;
  auth.getUser = (id: number) => {
    n++;
    return original(id);
  };
  return { calls: () => n, restore: () => void (auth.getUser = original) };
}

describe('the session row and its account in one read', () => {
  it('a signed-in request reads its account with the session, with no second lookup', async () => {
    const { client, user } = await newUser(env, 'joined');
    const spy = countUserLookups();
    try {
      for (let i = 0; i < 3; i++) {
        const r = await client.get('/api/auth/me');
        expect(r.status).toBe(200);
        expect(r.body.user).toEqual(user);
      }
      expect(spy.calls()).toBe(0);
    } finally {
      spy.restore();
    }
  });

  it('a change to the account row shows at the next request (nothing is cached)', async () => {
    const { client, user } = await newUser(env, 'fresh');
    expect((await client.get('/api/auth/me')).body.user.siteRole).toBe('member');
    await env.knex('users').where({ id: user.id }).update({ site_role: 'admin', display_name: 'Renamed behind its back' });
    const r = await client.get('/api/auth/me');
    expect(r.body.user).toMatchObject({ id: user.id, siteRole: 'admin', displayName: 'Renamed behind its back' });
    await env.knex('users').where({ id: user.id }).update({ site_role: 'member' });
    expect((await client.get('/api/auth/me')).body.user.siteRole).toBe('member');
  });

  it('an account removed while signed in is signed out at the next request', async () => {
    const { client, user } = await newUser(env, 'removed');
    expect((await client.get('/api/projects')).status).toBe(200);
    // a fresh account owns nothing yet; its audit rows keep their text with the actor cleared (ON DELETE SET NULL)
    await env.knex('users').where({ id: user.id }).delete();
    expect((await client.get('/api/projects')).status).toBe(401);
    expect((await client.get('/api/auth/me')).status).toBe(401);
  });

  it('a session row deleted behind the server (sign-out elsewhere, password change) ends the session at once', async () => {
    const { client } = await newUser(env, 'dropped');
    const me = await client.agent.get('/api/auth/csrf');
    const cookie = sessionCookie(me.headers['set-cookie']) ?? null;
    // the agent's cookie: read it from the jar when the answer set none
    const sid = cookie ? sidOf(cookie) : sidOf(client.agent.jar.getCookie('tetrawell.sid', { domain: new URL(env.url).hostname, path: '/', secure: false, script: false })!.value);
    expect((await env.knex('sessions').where({ sid }).delete())).toBe(1);
    expect((await client.get('/api/projects')).status).toBe(401);
  });

  it('a session whose passport user is not an id signs nobody in and does not fail', async () => {
    const { client } = await newUser(env, 'malformed');
    const sid = sidOf(client.agent.jar.getCookie('tetrawell.sid', { domain: new URL(env.url).hostname, path: '/', secure: false, script: false })!.value);
    const row = (await env.knex('sessions').where({ sid }).first('sess')) as { sess: { passport: { user: unknown } } };
    await env.knex('sessions').where({ sid }).update({ sess: JSON.stringify({ ...row.sess, passport: { user: 'x1' } }) });
    const r = await client.get('/api/auth/me');
    expect(r.status).toBe(401);
  });
});
