/**
 * Issue 8, items 5 and 8: text PostgreSQL cannot store, ids that are not plain decimal integers, and
 * caching of authenticated answers.
 *
 * - A lone UTF-16 surrogate has no UTF-8 encoding (Unicode 15, §3.9 D92 "Unicode scalar value" excludes
 *   U+D800–U+DFFF), so PostgreSQL text cannot hold it and jsonb swaps it for U+FFFD: refused with 422
 *   naming the field, nothing written.
 * - Ids are decimal integers only: Number('0x10') = 16, Number('9.0') = 9, Number('1e1') = 10 (ECMA-262
 *   StringToNumber), so coercion gave one project several addresses.
 * - Authenticated JSON carries `Cache-Control: no-store` (RFC 9111 §5.2.2.5; OWASP Session Management
 *   cheat sheet, "Web content caching").
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { errorBodySchema } from '@contracts/api';
import { countRows, newUser, startTestEnv, type TestClient, type TestEnv } from './helpers';

let env: TestEnv;
let owner: { client: TestClient };
let projectId: number;
beforeAll(async () => {
  env = await startTestEnv();
  owner = await newUser(env, 'hard');
  projectId = (await owner.client.post('/api/projects', { name: 'Hardening' })).body.id;
});
afterAll(async () => {
  await env?.stop();
});

const LONE_HIGH = '\ud800';
const LONE_LOW = '\udc00';

function expect422At(r: { status: number; body: unknown }, path: (string | number)[]) {
  expect(r.status).toBe(422);
  const err = errorBodySchema.parse(r.body).error;
  expect(err.code).toBe('validation_failed');
  expect(err.details?.map((d) => d.path)).toContainEqual(path);
}

describe('lone UTF-16 surrogates are refused with 422 naming the field', () => {
  it('POST /api/projects with a lone high surrogate as name: 422 at ["name"], no project written', async () => {
    const before = await countRows(env.knex, 'projects');
    const r = await owner.client.post('/api/projects', { name: `bad${LONE_HIGH}name` });
    expect422At(r, ['name']);
    expect(await countRows(env.knex, 'projects')).toBe(before);
  });

  it('PATCH /api/projects/:id with a lone low surrogate in the description: 422 at ["description"]', async () => {
    const p = (await owner.client.get(`/api/projects/${projectId}`)).body;
    const r = await owner.client.patch(`/api/projects/${projectId}`, { description: `x${LONE_LOW}`, version: p.version });
    expect422At(r, ['description']);
    expect((await owner.client.get(`/api/projects/${projectId}`)).body.version).toBe(p.version);
  });

  /** the project's first design: its address and what GET answers */
  async function firstDesign() {
    const designId = (await owner.client.get(`/api/projects/${projectId}/designs`)).body.designs[0].id as number;
    const path = `/api/projects/${projectId}/designs/${designId}`;
    return { path, ...((await owner.client.get(path)).body.design as { document: Record<string, unknown>; version: number }) };
  }

  it('PUT /api/projects/:id/designs/:designId with a lone surrogate in a site id: 422 at the site id, design unchanged', async () => {
    const cur = await firstDesign();
    const document = {
      ...cur.document,
      sites: [
        { id: 'ok', species: 'P', position: [0, 0, 0], electrons: 1 },
        { id: `p${LONE_HIGH}`, species: 'P', position: [1, 0, 0], electrons: 1 },
      ],
    };
    const r = await owner.client.put(cur.path, { document, version: cur.version });
    expect422At(r, ['document', 'sites', 1, 'id']);
    expect((await firstDesign()).version).toBe(cur.version);
  });

  it('a lone surrogate in a design name or an object key is refused too', async () => {
    const cur = await firstDesign();
    const named = await owner.client.put(cur.path, { document: cur.document, name: `n${LONE_LOW}`, version: cur.version });
    expect422At(named, ['name']);
    const created = await owner.client.post(`/api/projects/${projectId}/designs`, { name: `d${LONE_LOW}` });
    expect422At(created, ['name']);
    const keyed = await owner.client.post('/api/projects', { name: 'fine', [`k${LONE_HIGH}`]: 1 });
    expect422At(keyed, [`k${LONE_HIGH}`]);
  });

  it('sign-up with a lone surrogate in the display name: 422, no account', async () => {
    const email = `sur-${Date.now()}@lab.test`;
    const r = await env.client().post('/api/auth/sign-up', { email, password: 'a-long-enough-pass', displayName: `A${LONE_HIGH}` });
    expect422At(r, ['displayName']);
    expect(await env.knex('users').where({ email }).first()).toBeUndefined();
  });

  it('a properly paired surrogate (an emoji, U+1F9EA) is stored unchanged', async () => {
    const name = 'Test tube \u{1F9EA} array';
    const r = await owner.client.post('/api/projects', { name });
    expect(r.status).toBe(201);
    expect((await env.knex('projects').where({ id: r.body.id }).first()).name).toBe(name);
  });
});

describe('ids are plain decimal integers', () => {
  for (const bad of ['0x10', '9.0', '1e1', '+5', '007', '5%20']) {
    it(`GET /api/projects/${bad} is refused with 422`, async () => {
      const r = await owner.client.get(`/api/projects/${bad}`);
      expect(r.status).toBe(422);
      expect(errorBodySchema.parse(r.body).error.code).toBe('validation_failed');
    });
  }

  it('the decimal id still works', async () => {
    expect((await owner.client.get(`/api/projects/${projectId}`)).status).toBe(200);
  });

  it('hex in the member id segment is refused as well', async () => {
    const r = await owner.client.get(`/api/projects/${projectId}/members`);
    const userId = r.body.members[0].userId as number;
    const hex = await owner.client.patch(`/api/projects/${projectId}/members/0x${userId.toString(16)}`, { role: 'viewer', version: 1 });
    expect(hex.status).toBe(422);
  });

  it('the audit query refuses a hex `before`', async () => {
    const r = await owner.client.get(`/api/projects/${projectId}/audit?before=0x10`);
    expect(r.status).toBe(422);
  });
});

describe('Cache-Control: no-store on API answers', () => {
  it('signed-in reads carry no-store', async () => {
    for (const path of ['/api/projects', `/api/projects/${projectId}`, `/api/projects/${projectId}/designs`, '/api/auth/me']) {
      const r = await owner.client.get(path);
      expect(r.status).toBe(200);
      expect(r.headers['cache-control']).toBe('no-store');
    }
  });

  it('error answers and the CSRF token carry it too', async () => {
    expect((await env.client().get('/api/projects')).headers['cache-control']).toBe('no-store');
    expect((await env.client().get('/api/auth/csrf')).headers['cache-control']).toBe('no-store');
  });
});
