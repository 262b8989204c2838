/** GET /api/health reports whether the database answers. */
import net from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import pg from 'pg';
import { healthSchema } from '@contracts/api';
import { start, type RunningServer } from '../../server/index';
import { silentLogger } from '../../server/config';
import { createHealthProbe, HEALTH_APPLICATION_NAME } from '../../server/db/healthProbe';
import { newUser, startTestEnv, testDatabaseUrl, type TestEnv } from './helpers';

let env: TestEnv;
let down: RunningServer;
beforeAll(async () => {
  env = await startTestEnv();
  // port 1 on loopback: nothing listens there (tcpmux, unassigned on ordinary hosts), so every connection is refused
  down = await start({ port: 0, databaseUrl: 'postgres://nobody@127.0.0.1:1/none', staticDir: null, logger: silentLogger, sessionSecret: 'x'.repeat(32) });
});
afterAll(async () => {
  await env?.stop();
  await down?.stop();
});

describe('health', () => {
  it('reports the database up', async () => {
    const r = await supertest(env.url).get('/api/health');
    expect(r.status).toBe(200);
    expect(healthSchema.parse(r.body)).toEqual({ ok: true, database: 'up' });
  });

  it('reports the database down with 503 when it cannot be reached', async () => {
    const r = await supertest(down.url).get('/api/health');
    expect(r.status).toBe(503);
    expect(healthSchema.parse(r.body)).toEqual({ ok: false, database: 'down' });
  });

  it('answers unknown API paths with a JSON 404', async () => {
    const r = await supertest(env.url).get('/api/no-such-thing');
    expect(r.status).toBe(404);
    expect(r.body.error.code).toBe('not_found');
  });

  // issue 8, item 7: health asked through the server's Knex pool, so when request work held every connection it
  // waited for one (up to the pool's 10 s acquire timeout, then 503 with the database up). It has a connection of
  // its own now (server/db/healthProbe.ts).
  it('answers 200 at once while other work holds every connection of the server pool', async () => {
    const knex = env.server.knex;
    const max = (knex.client as { pool: { max: number } }).pool.max;
    const held: unknown[] = [];
    for (let i = 0; i < max; i++) held.push(await knex.client.acquireConnection());
    try {
      // well inside the pool's 10 s acquire timeout (server/db/config.ts): a health that waits for the pool fails here
      const r = await supertest(env.url).get('/api/health').timeout(4_000);
      expect(r.status).toBe(200);
      expect(healthSchema.parse(r.body)).toEqual({ ok: true, database: 'up' });
    } finally {
      for (const c of held) await knex.client.releaseConnection(c);
    }
  });

  // issue 8, item 7: a health poll went through express-session and passport like any request (a signed-in browser's
  // poll read its session row first; an anonymous one had a session made for it), a few ms of request-thread time
  // per poll while big PUTs run. Health needs no session: it is answered before them, so a locked session table
  // (here: another transaction holding an exclusive lock on it) cannot delay it.
  it('answers a signed-in poll without reading the session table', async () => {
    const { client } = await newUser(env, 'health');
    expect((await client.get('/api/account/tokens')).status).toBe(200);
    const trx = await env.server.knex.transaction();
    try {
      await trx.raw('LOCK TABLE sessions IN ACCESS EXCLUSIVE MODE');
      // the session-reading path waits for the lock until the transaction ends: it fails this timeout
      const r = await client.agent.get('/api/health').timeout(3_000);
      expect(r.status).toBe(200);
      expect(healthSchema.parse(r.body)).toEqual({ ok: true, database: 'up' });
      expect(r.headers['set-cookie']).toBeUndefined();
    } finally {
      await trx.rollback();
    }
  });
});

