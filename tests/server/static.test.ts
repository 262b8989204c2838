/**
 * The built client is served from one folder, with index.html for client-side routes
 * (a single-page app), while /api paths always answer JSON. An unexpected server failure
 * answers 500 `internal` with no stack trace.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, mkdirSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import supertest from 'supertest';
import { errorBodySchema } from '@contracts/api';
import { start, type RunningServer } from '../../server/index';
import { silentLogger } from '../../server/config';
import { startTestEnv, type TestEnv } from './helpers';

const INDEX = '<!doctype html><title>Tetrawell test shell</title><div id="root"></div>';
let dir: string;
let env: TestEnv;
let broken: RunningServer;

beforeAll(async () => {
  dir = mkdtempSync(path.join(tmpdir(), 'tw-static-'));
  mkdirSync(path.join(dir, 'assets'));
  writeFileSync(path.join(dir, 'index.html'), INDEX);
  writeFileSync(path.join(dir, 'assets', 'app.js'), 'console.log("tw")');
  env = await startTestEnv({ staticDir: dir });
  // nothing listens on loopback port 1, so every database call fails
  broken = await start({ port: 0, databaseUrl: 'postgres://nobody@127.0.0.1:1/none', staticDir: null, logger: silentLogger, sessionSecret: 'z'.repeat(32) });
});
afterAll(async () => {
  await env?.stop();
  await broken?.stop();
  rmSync(dir, { recursive: true, force: true });
});

describe('client files', () => {
  it('serves index.html at / and for client routes such as /invite/<token>', async () => {
    for (const p of ['/', '/projects/12', '/invite/abcdefghijklmnopqrstuvwxyz']) {
      const r = await supertest(env.url).get(p);
      expect(r.status).toBe(200);
      expect(r.headers['content-type']).toMatch(/text\/html/);
      expect(r.text).toBe(INDEX);
    }
  });

  it('serves assets as files', async () => {
    const r = await supertest(env.url).get('/assets/app.js');
    expect(r.status).toBe(200);
    expect(r.text).toContain('console.log');
  });

  it('never answers an /api path with the page', async () => {
    const r = await supertest(env.url).get('/api/projects/12/nothing-here');
    expect(r.status).toBe(404);
    expect(errorBodySchema.parse(r.body).error.code).toBe('not_found');
  });
});

describe('no client built', () => {
  it('says so in plain words for page requests, while the API works', async () => {
    const empty = mkdtempSync(path.join(tmpdir(), 'tw-empty-'));
    const bare = await startTestEnv({ staticDir: empty });
    try {
      const page = await supertest(bare.url).get('/projects');
      expect(page.status).toBe(503);
      expect(page.text).toContain('npm run build');
      expect((await supertest(bare.url).get('/api/health')).status).toBe(200);
      // built while running: picked up without a restart
      writeFileSync(path.join(empty, 'index.html'), INDEX);
      expect((await supertest(bare.url).get('/projects')).text).toBe(INDEX);
    } finally {
      await bare.stop();
      rmSync(empty, { recursive: true, force: true });
    }
  });
});

describe('unexpected failures', () => {
  // issue 8, item 1: an unreachable database is not an internal error but a temporary one (503 unavailable)
  it('an unreachable database answers 503 unavailable, in the error shape, without a stack trace', async () => {
    // a public read that has to ask the database
    const r = await supertest(broken.url).get('/api/invitations/abcdefghijklmnopqrstuvwxyz012345');
    expect(r.status).toBe(503);
    const e = errorBodySchema.parse(r.body).error;
    expect(e.code).toBe('unavailable');
    expect(r.text).not.toMatch(/ECONNREFUSED|\bat .+:\d+:\d+|node_modules/);
  });
});
