/**
 * The jobs and revisions lists are served without express-session and passport (server/http/sessionStore.ts
 * `sessionFreeReads`): the signed-in account comes from one query of the session row and its account, and anything
 * unusual takes the usual path. These tests hold the security properties of that path to those of the usual one
 * (OWASP Session Management cheat sheet: "Session Expiration", server-side invalidation, no trust in a cookie whose
 * signature fails; OWASP Authorization cheat sheet: permissions checked on every request), over HTTP against the
 * real PostgreSQL, and its choices one by one against a stand-in pool.
 */
import { createRequire } from 'node:module';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import session from 'express-session';
import type { Request, Response } from 'express';
import type pg from 'pg';
import { newUser, startTestEnv, type TestClient, type TestEnv } from './helpers';
import { jobsRepo } from '../../server/repositories/jobs';
import { createSessionStore, signedSessionId } from '../../server/http/sessionStore';
import { SESSION_FREE_READS } from '../../server/routes/jobs';

// express-session's own signer (its dependency), to make cookies exactly as it does (`s:` + id + '.' + HMAC)
const signer = createRequire(createRequire(import.meta.url).resolve('express-session'))('cookie-signature') as { sign(v: string, s: string): string };

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.stop();
});

/** the value of the client's session cookie (URI-encoded `s:<id>.<signature>`) */
function cookieOf(client: TestClient): string {
  return client.agent.jar.getCookie('tetrawell.sid', { domain: new URL(env.url).hostname, path: '/', secure: false, script: false })!.value;
}
const sidOf = (cookie: string) => decodeURIComponent(cookie).replace(/^s:/, '').replace(/\.[^.]*$/, '');

