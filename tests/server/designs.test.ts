/**
 * The designs API against the real server and the real migrated PostgreSQL: list, create
 * (empty, from a document, as a copy), get, save with optimistic concurrency, delete, and the
 * append-only versions with their sha256.
 */
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  designListSchema,
  designResponseSchema,
  designVersionListSchema,
  designVersionResponseSchema,
  errorBodySchema,
} from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { addMember, countRows, newUser, startTestEnv, type TestClient, type TestEnv } from './helpers';
import { emptyDesign } from '../../server/services/designs';
import { farFieldCheck } from '../../geometry/farfield';
import { generateArray } from '../../geometry/arrays';
import { MAX_SITES } from '@contracts/design';
import type { Design } from '../../geometry/design/types';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.stop();
});

/** Si lattice constant a in nm, CODATA 2018. */
const A_SI = 0.5431020511;

/**
 * Canonical JSON written independently of server/formats/canonical.ts (keys sorted recursively,
 * no whitespace): JSON.stringify with a replacer that rebuilds every plain object with sorted keys
 * (ECMA-262 JSON.stringify keeps an object's own key order).
 */
function canonical(value: unknown): string {
  return JSON.stringify(value, (_k, v: unknown) =>
    v && typeof v === 'object' && !Array.isArray(v) ? Object.fromEntries(Object.keys(v).sort().map((k) => [k, (v as Record<string, unknown>)[k]])) : v,
  );
}
const sha256 = (doc: unknown) => createHash('sha256').update(canonical(doc), 'utf8').digest('hex');

function twoDonors(name: string): DesignDocument {
  // two P donors 8a apart on lattice corners (multiples of a are diamond-lattice sites; Kittel ch. 1, from memory)
  return {
    ...emptyDesign(name),
    sites: [
      { id: 'd1', species: 'P', position: [-4 * A_SI, 0, 0], electrons: 1 },
      { id: 'd2', species: 'P', position: [4 * A_SI, 0, 0], electrons: 1 },
    ],
  };
}

async function project(prefix: string) {
  const owner = await newUser(env, prefix);
  const projectId = (await owner.client.post('/api/projects', { name: `Designs ${prefix}` })).body.id as number;
  const list = designListSchema.parse((await owner.client.get(`/api/projects/${projectId}/designs`)).body);
  return { owner, projectId, first: list.designs[0], base: `/api/projects/${projectId}/designs` };
}

describe('a new project', () => {
  it('starts with one empty design named after the project, at version 1 with one stored version', async () => {
    const { owner, projectId, first, base } = await project('dz-new');
    const list = designListSchema.parse((await owner.client.get(base)).body).designs;
    expect(list).toHaveLength(1);
    expect(first).toMatchObject({ name: `Designs dz-new`, siteCount: 0, version: 1, worstRelBound: null, updatedBy: owner.user.displayName });
    const versions = designVersionListSchema.parse((await owner.client.get(`${base}/${first.id}/versions`)).body).versions;
    expect(versions.map((v) => v.version)).toEqual([1]);
    expect(await env.knex('designs').where({ project_id: projectId }).count<{ n: string }[]>({ n: '*' })).toEqual([{ n: '1' }]);
  });
});

