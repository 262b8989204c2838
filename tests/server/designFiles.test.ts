/**
 * Imports (multipart upload, parse and check, write nothing) and exports (downloads in four
 * formats) of the designs API, against the real server and PostgreSQL.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { designImportResponseSchema, designResponseSchema, errorBodySchema } from '@contracts/api';
import { designSchema, MAX_SITES, type DesignDocument } from '@contracts/design';
import { countRows, newUser, startTestEnv, type TestClient, type TestEnv } from './helpers';
import { emptyDesign } from '../../server/services/designs';
import { generateArray } from '../../geometry/arrays';
import { IMPORT_MAX_BYTES } from '../../server/routes/designs';

/** Si lattice constant a in nm, CODATA 2018. */
const A = 0.5431020511;
const Q = A / 4;

let env: TestEnv;
let owner: { client: TestClient };
let projectId: number;
let designId: number;
let url: string;
let doc: DesignDocument;

beforeAll(async () => {
  env = await startTestEnv();
  owner = await newUser(env, 'files');
  projectId = (await owner.client.post('/api/projects', { name: 'Files' })).body.id;
  // a 3 × 3 square at 8a (corners of the cubic cell are lattice sites) plus one free-placed donor
  const sites = [
    ...generateArray({ kind: 'square', nx: 3, ny: 3, spacingNm: 8 * A, latticeConstantNm: A, idPrefix: 'q' }),
    { id: 'free one', species: 'As' as const, position: [12 * Q + 0.0123, -0.0041, 0.5] as [number, number, number], electrons: 2 },
  ];
  doc = { ...emptyDesign('Square array: 3×3, 8a pitch (ä/β)'), sites };
  const created = designResponseSchema.parse((await owner.client.post(`/api/projects/${projectId}/designs`, { name: doc.name, document: doc })).body).design;
  designId = created.id;
  url = `/api/projects/${projectId}/designs/${designId}`;
});
afterAll(async () => {
  await env?.stop();
});

async function upload(content: string | Buffer, name: string) {
  const c = owner.client;
  return c.agent
    .post(`${url}/imports`)
    .set('x-csrf-token', c.csrf ?? (await c.refreshCsrf()))
    .attach('file', Buffer.isBuffer(content) ? content : Buffer.from(content, 'utf8'), name);
}

async function counts() {
  return Promise.all(['designs', 'design_versions', 'audit_events'].map((t) => countRows(env.knex, t)));
}

describe('imports', () => {
  it('CSV: the valid rows as sites, each bad row with its line, nothing written', async () => {
    const before = await counts();
    const csv = [
      'species,id,x_nm,y_nm,z_nm,electrons', // 1 (columns in another order)
      'P,a,0,0,0,1', // 2
      'P,b,1.0862041', // 3 missing columns
      'P,c,one,0,0,1', // 4 text in a number
      'Ge,d,2.1724082,0,0,1', // 5 unknown species
      'P,a,3.2586123,0,0,1', // 6 duplicate id
      'P,e,0,0,20,1', // 7 on the face of the 20 nm box: outside
      'As,f,0.01,0.01,0,1', // 8 same lattice point as a
      '', // 9
      'Sb,g,2.1724082044,0,0,2', // 10
    ].join('\n');
    const r = await upload(csv, 'measured.csv');
    expect(r.status).toBe(200);
    const body = designImportResponseSchema.parse(r.body);
    expect(body.sites.map((s) => s.id)).toEqual(['a', 'g']);
    expect(body.sites[1]).toEqual({ id: 'g', species: 'Sb', position: [2.1724082044, 0, 0], electrons: 2 });
    expect([...new Set(body.errors.map((e) => e.line))]).toEqual([3, 4, 5, 6, 7, 8]);
    expect(await counts()).toEqual(before);
    // the design itself is unchanged
    expect((await owner.client.get(url)).body.design.version).toBe(1);
  });

  it('XYZ in ångström comes back in nm', async () => {
    const r = await upload('2\ncolleague scan\nP 0 0 0\nBi 21.724082044 0 0\n', 'scan.xyz');
    expect(r.status).toBe(200);
    const body = designImportResponseSchema.parse(r.body);
    expect(body.errors).toEqual([]);
    expect(body.sites.map((s) => [s.id, s.species])).toEqual([
      ['P1', 'P'],
      ['Bi2', 'Bi'],
    ]);
    // 1 Å = 0.1 nm (SI Brochure)
    expect(body.sites[1].position[0]).toBeCloseTo(2.1724082044, 12);
  });

  it('a design JSON (sniffed without an extension) gives its sites', async () => {
    const r = await upload(JSON.stringify(doc, null, 2), 'upload');
    expect(r.status).toBe(200);
    const body = designImportResponseSchema.parse(r.body);
    expect(body.errors).toEqual([]);
    expect(body.sites).toEqual(doc.sites);
  });

  it('the placement list exported by the API reads back to the same sites and positions', async () => {
    const exp = await owner.client.get(`${url}/export?format=placement`);
    expect(exp.status).toBe(200);
    const r = await upload(exp.text, 'whatever.placement.txt');
    expect(r.status).toBe(200);
    const body = designImportResponseSchema.parse(r.body);
    expect(body.errors).toEqual([]);
    // bit-for-bit: the nm columns are written in the shortest round-trip form (ECMA-262 Number::toString)
    expect(body.sites.map((s) => [s.id, s.species, s.electrons, s.position])).toEqual(doc.sites.map((s) => [s.id, s.species, s.electrons, s.position]));
  });

  it('413 for a file over the limit, with a plain message; nothing written', async () => {
    const before = await counts();
    const r = await upload(Buffer.alloc(IMPORT_MAX_BYTES + 1, 0x41), 'huge.csv');
    expect(r.status).toBe(413);
    const e = errorBodySchema.parse(r.body).error;
    expect(e.code).toBe('payload_too_large');
    expect(e.message).toMatch(/16 MB/);
    expect(await counts()).toEqual(before);
  });

  it('422 for more than MAX_SITES rows, for a binary file, for an unknown format, for no file', async () => {
    const before = await counts();
    const big = ['id,species,x_nm,y_nm,z_nm', ...Array.from({ length: MAX_SITES + 1 }, (_, i) => `s${i},P,0,0,0`)].join('\n');
    const tooMany = await upload(big, 'big.csv');
    expect(tooMany.status).toBe(422);
    expect(tooMany.body.error.message).toMatch(/100,001 sites; a design may hold at most 100,000/);
    const binary = await upload(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0x00, 0x00]), 'picture.csv');
    expect(binary.status).toBe(422);
    expect(binary.body.error.message).toMatch(/not a text file/);
    const latin1 = await upload(Buffer.from([0x69, 0x64, 0xe9, 0x0a]), 'latin1.csv');
    expect(latin1.status).toBe(422);
    expect(latin1.body.error.message).toMatch(/UTF-8/);
    const unknown = await upload('just some notes\n', 'notes.txt');
    expect(unknown.status).toBe(422);
    expect(unknown.body.error.code).toBe('unprocessable');
    const none = await owner.client.post(`${url}/imports`, {});
    expect(none.status).toBe(422);
    expect(none.body.error.details[0].path).toEqual(['file']);
    expect(await counts()).toEqual(before);
  });
});

