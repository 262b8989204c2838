/**
 * A `convergence` job end to end through the real worker (pg-boss + a piscina thread in the test server), and the
 * potential a `coulomb` job stores for the mesh viewer.
 *
 * Outside references:
 * - the project's command line, run as a separate process on the same stored document: the revision's summary has
 *   exactly the keys `npm run cli -- convergence <doc> --kind refinement --order 1 --json` prints (wall time
 *   `seconds` aside) and the same numbers (the numerical core is deterministic);
 * - the potential of a hydrogen-like 1s charge density ρ = e·exp(−2r/a)/(πa³) in a homogeneous dielectric (the
 *   classic closed form, e.g. Griffiths, Introduction to Electrodynamics, problem 2.49 (4th ed.), from memory):
 *   φ(r) = e/(4πε₀ εr) · [1/r − (1/a + 1/r)·exp(−2r/a)], with e²/(4πε₀) = 1.439964547 eV·nm (CODATA 2018, α·ħc), so
 *   in volts φ = 1.439964547/εr · [1/r − (1/a + 1/r)·exp(−2r/a)] for r in nm; a = 2.5 nm, set on both sites'
 *   orbitals below. Summed over both sites and checked at every vertex of the stored mesh within 3 % (common
 *   practice: the P1 discretisation error of this coarse graded mesh, measured at 2.3 % at worst, plus the walls).
 */
import { execFile } from 'node:child_process';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jobResponseSchema, revisionResponseSchema, type Job } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { decodeMeshBinary } from '../../geometry/mesh/export/binary';
import { startTestEnv, newUser, type TestClient, type TestEnv } from './helpers';

const run = promisify(execFile);
const ROOT = path.resolve(import.meta.dirname, '../..');
const PAIR = JSON.parse(await readFile(path.join(ROOT, 'tests/fixtures/designs/pair-coarse.json'), 'utf8')) as DesignDocument;
/** the coarse pair in a smaller box with a looser target: its three sweep levels (1,536 → 98,304 tetrahedra) fit in seconds */
const SWEEP: DesignDocument = {
  ...PAIR,
  name: 'Coarse pair for a refinement sweep (invented)',
  domain: { ...PAIR.domain, halfExtentsNm: [8, 8, 8] },
  refinement: { order: 1, targetRelError: 0.5, maxElements: 400_000 },
};

let env: TestEnv;
let owner: TestClient;
let projectId: number;
let tmp: string;

async function waitFor(jobId: number, timeoutMs: number): Promise<Job> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const r = await owner.get(`/api/projects/${projectId}/jobs/${jobId}`);
    expect(r.status).toBe(200);
    const job = jobResponseSchema.parse(r.body).job;
    if (['succeeded', 'failed', 'cancelled'].includes(job.state)) return job;
    if (Date.now() > until) throw new Error(`job ${jobId} still ${job.state} (${JSON.stringify(job.progress)})`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

async function cli(args: string[]): Promise<string> {
  const { stdout } = await run(process.execPath, ['--import', 'tsx', path.join(ROOT, 'server/cli/index.ts'), ...args], { cwd: ROOT, maxBuffer: 64 << 20 });
  return stdout;
}

async function newDesign(doc: DesignDocument): Promise<number> {
  const r = await owner.post(`/api/projects/${projectId}/designs`, { name: doc.name, document: doc });
  expect(r.status).toBe(201);
  return r.body.design.id as number;
}

beforeAll(async () => {
  env = await startTestEnv({ jobs: { workers: 1, pollIntervalMs: 150, settings: { queuePrefix: 'jobs-convergence-test-' } } });
  tmp = await mkdtemp(path.join(tmpdir(), 'tetrawell-jobs-conv-'));
  owner = (await newUser(env, 'jobs-conv-owner')).client;
  projectId = (await owner.post('/api/projects', { name: 'Convergence jobs (invented)' })).body.id as number;
}, 60_000);

afterAll(async () => {
  await env?.stop();
  if (tmp) await rm(tmp, { recursive: true, force: true });
});

describe('convergence jobs', () => {
  it('a refinement sweep runs to a revision whose summary has the keys and numbers the CLI prints', async () => {
    const designId = await newDesign(SWEEP);
    const r = await owner.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'convergence', options: { order: 1, sweep: 'refinement' } });
    expect(r.status).toBe(202);
    const stored = await owner.get(`/api/projects/${projectId}/designs/${designId}`);
    const file = path.join(tmp, 'sweep.json');
    await writeFile(file, JSON.stringify(stored.body.design.document));
    const [done, printed] = await Promise.all([waitFor(r.body.job.id as number, 240_000), cli(['convergence', file, '--kind', 'refinement', '--order', '1', '--json'])]);
    expect(done.state, done.error ?? '').toBe('succeeded');
    expect(done.options).toEqual({ order: 1, sweep: 'refinement' });
    const rev = revisionResponseSchema.parse((await owner.get(`/api/projects/${projectId}/revisions/${done.revisionId}`)).body).revision;
    expect(rev.kind).toBe('convergence');
    const { seconds: _s, ...fromCli } = JSON.parse(printed) as Record<string, unknown>;
    expect(Object.keys(rev.summary).sort()).toEqual(Object.keys(fromCli).sort());
    // the CLI's convergence keys, named here so that a key dropped on both sides still fails
    for (const k of ['kind', 'order', 'siteIds', 'rows', 'plots', 'fittedRate', 'theoreticalRate', 'notes']) expect(rev.summary).toHaveProperty(k);
    expect(rev.summary).toEqual(fromCli);
    expect(rev.summary.kind).toBe('refinement');
    // three levels, each 8× the elements of the one before (every edge halved: 3 bisections per level)
    const rows = rev.summary.rows as { elements: number }[];
    expect(rows).toHaveLength(3);
    expect(rows[1].elements).toBe(8 * rows[0].elements);
    expect(rev.files.map((f) => f.name)).toEqual(['results.json', 'results.csv']);
  }, 300_000);
});

