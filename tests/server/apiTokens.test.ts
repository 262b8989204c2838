/**
 * Personal API tokens over HTTP against the real PostgreSQL: create (secret shown once), use as
 * `Authorization: Bearer` on a GET and on a POST that starts a job (no CSRF header, no cookie), scoped to
 * the owner's projects, revoke → 401, only the sha256 stored. The hash is checked against Node's own
 * crypto (a general-purpose reference implementation of SHA-256, FIPS 180-4).
 */
import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiTokenCreatedSchema, apiTokenListSchema, jobResponseSchema } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { newUser, startTestEnv, type TestClient, type TestEnv } from './helpers';

const ROOT = path.resolve(import.meta.dirname, '../..');
const PAIR = JSON.parse(await readFile(path.join(ROOT, 'tests/fixtures/designs/pair-coarse.json'), 'utf8')) as DesignDocument;

let env: TestEnv;
let owner: TestClient;
let other: TestClient;
let projectId: number;
let otherProjectId: number;
let designId: number;

const bearer = (secret: string) => `Bearer ${secret}`;

beforeAll(async () => {
  // a worker with a queue prefix of its own: jobs started here are not picked up by other files' workers
  env = await startTestEnv({ jobs: { workers: 0, settings: { queuePrefix: 'api-tokens-test-' } } });
  owner = (await newUser(env, 'tok-owner')).client;
  other = (await newUser(env, 'tok-other')).client;
  projectId = (await owner.post('/api/projects', { name: 'Token project' })).body.id as number;
  otherProjectId = (await other.post('/api/projects', { name: 'Not yours' })).body.id as number;
  const d = await owner.post(`/api/projects/${projectId}/designs`, { name: 'Pair', document: PAIR });
  expect(d.status).toBe(201);
  designId = d.body.design.id as number;
}, 60_000);

afterAll(async () => {
  await env?.stop();
});

describe('personal API tokens', () => {
  it('creates a token, shows the secret once and lists it without the secret', async () => {
    const r = await owner.post('/api/account/tokens', { name: 'cluster script' });
    expect(r.status).toBe(201);
    const created = apiTokenCreatedSchema.parse(r.body);
    expect(created.secret.startsWith(created.token.prefix)).toBe(true);
    expect(created.token.lastUsedAt).toBeNull();
    const list = apiTokenListSchema.parse((await owner.get('/api/account/tokens')).body);
    const row = list.tokens.find((t) => t.id === created.token.id);
    expect(row?.name).toBe('cluster script');
    expect(JSON.stringify(list)).not.toContain(created.secret);
  });

  it('stores only the sha256 of the secret', async () => {
    const { secret, token } = apiTokenCreatedSchema.parse((await owner.post('/api/account/tokens', { name: 'hash check' })).body);
    const row = (await env.knex('api_tokens').where({ id: token.id }).first()) as Record<string, unknown>;
    expect(row.secret_hash).toBe(createHash('sha256').update(secret, 'utf8').digest('hex'));
    for (const value of Object.values(row)) expect(String(value)).not.toContain(secret);
  });

  it('authenticates GET and POST as the owner, without cookie or CSRF header, and records the use', async () => {
    const { secret, token } = apiTokenCreatedSchema.parse((await owner.post('/api/account/tokens', { name: 'use' })).body);
    const api = supertest(env.url);
    const me = await api.get('/api/auth/me').set('Authorization', bearer(secret));
    expect(me.status).toBe(200);
    expect(me.body.user.id).toBe(owner.user!.id);
    const projects = await api.get('/api/projects').set('Authorization', bearer(secret));
    expect(projects.status).toBe(200);
    expect(JSON.stringify(projects.body)).toContain('Token project');

    const start = await api
      .post(`/api/projects/${projectId}/designs/${designId}/jobs`)
      .set('Authorization', bearer(secret))
      .send({ kind: 'mesh', options: {} });
    expect(start.status).toBe(202);
    expect(jobResponseSchema.parse(start.body).job.state).toBe('queued');

    const list = apiTokenListSchema.parse((await owner.get('/api/account/tokens')).body);
    expect(list.tokens.find((t) => t.id === token.id)?.lastUsedAt).not.toBeNull();
  });

  it("keeps to the owner's projects: another user's project is 404", async () => {
    const { secret } = apiTokenCreatedSchema.parse((await owner.post('/api/account/tokens', { name: 'scope' })).body);
    const r = await supertest(env.url).get(`/api/projects/${otherProjectId}`).set('Authorization', bearer(secret));
    expect(r.status).toBe(404);
  });

  it('refuses unknown and malformed tokens with 401', async () => {
    const api = supertest(env.url);
    expect((await api.get('/api/projects').set('Authorization', bearer('twk_not-a-real-token'))).status).toBe(401);
    expect((await api.get('/api/projects').set('Authorization', 'Basic abc')).status).toBe(401);
  });

  it('answers 401 once the token is revoked, and revoking twice or another user’s token is 404', async () => {
    const { secret, token } = apiTokenCreatedSchema.parse((await owner.post('/api/account/tokens', { name: 'to revoke' })).body);
    const api = supertest(env.url);
    expect((await api.get('/api/projects').set('Authorization', bearer(secret))).status).toBe(200);
    expect((await other.delete(`/api/account/tokens/${token.id}`)).status).toBe(404);
    expect((await owner.delete(`/api/account/tokens/${token.id}`)).status).toBe(204);
    expect((await api.get('/api/projects').set('Authorization', bearer(secret))).status).toBe(401);
    expect((await owner.delete(`/api/account/tokens/${token.id}`)).status).toBe(404);
    const list = apiTokenListSchema.parse((await owner.get('/api/account/tokens')).body);
    expect(list.tokens.some((t) => t.id === token.id)).toBe(false);
  });

  it('still demands the CSRF header when a session cookie is sent, with or without a token', async () => {
    const { secret } = apiTokenCreatedSchema.parse((await owner.post('/api/account/tokens', { name: 'csrf' })).body);
    // the signed-in agent carries the session cookie; csrf: false sends no header
    const cookieOnly = await owner.request('post', '/api/projects', { name: 'No CSRF' }, { csrf: false });
    expect(cookieOnly.status).toBe(403);
    const both = await owner.agent.post('/api/projects').set('Authorization', bearer(secret)).send({ name: 'No CSRF either' });
    expect(both.status).toBe(403);
    const tokenOnly = await supertest(env.url).post('/api/projects').set('Authorization', bearer(secret)).send({ name: 'By token' });
    expect(tokenOnly.status).toBe(201);
  });
});
