/**
 * Malformed bodies: broken JSON → 400 bad_request; well-formed JSON that breaks the zod
 * contract → 422 validation_failed with field paths; in both cases nothing is written
 * (rows counted before and after). Error bodies always match the contract's error shape
 * and never carry a stack trace.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { errorBodySchema } from '@contracts/api';
import { countRows, newUser, startTestEnv, type TestClient, type TestEnv } from './helpers';
import { emptyDesign } from '../../server/services/designs';

let env: TestEnv;
let owner: { client: TestClient };
let projectId: number;
let designId: number;
beforeAll(async () => {
  env = await startTestEnv({ bodyLimit: '64kb' });
  owner = await newUser(env, 'val');
  projectId = (await owner.client.post('/api/projects', { name: 'Validation' })).body.id;
  designId = (await owner.client.get(`/api/projects/${projectId}/designs`)).body.designs[0].id;
});
afterAll(async () => {
  await env?.stop();
});

function expectCleanError(body: unknown) {
  const parsed = errorBodySchema.parse(body);
  expect(JSON.stringify(parsed)).not.toMatch(/\bat .+:\d+:\d+|node_modules|Error:/);
  return parsed.error;
}

async function rawJson(c: TestClient, method: 'post' | 'put' | 'patch', path: string, raw: string) {
  const token = c.csrf ?? (await c.refreshCsrf());
  return c.agent[method](path).set('x-csrf-token', token).set('Content-Type', 'application/json').send(raw);
}

describe('malformed JSON → 400, nothing written', () => {
  const cases: [string, 'post' | 'put' | 'patch', () => string, string][] = [
    ['project create', 'post', () => '/api/projects', 'projects'],
    ['design save', 'put', () => `/api/projects/${projectId}/designs/${designId}`, 'design_versions'],
    ['design create', 'post', () => `/api/projects/${projectId}/designs`, 'designs'],
    ['invitation', 'post', () => `/api/projects/${projectId}/invitations`, 'invitations'],
    ['sign-up', 'post', () => '/api/auth/sign-up', 'users'],
  ];
  for (const [name, method, path, table] of cases) {
    it(name, async () => {
      const before = await countRows(env.knex, table);
      const r = await rawJson(owner.client, method, path(), '{"name": "unterminated');
      expect(r.status).toBe(400);
      expect(expectCleanError(r.body).code).toBe('bad_request');
      expect(await countRows(env.knex, table)).toBe(before);
    });
  }
});

describe('strings PostgreSQL cannot store', () => {
  it('a NUL character is refused with 400 and nothing is written', async () => {
    // PostgreSQL documentation, character types: "the character with code zero (NUL) cannot be stored"
    const before = await countRows(env.knex, 'projects');
    const r = await owner.client.post('/api/projects', { name: 'nul\u0000name' });
    expect(r.status).toBe(400);
    expect(expectCleanError(r.body).code).toBe('bad_request');
    expect(await countRows(env.knex, 'projects')).toBe(before);
  });
});

describe('contract violations → 422 with field paths, nothing written', () => {
  it('project without a name', async () => {
    const before = await countRows(env.knex, 'projects');
    const r = await owner.client.post('/api/projects', { name: '   ', description: 7 });
    expect(r.status).toBe(422);
    const e = expectCleanError(r.body);
    expect(e.code).toBe('validation_failed');
    expect(e.details?.map((d) => d.path.join('.')).sort()).toEqual(['description', 'name']);
    expect(await countRows(env.knex, 'projects')).toBe(before);
  });

  it('sign-up with a bad e-mail and a short password', async () => {
    const before = await countRows(env.knex, 'users');
    const r = await env.client().post('/api/auth/sign-up', { email: 'not-an-address', password: 'short', displayName: 'X' });
    expect(r.status).toBe(422);
    expect(expectCleanError(r.body).details?.map((d) => d.path[0]).sort()).toEqual(['email', 'password']);
    expect(await countRows(env.knex, 'users')).toBe(before);
  });

  it('design with a negative permittivity and a site of an unknown species', async () => {
    const before = await env.knex('designs').where({ id: designId }).first();
    const bad = { ...emptyDesign('Bad'), host: { material: 'Si', epsilonR: -11.7, latticeConstantNm: 0.5431020511 }, sites: [{ id: 'X', species: 'Xe', position: [0, 0, 0], electrons: 1 }] };
    const r = await owner.client.put(`/api/projects/${projectId}/designs/${designId}`, { document: bad, version: before.version });
    expect(r.status).toBe(422);
    const paths = expectCleanError(r.body).details!.map((d) => d.path.join('.'));
    expect(paths).toContain('document.host.epsilonR');
    expect(paths).toContain('document.sites.0.species');
    const after = await env.knex('designs').where({ id: designId }).first();
    expect(after.version).toBe(before.version);
    expect(after.document).toEqual(before.document);
  });

  it('design position given as strings is refused', async () => {
    const before = await env.knex('designs').where({ id: designId }).first();
    const bad = { ...emptyDesign('Strings'), sites: [{ id: 'S', species: 'P', position: ['1', '2', '3'], electrons: 1 }] };
    const r = await owner.client.put(`/api/projects/${projectId}/designs/${designId}`, { document: bad, version: before.version });
    expect(r.status).toBe(422);
    expect((await env.knex('designs').where({ id: designId }).first()).version).toBe(before.version);
  });

  it('invitation with an unknown role', async () => {
    const before = await countRows(env.knex, 'invitations');
    const r = await owner.client.post(`/api/projects/${projectId}/invitations`, { email: 'someone@lab.test', role: 'admin' });
    expect(r.status).toBe(422);
    expect(expectCleanError(r.body).details?.[0].path).toEqual(['role']);
    expect(await countRows(env.knex, 'invitations')).toBe(before);
  });

  it('a non-numeric project id in the address', async () => {
    const r = await owner.client.get('/api/projects/abc');
    expect(r.status).toBe(422);
    expect(expectCleanError(r.body).details?.[0].path).toEqual(['projectId']);
  });

  it('ids and versions beyond the PostgreSQL integer range are refused with 422, not a database error', async () => {
    // PostgreSQL documentation, numeric types: integer is −2147483648 … +2147483647
    const tooBig = 2 ** 31;
    const r = await owner.client.get(`/api/projects/${tooBig}`);
    expect(r.status).toBe(422);
    const v = await owner.client.patch(`/api/projects/${projectId}`, { name: 'x', version: tooBig });
    expect(v.status).toBe(422);
    expect(v.body.error.details[0].path).toEqual(['version']);
    expect((await owner.client.get(`/api/projects/${tooBig - 1}`)).status).toBe(404);
  });

  it('audit query out of range', async () => {
    const r = await owner.client.get(`/api/projects/${projectId}/audit?limit=100000`);
    expect(r.status).toBe(422);
    expect(expectCleanError(r.body).details?.[0].path).toEqual(['limit']);
  });

  it('a body larger than the limit → 413', async () => {
    const before = await countRows(env.knex, 'projects');
    const r = await owner.client.post('/api/projects', { name: 'Big', description: 'x'.repeat(70 * 1024) });
    expect(r.status).toBe(413);
    expect(expectCleanError(r.body).code).toBe('payload_too_large');
    expect(await countRows(env.knex, 'projects')).toBe(before);
  });
});

describe('project update and delete', () => {
  it('renames, then deletes; both audited, the audit outlives the project', async () => {
    const created = await owner.client.post('/api/projects', { name: 'Short-lived' });
    const id = created.body.id as number;
    const renamed = await owner.client.patch(`/api/projects/${id}`, { name: 'Renamed', version: 1 });
    expect(renamed.status).toBe(200);
    expect((await owner.client.get(`/api/projects/${id}/audit`)).body.entries.map((e: { action: string }) => e.action)).toEqual(['project.update', 'project.create']);
    expect((await owner.client.delete(`/api/projects/${id}`)).status).toBe(204);
    expect((await owner.client.get(`/api/projects/${id}`)).status).toBe(404);
    const kept = await env.knex('audit_events').where({ action: 'project.delete' }).whereRaw(`(detail->>'projectId')::int = ?`, [id]).first();
    expect(kept.detail.name).toBe('Renamed');
    expect(kept.project_id).toBeNull();
  });
});