describe('coulomb jobs keep the potential for the mesh viewer', () => {
  it('mesh.twmesh and potential.f64: one value per vertex, and the closed-form potential of two 1s charges', async () => {
    const designId = await newDesign({ ...PAIR, name: 'Coarse pair potential (invented)', sites: PAIR.sites.map((s) => ({ ...s, orbital: { model: 'hydrogenic-1s', radiusNm: 2.5 } })) });
    const r = await owner.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'coulomb', options: { order: 1 } });
    expect(r.status).toBe(202);
    const done = await waitFor(r.body.job.id as number, 240_000);
    expect(done.state, done.error ?? '').toBe('succeeded');
    const rev = revisionResponseSchema.parse((await owner.get(`/api/projects/${projectId}/revisions/${done.revisionId}`)).body).revision;
    expect(rev.files.map((f) => f.name)).toEqual(['mesh.twmesh', 'results.json', 'results.csv', 'potential.f64']);
    const bytes = async (name: string) => {
      const f = await owner.agent.get(`/api/projects/${projectId}/revisions/${rev.id}/files/${name}`).buffer(true).parse((res, cb) => {
        const parts: Buffer[] = [];
        res.on('data', (c: Buffer) => parts.push(c));
        res.on('end', () => cb(null, Buffer.concat(parts)));
      });
      expect(f.status).toBe(200);
      return new Uint8Array(f.body as Buffer);
    };
    const mesh = decodeMeshBinary(await bytes('mesh.twmesh'));
    const pot = await bytes('potential.f64');
    const nV = mesh.coords.length / 3;
    expect(pot.length).toBe(8 * nV);
    const view = new DataView(pot.buffer, pot.byteOffset, pot.byteLength);
    const sites = PAIR.sites.map((s) => s.position);
    const a = 2.5;
    const shell = (r: number) => 1 / r - (1 / a + 1 / r) * Math.exp((-2 * r) / a);
    let checked = 0;
    for (let v = 0; v < nV; v++) {
      const p = [mesh.coords[3 * v], mesh.coords[3 * v + 1], mesh.coords[3 * v + 2]];
      const d = sites.map((s) => Math.hypot(p[0] - s[0], p[1] - s[1], p[2] - s[2]));
      const closed = d.reduce((acc, di) => acc + (1.439964547 / PAIR.host.epsilonR) * (di > 1e-9 ? shell(di) : 1 / a), 0);
      expect(Math.abs(view.getFloat64(8 * v, true) - closed) / closed, `vertex ${v} at ${p.join(', ')} nm`).toBeLessThan(0.03);
      checked++;
    }
    expect(checked).toBe(nV);
  }, 300_000);
});
