/**
 * Issue 8, item 1: the server survives a PostgreSQL restart. The cluster is stopped the way an operator does
 * it (`pg_ctl -m fast stop`: every backend gets 57P01 admin_shutdown, PostgreSQL manual appendix A), the
 * server keeps running and answers 503 `unavailable` to every request that needs the database, signed in
 * or not, and serves again by itself once the cluster is back, with the same sign-in.
 *
 * The cluster is this file's own (`.data/pg-restart`, made with the same server/ops helpers as the test
 * cluster, on a free port): stopping the shared test cluster would break the test files running beside it.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import bcrypt from 'bcryptjs';
import supertest from 'supertest';
import { errorBodySchema } from '@contracts/api';
import { startCluster, type Cluster } from '../../server/ops/postgres.mjs';
import { prepareDatabase } from '../../server/ops/setup.mjs';
import { freePort } from '../../server/ops/sys.mjs';
import { start, type RunningServer } from '../../server/index';
import type { Logger } from '../../server/config';
import { TestClient, TEST_PASSWORD, uniqueEmail } from './helpers';

const NAME = 'pg-restart';
let port: number;
let cluster: Cluster;
let server: RunningServer;
const logged: string[] = [];
const logger: Logger = {
  info() {},
  warn: (...a) => logged.push(`warn ${a.map(String).join(' ')}`),
  error: (...a) => logged.push(`error ${a.map(String).join(' ')}`),
};

beforeAll(async () => {
  port = await freePort();
  cluster = await startCluster({ name: NAME, port, disposable: true });
  await prepareDatabase({ databaseUrl: cluster.url('tetrawell_restart'), adminUrl: cluster.url('postgres'), recreate: true });
  server = await start({ port: 0, databaseUrl: cluster.url('tetrawell_restart'), sessionSecret: 'r'.repeat(32), staticDir: null, bcryptRounds: 4, logger });
}, 180_000);

afterAll(async () => {
  await server?.stop();
  await cluster?.stop();
});

async function expectUnavailable(r: { status: number; body: unknown }) {
  expect(r.status).toBe(503);
  const e = errorBodySchema.parse(r.body).error;
  expect(e.code).toBe('unavailable');
  expect(e.message).toMatch(/database/i);
}

describe('a PostgreSQL restart', () => {
  it('answers 503 while the database is away and recovers by itself when it returns', async () => {
    const email = uniqueEmail('restart');
    await server.knex('users').insert({
      email,
      password_hash: await bcrypt.hash(TEST_PASSWORD, 4),
      display_name: 'Restart Tester',
      site_role: 'member',
      email_verified_at: new Date(),
    });
    const c = new TestClient(server.url);
    await c.signIn(email);
    expect((await c.post('/api/projects', { name: 'Before the restart' })).status).toBe(201);
    expect((await c.get('/api/projects')).status).toBe(200);

    await cluster.stop();
    // the terminated idle connections emit their 'error' events now: without listeners the process would end here
    await new Promise((r) => setTimeout(r, 300));

    await expectUnavailable(await c.get('/api/projects')); // signed in: loading the session fails
    await expectUnavailable(await c.post('/api/projects', { name: 'During the outage' }));
    await expectUnavailable(await supertest(server.url).get('/api/auth/csrf')); // anonymous: storing the CSRF secret fails
    const health = await supertest(server.url).get('/api/health');
    expect(health.status).toBe(503);
    expect(health.body).toEqual({ ok: false, database: 'down' });

    cluster = await startCluster({ name: NAME, port, disposable: true });
    // back without a server restart, and the sign-in survived (sessions live in the database)
    const until = Date.now() + 10_000;
    let r = await c.get('/api/projects');
    while (r.status !== 200 && Date.now() < until) {
      await new Promise((res) => setTimeout(res, 200));
      r = await c.get('/api/projects');
    }
    expect(r.status).toBe(200);
    expect(r.body.projects.map((p: { name: string }) => p.name)).toContain('Before the restart');
    expect(r.body.projects.map((p: { name: string }) => p.name)).not.toContain('During the outage');
    expect((await c.post('/api/projects', { name: 'After the restart' })).status).toBe(201);
    expect((await supertest(server.url).get('/api/health')).status).toBe(200);
    // the outage was logged as such, never as an internal error
    expect(logged.filter((l) => l.startsWith('error') && !l.includes('session store'))).toEqual([]);
  });
});