describe('session-free list reads over HTTP', () => {
  let owner: TestClient;
  let projectId: number;
  let path: (what: 'jobs' | 'revisions') => string;
  beforeAll(async () => {
    const made = await newUser(env, 'free-owner');
    owner = made.client;
    projectId = (await owner.post('/api/projects', { name: 'Session-free reads' })).body.id as number;
    const design = (await env.knex('designs').where({ project_id: projectId }).first('id')) as { id: number };
    const { sha256 } = (await env.knex('design_versions').where({ design_id: design.id, version: 1 }).first('sha256')) as { sha256: string };
    await jobsRepo(env.knex).insert({ projectId, designId: design.id, designVersion: 1, designSha256: sha256, createdBy: made.user.id, kind: 'mesh', options: { order: 1 }, state: 'queued', progress: { phase: 'queued', fraction: 0 } });
    path = (what) => `/api/projects/${projectId}/${what}`;
  });

  /** a bare request with exactly this Cookie header (and optionally an Authorization header) */
  const raw = (p: string, cookie: string | null, authorization?: string) => {
    let r = env.client().agent.get(p);
    if (cookie !== null) r = r.set('Cookie', cookie);
    if (authorization) r = r.set('Authorization', authorization);
    return r;
  };

  it('a signed-in read answers the list and sets no cookie, as express-session does for an unchanged session', async () => {
    for (const what of ['jobs', 'revisions'] as const) {
      const r = await raw(path(what), `tetrawell.sid=${cookieOf(owner)}`);
      expect(r.status, what).toBe(200);
      expect(r.headers['set-cookie'], what).toBeUndefined();
      expect(r.text).toBe((await owner.get(path(what))).text);
    }
    expect((await raw(path('jobs'), `tetrawell.sid=${cookieOf(owner)}`)).body.jobs).toHaveLength(1);
  });

  it('a cookie whose signature does not match is no session (401), also with a valid session id inside', async () => {
    const cookie = decodeURIComponent(cookieOf(owner));
    const forged = `s:${sidOf(cookieOf(owner))}.${'A'.repeat(43)}`;
    const otherSecret = `s:${signer.sign(sidOf(cookieOf(owner)), 'not-the-server-secret-'.padEnd(40, 'x'))}`;
    const unsigned = sidOf(cookieOf(owner));
    for (const bad of [forged, otherSecret, unsigned, cookie.slice(0, -1)]) {
      for (const what of ['jobs', 'revisions'] as const) {
        const r = await raw(path(what), `tetrawell.sid=${encodeURIComponent(bad)}`);
        expect(r.status, `${what} with ${bad}`).toBe(401);
        expect(r.text).not.toContain('"jobs"');
      }
    }
  });

  it('an expired session row is no session (401) at once, though the cookie is well signed', async () => {
    const { client } = await newUser(env, 'free-expired');
    await env.knex('memberships').insert({ project_id: projectId, user_id: client.user!.id, role: 'viewer' });
    expect((await client.get(path('jobs'))).status).toBe(200);
    await env.knex('sessions').where({ sid: sidOf(cookieOf(client)) }).update({ expire: env.knex.raw(`now() - interval '1 second'`) });
    expect((await client.get(path('jobs'))).status).toBe(401);
    expect((await client.get(path('revisions'))).status).toBe(401);
  });

  it('a session naming an account that does not exist is signed out (401), as passport does', async () => {
    const { client } = await newUser(env, 'free-ghost');
    const sid = sidOf(cookieOf(client));
    const row = (await env.knex('sessions').where({ sid }).first('sess')) as { sess: Record<string, unknown> };
    await env.knex('sessions').where({ sid }).update({ sess: JSON.stringify({ ...row.sess, passport: { user: 999_999_999 } }) });
    expect((await client.get(path('jobs'))).status).toBe(401);
    expect((await client.get(path('revisions'))).status).toBe(401);
  });

  it('a Bearer token decides whose request it is, whatever session cookie comes with it', async () => {
    const { client: stranger } = await newUser(env, 'free-stranger');
    const { secret } = (await owner.post('/api/account/tokens', { name: 'list reads' })).body as { secret: string };
    const { secret: strangerSecret } = (await stranger.post('/api/account/tokens', { name: 'list reads' })).body as { secret: string };
    // the stranger's session with the owner's token reads the owner's list; the owner's session with the stranger's token does not
    expect((await raw(path('jobs'), `tetrawell.sid=${cookieOf(stranger)}`, `Bearer ${secret}`)).status).toBe(200);
    expect((await raw(path('jobs'), `tetrawell.sid=${cookieOf(owner)}`, `Bearer ${strangerSecret}`)).status).toBe(404);
    expect((await raw(path('revisions'), `tetrawell.sid=${cookieOf(owner)}`, 'Bearer not-a-token')).status).toBe(401);
  });

  it('another spelling of the same route (upper case, trailing slash) answers the same through the usual path', async () => {
    const expected = (await owner.get(path('jobs'))).text;
    for (const p of [`/api/PROJECTS/${projectId}/JOBS`, `/api/projects/${projectId}/jobs/`]) {
      const r = await owner.get(p);
      expect(r.status, p).toBe(200);
      expect(r.text, p).toBe(expected);
    }
  });

  it('signed out: the next list read answers 401 (the session row is gone)', async () => {
    const { client } = await newUser(env, 'free-leaver');
    await env.knex('memberships').insert({ project_id: projectId, user_id: client.user!.id, role: 'editor' });
    const cookie = cookieOf(client);
    expect((await raw(path('revisions'), `tetrawell.sid=${cookie}`)).status).toBe(200);
    await client.signOut();
    expect((await raw(path('revisions'), `tetrawell.sid=${cookie}`)).status).toBe(401);
    expect((await raw(path('jobs'), `tetrawell.sid=${cookie}`)).status).toBe(401);
  });
});