describe('create', () => {
  it('an empty design with a name only', async () => {
    const { owner, base } = await project('dz-empty');
    const r = await owner.client.post(base, { name: 'Blank slate' });
    expect(r.status).toBe(201);
    const d = designResponseSchema.parse(r.body).design;
    expect(d).toMatchObject({ name: 'Blank slate', version: 1, updatedBy: owner.user.displayName });
    expect(d.document.name).toBe('Blank slate');
    expect(d.document.sites).toEqual([]);
  });

  it('from a document: the design name wins over the document name, and the worst bound is stored', async () => {
    const { owner, projectId, base } = await project('dz-doc');
    const doc = twoDonors('Name inside the document');
    const r = await owner.client.post(base, { name: 'Pair at 8a', document: doc });
    expect(r.status).toBe(201);
    const d = designResponseSchema.parse(r.body).design;
    expect(d.name).toBe('Pair at 8a');
    expect(d.document).toEqual({ ...doc, name: 'Pair at 8a' });
    const row = designListSchema.parse((await owner.client.get(base)).body).designs.find((x) => x.id === d.id)!;
    expect(row.siteCount).toBe(2);
    // the stored figure equals the far-field check run here on the same document (the CLI's worstRelBound)
    const want = farFieldCheck(d.document as Design).worstRelBound!;
    expect(want).toBeGreaterThan(0);
    expect(row.worstRelBound).toBeCloseTo(want, 12);
    const audit = await env.knex('audit_events').where({ project_id: projectId, action: 'design.create' }).orderBy('id').pluck('detail');
    expect(audit.at(-1)).toMatchObject({ designId: d.id, name: 'Pair at 8a', sites: 2 });
  });

  it('the list carries each design\'s targetRelError (from its document), so the table can mark a bound above target', async () => {
    const { owner, base } = await project('dz-target');
    const loose = { ...twoDonors('Loose'), refinement: { ...twoDonors('x').refinement, targetRelError: 0.25 } };
    const tight = { ...twoDonors('Tight'), refinement: { ...twoDonors('x').refinement, targetRelError: 1e-6 } };
    const a = designResponseSchema.parse((await owner.client.post(base, { name: 'Loose', document: loose })).body).design;
    const b = designResponseSchema.parse((await owner.client.post(base, { name: 'Tight', document: tight })).body).design;
    const rows = designListSchema.parse((await owner.client.get(base)).body).designs;
    const ra = rows.find((x) => x.id === a.id)!;
    const rb = rows.find((x) => x.id === b.id)!;
    expect(ra.targetRelError).toBe(0.25);
    expect(rb.targetRelError).toBe(1e-6);
    // the same box and sites give the same bound; only the tight target is missed
    expect(ra.worstRelBound).toBe(rb.worstRelBound);
    expect(rb.worstRelBound!).toBeGreaterThan(rb.targetRelError!);
    expect(ra.worstRelBound!).toBeLessThan(ra.targetRelError!);
    // a save with a new target shows in the list
    const put = await owner.client.put(`${base}/${a.id}`, { document: { ...loose, name: 'Loose', refinement: { ...loose.refinement, targetRelError: 0.01 } }, version: a.version });
    expect(put.status).toBe(200);
    const after = designListSchema.parse((await owner.client.get(base)).body).designs.find((x) => x.id === a.id)!;
    expect(after.targetRelError).toBe(0.01);
  });

  it('as a copy of another design of the project', async () => {
    const { owner, base } = await project('dz-copy');
    const src = designResponseSchema.parse((await owner.client.post(base, { name: 'Original', document: twoDonors('x') })).body).design;
    const r = await owner.client.post(base, { name: 'Copy of original', copyOf: src.id });
    expect(r.status).toBe(201);
    const copy = designResponseSchema.parse(r.body).design;
    expect(copy.id).not.toBe(src.id);
    expect(copy.version).toBe(1);
    expect(copy.document).toEqual({ ...src.document, name: 'Copy of original' });
  });

  it('field errors of a create name their field (name, document path)', async () => {
    const { owner, base } = await project('dz-bad');
    const r = await owner.client.post(base, { name: '  ' });
    expect(r.status).toBe(422);
    expect(errorBodySchema.parse(r.body).error.details?.map((d) => d.path)).toEqual([['name']]);
    const doc = await owner.client.post(base, { name: 'x', document: { ...twoDonors('x'), sites: [{ id: 'a', species: 'Kr', position: [0, 0, 0], electrons: 1 }] } });
    expect(doc.body.error.details.map((d: { path: unknown[] }) => d.path.join('.'))).toEqual(['document.sites.0.species']);
  });

  it('refuses a copy of a design of another project (422 on copyOf) and both shapes at once', async () => {
    const a = await project('dz-copyA');
    const b = await project('dz-copyB');
    await addMember(env.knex, b.projectId, a.owner.user.id, 'owner');
    const before = await countRows(env.knex, 'designs');
    const r = await a.owner.client.post(a.base, { name: 'Stolen', copyOf: b.first.id });
    expect(r.status).toBe(422);
    expect(errorBodySchema.parse(r.body).error.details?.[0].path).toEqual(['copyOf']);
    const both = await a.owner.client.post(a.base, { name: 'Both', copyOf: a.first.id, document: twoDonors('x') });
    expect(both.status).toBe(422);
    expect(await countRows(env.knex, 'designs')).toBe(before);
  });
});