describe('exports', () => {
  it('json: the document, as an attachment named after the design', async () => {
    const r = await owner.client.get(`${url}/export?format=json`);
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toMatch(/^application\/json/);
    expect(r.headers['content-disposition']).toMatch(/^attachment; filename="?square-array-3-3-8a-pitch-a\.json"?$/);
    expect(designSchema.parse(JSON.parse(r.text))).toEqual(doc);
  });

  it('csv: header and one row per site, positions exact', async () => {
    const r = await owner.client.get(`${url}/export?format=csv`);
    expect(r.headers['content-type']).toMatch(/^text\/csv/);
    expect(r.headers['content-disposition']).toMatch(/^attachment; filename="?square-array-3-3-8a-pitch-a\.csv"?$/);
    const lines = r.text.trim().split('\n');
    expect(lines[0]).toBe('id,species,x_nm,y_nm,z_nm,electrons');
    expect(lines).toHaveLength(doc.sites.length + 1);
    const back = designImportResponseSchema.parse((await upload(r.text, 'again.csv')).body);
    expect(back.sites).toEqual(doc.sites);
  });

  it('xyz: count, comment, symbol and ångström', async () => {
    const r = await owner.client.get(`${url}/export?format=xyz`);
    expect(r.headers['content-disposition']).toMatch(/^attachment; filename="?square-array-3-3-8a-pitch-a\.xyz"?$/);
    const lines = r.text.trim().split('\n');
    expect(lines[0]).toBe(String(doc.sites.length));
    const last = lines.at(-1)!.split(' ');
    expect(last[0]).toBe('As');
    expect(Number(last[3])).toBeCloseTo(5, 12); // 0.5 nm = 5 Å
  });

  it('placement: header with lattice constant, origin, axes and units; integer indices', async () => {
    const r = await owner.client.get(`${url}/export?format=placement`);
    expect(r.headers['content-type']).toMatch(/^text\/plain/);
    expect(r.headers['content-disposition']).toMatch(/^attachment; filename="?square-array-3-3-8a-pitch-a\.placement\.txt"?$/);
    expect(r.text).toContain(`# lattice-constant-nm: ${A}`);
    expect(r.text).toContain('# axes: x [100], y [010], z [001]');
    const free = r.text.split('\n').find((l) => l.startsWith('"free one"'))!.split(' ').slice(2);
    // nearest lattice point to (3a + 0.0123, −0.0041, 0.5): x index 12; z 0.5 nm is 3.68 a/4 → a site with k = 3 or 4
    expect(free[2]).toBe('12');
    expect(Number(free[8])).toBeGreaterThan(0); // offset_nm: off the lattice
  });

  it('an unknown format is a 422 naming the query field', async () => {
    const r = await owner.client.get(`${url}/export?format=pdf`);
    expect(r.status).toBe(422);
    expect(r.body.error.details[0].path).toEqual(['format']);
  });
});