describe('sessionFreeReads, decision by decision (stand-in pool)', () => {
  const SECRET = 'unit-secret-'.padEnd(40, 'u');
  const SID = 'abcdefghijklmnopqrstuvwxyz012345';
  const good = `tetrawell.sid=${encodeURIComponent(`s:${signer.sign(SID, SECRET)}`)}`;
  const userRow = { user_id: 7, email: 'a@example.invalid', display_name: 'A', site_role: 'member', version: 3 };

  function setup(answer: () => Promise<{ rows: unknown[] }>) {
    const queries: { name: string; values: unknown[] }[] = [];
    const pool = {
      // the store's own prune (connect-pg-simple: plain text, no name) is not the middleware's
      query: (q: { name: string; values: unknown[] } | string) => {
        if (typeof q === 'string') return Promise.resolve({ rows: [], rowCount: 0 });
        queries.push(q);
        return answer();
      },
    } as unknown as pg.Pool;
    const s = createSessionStore(session, pool, { pruneSessionIntervalSeconds: 3600, errorLog: () => {} });
    s.store.close();
    const mw = s.sessionFreeReads({ cookieName: 'tetrawell.sid', secrets: ['older-secret-'.padEnd(40, 'o'), SECRET], paths: SESSION_FREE_READS });
    /** runs the middleware and then `unlessSessionFree(handler)`; resolves with what happened */
    const run = (req: Partial<Request>) =>
      new Promise<{ err: unknown; user: unknown; usualPath: boolean }>((resolve) => {
        const r = { method: 'GET', headers: {}, path: '/api/projects/4/jobs', ...req } as Request;
        mw(r, {} as Response, (err?: unknown) => {
          if (err) return resolve({ err, user: r.user, usualPath: false });
          let usualPath = false;
          s.unlessSessionFree((_q, _s, next) => {
            usualPath = true;
            next();
          })(r, {} as Response, () => resolve({ err: null, user: r.user, usualPath }));
        });
      });
    return { queries, run };
  }

  it('a valid cookie on a list path: one query (the session id, the time in whole seconds), req.user set, session middleware skipped', async () => {
    const { queries, run } = setup(async () => ({ rows: [userRow] }));
    for (const p of ['/api/projects/4/jobs', '/api/projects/4/revisions']) {
      const before = Math.ceil(Date.now() / 1000);
      const out = await run({ path: p, headers: { cookie: `theme=dark; ${good}` } });
      expect(out).toEqual({ err: null, user: { id: 7, email: 'a@example.invalid', displayName: 'A', siteRole: 'member', version: 3 }, usualPath: false });
      expect(queries.at(-1)!.name).toBe('tetrawell-signed-in-user');
      expect(queries.at(-1)!.values[0]).toBe(SID);
      expect(queries.at(-1)!.values[1] as number).toBeGreaterThanOrEqual(before);
    }
    expect(queries).toHaveLength(2);
  });

  it('no query and the usual path for: other methods, other paths, a Bearer header, no cookie, an unsigned or badly signed cookie', async () => {
    const { queries, run } = setup(async () => ({ rows: [userRow] }));
    const cases: Partial<Request>[] = [
      { method: 'POST', headers: { cookie: good } },
      { method: 'HEAD', headers: { cookie: good } },
      { path: '/api/projects/4/jobs/9', headers: { cookie: good } },
      { path: '/api/projects/4/designs', headers: { cookie: good } },
      { path: '/api/projects/4/jobs/', headers: { cookie: good } },
      { headers: { cookie: good, authorization: 'Bearer x' } },
      { headers: {} },
      { headers: { cookie: `tetrawell.sid=${SID}` } },
      { headers: { cookie: `tetrawell.sid=${encodeURIComponent(`s:${signer.sign(SID, 'another-secret-'.padEnd(40, 'z'))}`)}` } },
      { headers: { cookie: `other.sid=${encodeURIComponent(`s:${signer.sign(SID, SECRET)}`)}` } },
    ];
    for (const c of cases) expect(await run(c), JSON.stringify(c)).toEqual({ err: null, user: undefined, usualPath: true });
    expect(queries).toHaveLength(0);
  });

  it('no live session or no account: the usual path (which answers 401 or signs the vanished account out)', async () => {
    const none = setup(async () => ({ rows: [] }));
    expect(await none.run({ headers: { cookie: good } })).toEqual({ err: null, user: undefined, usualPath: true });
    expect(none.queries).toHaveLength(1);
  });

  it("a stopped database's missing socket (ENOENT) is handed on as an error with its cause, not read as 'no session'", async () => {
    const enoent = Object.assign(new Error('connect ENOENT /x/.s.PGSQL.5432'), { code: 'ENOENT', syscall: 'connect' });
    const { run } = setup(() => Promise.reject(enoent));
    const out = await run({ headers: { cookie: good } });
    expect(out.usualPath).toBe(false);
    expect((out.err as Error).cause).toBe(enoent);
  });

  it('signedSessionId reads the id express-session signs, with any of its secrets, and nothing else', () => {
    expect(signedSessionId(good, 'tetrawell.sid', [SECRET])).toBe(SID);
    expect(signedSessionId(good, 'tetrawell.sid', ['x'.repeat(40), SECRET])).toBe(SID);
    expect(signedSessionId(good, 'tetrawell.sid', ['x'.repeat(40)])).toBeNull();
    expect(signedSessionId(undefined, 'tetrawell.sid', [SECRET])).toBeNull();
    // the first of two cookies of the same name counts, as in express-session (the `cookie` package's parse)
    expect(signedSessionId(`${good}; tetrawell.sid=s%3Aother.sig`, 'tetrawell.sid', [SECRET])).toBe(SID);
    expect(signedSessionId(`tetrawell.sid=s%3Aother.sig; ${good}`, 'tetrawell.sid', [SECRET])).toBeNull();
  });
});