describe('get, save, delete', () => {
  it('PUT saves a new version (with a rename), keeps the old one, audits both', async () => {
    const { owner, projectId, first, base } = await project('dz-put');
    const url = `${base}/${first.id}`;
    const r = await owner.client.put(url, { document: twoDonors('ignored'), version: 1, name: 'Renamed pair' });
    expect(r.status).toBe(200);
    const d = designResponseSchema.parse(r.body).design;
    expect(d).toMatchObject({ id: first.id, name: 'Renamed pair', version: 2 });
    expect(d.document.name).toBe('Renamed pair');
    const got = designResponseSchema.parse((await owner.client.get(url)).body).design;
    expect(got).toEqual(d);
    const v1 = designVersionResponseSchema.parse((await owner.client.get(`${url}/versions/1`)).body).version;
    expect(v1.document.sites).toEqual([]);
    expect(v1.name).toBe('Designs dz-put');
    const actions = await env.knex('audit_events').where({ project_id: projectId }).orderBy('id').pluck('action');
    expect(actions).toEqual(['project.create', 'design.update', 'design.rename']);
  });

  it('PUT without a name keeps the document name as the design name', async () => {
    const { owner, first, base } = await project('dz-put2');
    const r = await owner.client.put(`${base}/${first.id}`, { document: twoDonors('From the document'), version: 1 });
    expect(r.body.design.name).toBe('From the document');
  });

  it('a design of another project is 404 through this project, for every route', async () => {
    const a = await project('dz-404a');
    const b = await project('dz-404b');
    const url = `${a.base}/${b.first.id}`;
    expect((await a.owner.client.get(url)).status).toBe(404);
    expect((await a.owner.client.put(url, { document: emptyDesign('x'), version: 1 })).status).toBe(404);
    expect((await a.owner.client.delete(url)).status).toBe(404);
    expect((await a.owner.client.get(`${url}/versions`)).status).toBe(404);
    expect((await a.owner.client.get(`${url}/versions/1`)).status).toBe(404);
    expect((await a.owner.client.get(`${a.base}/${a.first.id}/versions/7`)).status).toBe(404);
    expect((await b.owner.client.get(`${b.base}/${b.first.id}`)).body.design.version).toBe(1);
  });

  it('DELETE removes the design and its versions, with an audit entry', async () => {
    const { owner, projectId, base } = await project('dz-del');
    const d = designResponseSchema.parse((await owner.client.post(base, { name: 'Doomed', document: twoDonors('x') })).body).design;
    expect((await owner.client.delete(`${base}/${d.id}`)).status).toBe(204);
    expect((await owner.client.get(`${base}/${d.id}`)).status).toBe(404);
    expect(designListSchema.parse((await owner.client.get(base)).body).designs.map((x) => x.id)).not.toContain(d.id);
    expect(await env.knex('design_versions').where({ design_id: d.id }).count<{ n: string }[]>({ n: '*' })).toEqual([{ n: '0' }]);
    const entry = await env.knex('audit_events').where({ project_id: projectId, action: 'design.delete' }).first();
    expect(entry.detail).toMatchObject({ designId: d.id, name: 'Doomed' });
  });

  it('a viewer reads but cannot save, create or delete (403, nothing written)', async () => {
    const { first, base, projectId } = await project('dz-view');
    const viewer = await newUser(env, 'dz-viewer');
    await addMember(env.knex, projectId, viewer.user.id, 'viewer');
    const c: TestClient = viewer.client;
    expect((await c.get(`${base}/${first.id}`)).status).toBe(200);
    const before = await countRows(env.knex, 'design_versions');
    expect((await c.put(`${base}/${first.id}`, { document: emptyDesign('x'), version: 1 })).status).toBe(403);
    expect((await c.post(base, { name: 'x' })).status).toBe(403);
    expect((await c.delete(`${base}/${first.id}`)).status).toBe(403);
    expect(await countRows(env.knex, 'design_versions')).toBe(before);
  });
});