describe('the health check connection', () => {
  it('shares one select 1 between the calls that arrive while it is on its way', async () => {
    const probe = createHealthProbe(testDatabaseUrl());
    const query = pg.Client.prototype.query;
    const sent: string[] = [];
    pg.Client.prototype.query = function (this: pg.Client, ...args: unknown[]) {
      if (typeof args[0] === 'string') sent.push(args[0]);
      return (query as (...a: unknown[]) => unknown).apply(this, args);
    } as typeof query;
    try {
      expect(await probe.up()).toBe(true);
      sent.length = 0;
      expect(await Promise.all(Array.from({ length: 8 }, () => probe.up()))).toEqual(Array(8).fill(true));
      expect(sent).toEqual(['select 1']);
      // and a later call asks again: an answer is never reused once it has arrived
      expect(await probe.up()).toBe(true);
      expect(sent).toEqual(['select 1', 'select 1']);
    } finally {
      pg.Client.prototype.query = query;
      await probe.close();
    }
  });

  it('connects afresh when its backend is ended (as a database restart does) and answers again', async () => {
    const probe = createHealthProbe(testDatabaseUrl(), { logger: silentLogger });
    try {
      expect(await probe.up()).toBe(true);
      const pids = await env.knex.raw<{ rows: { pid: number }[] }>(
        `SELECT pid FROM pg_stat_activity WHERE application_name = ? AND pid <> pg_backend_pid()`,
        [HEALTH_APPLICATION_NAME],
      );
      expect(pids.rows.length).toBeGreaterThan(0);
      // 57P01 admin_shutdown on those backends, as `pg_ctl -m fast stop` sends (PostgreSQL manual, appendix A)
      for (const { pid } of pids.rows) await env.knex.raw('SELECT pg_terminate_backend(?)', [pid]);
      await new Promise((r) => setTimeout(r, 200));
      expect(await probe.up()).toBe(true);
    } finally {
      await probe.close();
    }
  });

  it('counts a database that takes the connection but never answers as down within its time limit', async () => {
    // a TCP server that accepts and stays silent: no startup answer ever comes
    const sockets: net.Socket[] = [];
    const silent = net.createServer((s) => sockets.push(s));
    await new Promise<void>((r) => silent.listen(0, '127.0.0.1', r));
    const port = (silent.address() as net.AddressInfo).port;
    const probe = createHealthProbe(`postgres://nobody@127.0.0.1:${port}/none`, { timeoutMs: 300 });
    try {
      // bounded by the probe's limit (the test's own 5 s limit fails a check that waits for ever)
      expect(await probe.up()).toBe(false);
    } finally {
      await probe.close();
      for (const s of sockets) s.destroy();
      await new Promise((r) => silent.close(r));
    }
  }, 5_000);

  // issue 8, item 7: polls are answered before sessions, tokens, CSRF and the API router (server/app.ts). A poll that
  // carried an unknown API token used to be looked up in the database and refused with 401.
  it('answers a poll that carries an unknown API token without looking at the token', async () => {
    const r = await supertest(env.url).get('/api/health').set('Authorization', 'Bearer no-such-token');
    expect(r.status).toBe(200);
    expect(healthSchema.parse(r.body)).toEqual({ ok: true, database: 'up' });
  });

  // the early answer keeps what every API answer carries: no-store (OWASP Session Management cheat sheet, "Web
  // content caching") and helmet's headers; HEAD answers without a body (RFC 9110, section 9.3.2)
  it('keeps no-store and the security headers, and answers HEAD without a body', async () => {
    const r = await supertest(env.url).get('/api/health');
    expect(r.headers['cache-control']).toBe('no-store');
    expect(r.headers['x-content-type-options']).toBe('nosniff');
    expect(r.headers['content-security-policy']).toContain("default-src 'self'");
    const h = await supertest(env.url).head('/api/health');
    expect(h.status).toBe(200);
    expect(h.text ?? '').toBe('');
  });

  // W3C Server Timing: `db` (the probe's select 1) and `app` (arrival at the app to the answer), in ms; app includes db
  it('says in Server-Timing how long the probe and the whole answer took', async () => {
    const r = await supertest(env.url).get('/api/health');
    const h = String(r.headers['server-timing'] ?? '');
    const db = Number(/(?:^|, *)db;dur=([0-9.]+)/.exec(h)?.[1]);
    const app = Number(/(?:^|, *)app;dur=([0-9.]+)/.exec(h)?.[1]);
    expect(Number.isFinite(db) && db >= 0).toBe(true);
    expect(app).toBeGreaterThanOrEqual(db);
  });

  it('answers a poll with a query string the usual way, with the same answer and headers', async () => {
    const r = await supertest(env.url).get('/api/health?from=balancer');
    expect(r.status).toBe(200);
    expect(healthSchema.parse(r.body)).toEqual({ ok: true, database: 'up' });
    expect(r.headers['cache-control']).toBe('no-store');
    expect(r.headers['x-content-type-options']).toBe('nosniff');
    expect(String(r.headers['server-timing'])).toMatch(/db;dur=[0-9.]+, app;dur=[0-9.]+/);
    expect(r.headers['set-cookie']).toBeUndefined();
  });

  it('still refuses a NUL in a poll\'s query string (server/http/wellFormed.ts runs first)', async () => {
    const r = await supertest(env.url).get('/api/health?x=%00');
    expect(r.status).toBe(400);
  });
});
