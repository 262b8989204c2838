/** GET /api/health reports whether the database answers. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import { healthSchema } from '@contracts/api';
import { start, type RunningServer } from '../../server/index';
import { silentLogger } from '../../server/config';
import { startTestEnv, type TestEnv } from './helpers';

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
});