describe('versions', () => {
  it('lists newest first; each sha256 is that of the canonical JSON of its document', async () => {
    const { owner, first, base } = await project('dz-ver');
    const url = `${base}/${first.id}`;
    await owner.client.put(url, { document: twoDonors('Second'), version: 1 });
    await owner.client.put(url, { document: { ...twoDonors('Third'), sites: [] }, version: 2 });
    const list = designVersionListSchema.parse((await owner.client.get(`${url}/versions`)).body).versions;
    expect(list.map((v) => [v.version, v.name, v.siteCount])).toEqual([
      [3, 'Third', 0],
      [2, 'Second', 2],
      [1, 'Designs dz-ver', 0],
    ]);
    for (const v of list) {
      const one = designVersionResponseSchema.parse((await owner.client.get(`${url}/versions/${v.version}`)).body).version;
      expect(one.sha256).toBe(v.sha256);
      // FIPS 180-4 SHA-256 as implemented by node:crypto, of the canonical JSON computed in this test
      expect(one.sha256).toBe(sha256(one.document));
      expect(one.createdBy).toBe(owner.user.displayName);
    }
    expect(new Set(list.map((v) => v.sha256)).size).toBe(3);
  });

  it('a stored version cannot be updated, even by SQL (append-only trigger)', async () => {
    const { first } = await project('dz-ro');
    await expect(env.knex('design_versions').where({ design_id: first.id, version: 1 }).update({ name: 'tampered' })).rejects.toThrow(/append-only/);
    expect((await env.knex('design_versions').where({ design_id: first.id, version: 1 }).first()).name).toBe('Designs dz-ro');
  });
});

describe('documents saved in format version 1', () => {
  /** the same document as version 1 wrote it: `enclosure` where version 2 says `domain` */
  const asVersion1 = (doc: DesignDocument) => {
    const { domain, ...rest } = doc;
    return { ...rest, version: 1, enclosure: domain };
  };

  it('a version-1 upload is read, migrated and stored as version 2', async () => {
    const { owner, first, base } = await project('dz-v1-put');
    const r = await owner.client.put(`${base}/${first.id}`, { document: asVersion1(twoDonors('Old file')), version: 1 });
    expect(r.status, JSON.stringify(r.body).slice(0, 300)).toBe(200);
    const got = designResponseSchema.parse((await owner.client.get(`${base}/${first.id}`)).body).design;
    expect(got.document.version).toBe(2);
    expect(got.document.domain).toEqual(twoDonors('x').domain);
    expect('enclosure' in (got.document as Record<string, unknown>)).toBe(false);
  });

  it('rows an older build stored in version 1 are served in version 2, the stored bytes untouched', async () => {
    const { owner, first, base } = await project('dz-v1-row');
    await owner.client.put(`${base}/${first.id}`, { document: twoDonors('Stored long ago'), version: 1 });
    const old = asVersion1(twoDonors('Stored long ago'));
    // what an older build wrote: the version rows are append-only, so the test lifts the trigger for the write
    await env.knex.transaction(async (trx) => {
      await trx.raw('ALTER TABLE design_versions DISABLE TRIGGER USER');
      await trx('design_versions').where({ design_id: first.id, version: 2 }).update({ document: JSON.stringify(old) });
      await trx.raw('ALTER TABLE design_versions ENABLE TRIGGER USER');
      await trx('designs').where({ id: first.id }).update({ document: JSON.stringify(old) });
    });
    const cur = designResponseSchema.parse((await owner.client.get(`${base}/${first.id}`)).body).design;
    expect(cur.document).toMatchObject({ version: 2, domain: twoDonors('x').domain });
    const v = designVersionResponseSchema.parse((await owner.client.get(`${base}/${first.id}/versions/2`)).body);
    expect(v.version.document).toMatchObject({ version: 2, domain: twoDonors('x').domain });
    const stored = (await env.knex('design_versions').where({ design_id: first.id, version: 2 }).first()).document as Record<string, unknown>;
    expect(stored.version).toBe(1);
    expect(stored.enclosure).toBeDefined();
  });
});

describe('the largest designs', () => {
  /** a rectangular array of n × 250 P donors at 8a (lattice corners) in a box that holds it */
  function big(nx: number, name: string): DesignDocument {
    const sites = generateArray({ kind: 'rectangular', nx, ny: 250, spacingNm: 8 * A_SI, latticeConstantNm: A_SI });
    return { ...emptyDesign(name), sites, domain: { center: [0, 0, 0], halfExtentsNm: [nx * 2.2 + 40, 250 * 2.2 + 40, 40], boundary: { kind: 'multipole', order: 2 } } };
  }

  it('a 100,000-site design (about 9 MB of JSON) saves, with its far-field bound from the worker thread', async () => {
    const { owner, first, base } = await project('dz-big');
    const doc = big(400, 'Hundred thousand');
    expect(doc.sites).toHaveLength(MAX_SITES);
    const url = `${base}/${first.id}`;
    // health answers while the save runs (printed, not asserted: timings depend on the machine)
    const started = Date.now();
    const save = owner.client.put(url, { document: doc, version: 1 });
    const healthMs: number[] = [];
    let done = false;
    void save.then(() => (done = true));
    while (!done && Date.now() - started < 60_000) {
      const t = Date.now();
      await env.client().get('/api/health');
      healthMs.push(Date.now() - t);
      await new Promise((r) => setTimeout(r, 50));
    }
    const r = await save;
    expect(r.status, JSON.stringify(r.body).slice(0, 300)).toBe(200);
    console.log(`[designs] 100k-site PUT ${Date.now() - started} ms; /api/health during it: max ${Math.max(...healthMs)} ms over ${healthMs.length} calls`);
    const row = designListSchema.parse((await owner.client.get(base)).body).designs[0];
    expect(row.siteCount).toBe(MAX_SITES);
    expect(row.worstRelBound).not.toBeNull();
    expect(Number.isFinite(row.worstRelBound)).toBe(true);
  });

  it('a design of 100,001 sites is refused with a plain message and nothing is written', async () => {
    const { owner, first, base } = await project('dz-toobig');
    const doc = big(400, 'One too many');
    doc.sites.push({ id: 'extra', species: 'P', position: [0, 0, 1], electrons: 1 });
    const before = await countRows(env.knex, 'design_versions');
    const r = await owner.client.put(`${base}/${first.id}`, { document: doc, version: 1 });
    expect(r.status).toBe(422);
    const e = errorBodySchema.parse(r.body).error;
    expect(e.details?.[0].path).toEqual(['document', 'sites']);
    expect(e.details?.[0].message).toMatch(/100,001 sites; a design may hold at most 100,000/);
    expect(await countRows(env.knex, 'design_versions')).toBe(before);
  });
});
