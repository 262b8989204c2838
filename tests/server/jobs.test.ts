/**
 * Jobs and revisions over HTTP against the real PostgreSQL, with a real job worker (pg-boss +
 * a piscina worker thread) running in the test server's process.
 *
 * The outside reference is the project's command line, run as a separate process on the same
 * design document: the revision's mesh.vtu must be byte-identical to `npm run cli -- mesh … --out
 * x.vtu --order N`, and its results.json must hold what `npm run cli -- coulomb … --order N --json`
 * prints (same keys, same numbers; the wall time `seconds` aside).
 */
import { execFile } from 'node:child_process';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jobResponseSchema, jobListSchema, revisionListSchema, revisionResponseSchema, type Job } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { addMember, newUser, startTestEnv, type TestClient, type TestEnv } from './helpers';

const run = promisify(execFile);
const ROOT = path.resolve(import.meta.dirname, '../..');
const PAIR = JSON.parse(await readFile(path.join(ROOT, 'tests/fixtures/designs/pair-coarse.json'), 'utf8')) as DesignDocument;

let env: TestEnv;
let owner: TestClient;
let viewer: TestClient;
let projectId: number;
let designId: number;
let tmp: string;

async function waitFor(c: TestClient, jobId: number, done: (j: Job) => boolean, timeoutMs = 120_000): Promise<Job> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const r = await c.get(`/api/projects/${projectId}/jobs/${jobId}`);
    expect(r.status).toBe(200);
    const job = jobResponseSchema.parse(r.body).job;
    if (done(job)) return job;
    if (Date.now() > until) throw new Error(`job ${jobId} still ${job.state} (${JSON.stringify(job.progress)})`);
    await new Promise((r) => setTimeout(r, 150));
  }
}
const ended = (j: Job) => ['succeeded', 'failed', 'cancelled'].includes(j.state);

/** the stored document, written to a file for the CLI */
async function documentFile(c: TestClient, dId: number, name: string): Promise<string> {
  const d = await c.get(`/api/projects/${projectId}/designs/${dId}`);
  expect(d.status).toBe(200);
  const file = path.join(tmp, name);
  await writeFile(file, JSON.stringify(d.body.design.document));
  return file;
}

async function cli(args: string[]): Promise<string> {
  const { stdout } = await run(process.execPath, ['--import', 'tsx', path.join(ROOT, 'server/cli/index.ts'), ...args], { cwd: ROOT, maxBuffer: 64 << 20 });
  return stdout;
}

async function newDesign(c: TestClient, doc: DesignDocument, name: string): Promise<number> {
  const r = await c.post(`/api/projects/${projectId}/designs`, { name, document: doc });
  expect(r.status).toBe(201);
  return r.body.design.id as number;
}

beforeAll(async () => {
  env = await startTestEnv({ jobs: { workers: 1, pollIntervalMs: 150, settings: { maxActivePerProject: 3, chunkBytes: 32 * 1024, queuePrefix: 'jobs-test-' } } });
  tmp = await mkdtemp(path.join(tmpdir(), 'tetrawell-jobs-'));
  const o = await newUser(env, 'jobs-owner');
  owner = o.client;
  projectId = (await owner.post('/api/projects', { name: 'Jobs test project' })).body.id as number;
  const v = await newUser(env, 'jobs-viewer');
  viewer = v.client;
  await addMember(env.knex, projectId, v.user.id, 'viewer');
  designId = await newDesign(owner, PAIR, 'Coarse donor pair');
}, 60_000);

afterAll(async () => {
  await env?.stop();
  if (tmp) await rm(tmp, { recursive: true, force: true });
});

describe('mesh jobs', () => {
  let job: Job;
  it('POST answers 202 with a queued job for the current design version', async () => {
    const r = await owner.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'mesh', options: { order: 1 } });
    expect(r.status).toBe(202);
    job = jobResponseSchema.parse(r.body).job;
    expect(job).toMatchObject({ kind: 'mesh', designId, designVersion: 1, options: { order: 1 }, revisionId: null, error: null });
    expect(['queued', 'running']).toContain(job.state);
  });

  it('the worker runs it to succeeded with a revision; the list shows it first', async () => {
    const done = await waitFor(owner, job.id, ended);
    expect(done.state).toBe('succeeded');
    expect(done.progress).toEqual({ phase: 'done', fraction: 1 });
    expect(done.revisionId).toBeGreaterThan(0);
    expect(done.startedAt).not.toBeNull();
    expect(done.finishedAt).not.toBeNull();
    const list = jobListSchema.parse((await viewer.get(`/api/projects/${projectId}/jobs`)).body).jobs;
    expect(list[0].id).toBe(job.id);
    job = done;
  });

  it('the revision holds the CLI summary keys, the software version and the files', async () => {
    const r = await viewer.get(`/api/projects/${projectId}/revisions/${job.revisionId}`);
    expect(r.status).toBe(200);
    const rev = revisionResponseSchema.parse(r.body).revision;
    // the list of `mesh --json` keys (server/cli/mesh.ts), timings and file name aside
    expect(Object.keys(rev.summary).sort()).toEqual(['levels', 'maxDihedralDeg', 'minDihedralDeg', 'p2Nodes', 'tets', 'vertices', 'volumeNm3'].sort());
    expect(rev.summary.volumeNm3).toBeCloseTo(24 ** 3, 6); // the 24 nm cube of the fixture's domain
    expect(rev.files.map((f) => f.name)).toEqual(['mesh.vtu', 'mesh.vtk', 'mesh.twmesh', 'results.json', 'results.csv']);
    expect(rev.software.version).toBe(JSON.parse(await readFile(path.join(ROOT, 'package.json'), 'utf8')).version);
    expect(rev.designSha256).toMatch(/^[0-9a-f]{64}$/);
    expect(rev.jobId).toBe(job.id);
    const versions = await viewer.get(`/api/projects/${projectId}/designs/${designId}/versions`);
    expect(rev.designSha256).toBe(versions.body.versions[0].sha256);
  });

  it('mesh.vtu is byte-identical to `npm run cli -- mesh <doc> --out x.vtu --order 1`', async () => {
    const doc = await documentFile(owner, designId, 'pair.json');
    const out = path.join(tmp, 'cli.vtu');
    const summary = JSON.parse(await cli(['mesh', doc, '--out', out, '--order', '1', '--json']));
    const r = await viewer.agent.get(`/api/projects/${projectId}/revisions/${job.revisionId}/files/mesh.vtu`).buffer(true).parse((res, cb) => {
      const parts: Buffer[] = [];
      res.on('data', (b: Buffer) => parts.push(b));
      res.on('end', () => cb(null, Buffer.concat(parts)));
    });
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toMatch(/^application\/xml/);
    expect(r.headers['content-disposition']).toMatch(new RegExp(`attachment; filename="coarse-donor-pair-r${job.revisionId}-mesh\\.vtu"`));
    const cliBytes = await readFile(out);
    // the test server stores 32 KiB pieces: the download crossed several of them
    expect(cliBytes.length).toBeGreaterThan(3 * 32 * 1024);
    expect(Buffer.compare(r.body as Buffer, cliBytes)).toBe(0);
    // and the stored summary is the CLI's, key for key
    const rev = revisionResponseSchema.parse((await viewer.get(`/api/projects/${projectId}/revisions/${job.revisionId}`)).body).revision;
    const { seconds: _s, file: _f, ...cliSummary } = summary;
    expect(rev.summary).toEqual(cliSummary);
  }, 120_000);

  it('asking again for the same document and options reuses the revision: 200, succeeded, reused, nothing queued', async () => {
    const before = await env.knex('revisions').where({ project_id: projectId }).count<{ n: string }[]>('id as n');
    const r = await owner.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'mesh', options: {} }); // order 1 is the design's own
    expect(r.status).toBe(200);
    const j = jobResponseSchema.parse(r.body).job;
    expect(j).toMatchObject({ state: 'succeeded', revisionId: job.revisionId, reused: true });
    const after = await env.knex('revisions').where({ project_id: projectId }).count<{ n: string }[]>('id as n');
    expect(after[0].n).toBe(before[0].n);
  });

  it('the revision list (all, and by design) and the audit trail show it', async () => {
    const all = revisionListSchema.parse((await viewer.get(`/api/projects/${projectId}/revisions`)).body).revisions;
    expect(all.some((r) => r.id === job.revisionId)).toBe(true);
    const none = revisionListSchema.parse((await viewer.get(`/api/projects/${projectId}/revisions?designId=${designId + 100000}`)).body).revisions;
    expect(none).toEqual([]);
    const audit = await owner.get(`/api/projects/${projectId}/audit`);
    const actions = (audit.body.entries as { action: string }[]).map((e) => e.action);
    for (const a of ['job.start', 'revision.create', 'revision.download']) expect(actions).toContain(a);
  });

  it('a viewer can read but not start or cancel', async () => {
    expect((await viewer.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'mesh' })).status).toBe(403);
    expect((await viewer.post(`/api/projects/${projectId}/jobs/${job.id}/cancel`)).status).toBe(403);
  });
});

describe('coulomb jobs', () => {
  it('results.json holds what `npm run cli -- coulomb <doc> --order 1 --json` prints, timings aside', async () => {
    const r = await owner.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'coulomb', options: { order: 1 } });
    expect(r.status).toBe(202);
    const doc = await documentFile(owner, designId, 'pair-c.json');
    const [done, printed] = await Promise.all([waitFor(owner, r.body.job.id, ended, 240_000), cli(['coulomb', doc, '--order', '1', '--json'])]);
    expect(done.state).toBe('succeeded');
    expect(done.options).toEqual({ order: 1, adaptive: false });
    const f = await viewer.get(`/api/projects/${projectId}/revisions/${done.revisionId}/files/results.json`);
    expect(f.status).toBe(200);
    expect(f.headers['content-type']).toMatch(/^application\/json/);
    const stored = JSON.parse(f.text);
    const fromCli = JSON.parse(printed);
    expect(Object.keys(stored)).toEqual(Object.keys(fromCli));
    const { seconds: _a, ...a } = stored;
    const { seconds: _b, ...b } = fromCli;
    expect(a).toEqual(b);
    const csv = await viewer.get(`/api/projects/${projectId}/revisions/${done.revisionId}/files/results.csv`);
    expect(csv.status).toBe(200);
    expect(csv.text.split('\n')[0]).toBe('quantity,site,other_site,distance_nm,value_ev,error_ev');
    // a coulomb revision has no mesh files
    expect((await viewer.get(`/api/projects/${projectId}/revisions/${done.revisionId}/files/mesh.vtu`)).status).toBe(404);
  }, 300_000);

  it('a job the numerical core refuses fails with its reason in words', async () => {
    // a design whose only site has no electrons: nothing to solve (geometry/fem CoulombError)
    const empty: DesignDocument = { ...PAIR, name: 'No electrons', sites: PAIR.sites.map((s) => ({ ...s, electrons: 0 })) };
    const dId = await newDesign(owner, empty, 'No electrons');
    const r = await owner.post(`/api/projects/${projectId}/designs/${dId}/jobs`, { kind: 'coulomb' });
    expect(r.status).toBe(202);
    const done = await waitFor(owner, r.body.job.id, ended);
    expect(done.state).toBe('failed');
    expect(done.error).toMatch(/electron/i);
    expect(done.revisionId).toBeNull();
  }, 120_000);
});

describe('refusals before queueing', () => {
  it('options that do not fit the kind are a 422 naming the field', async () => {
    const r = await owner.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'convergence', options: { order: 1 } });
    expect(r.status).toBe(422);
    expect(r.body.error.details).toEqual([{ path: ['options', 'sweep'], message: expect.stringMatching(/required/) }]);
    const bad = await owner.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'mesh', options: { adaptive: true } });
    expect(bad.status).toBe(422);
    const unknown = await owner.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'bake' });
    expect(unknown.status).toBe(422);
  });

  it('a design whose estimated mesh is over its maxElements is refused 422 with the estimate in the message', async () => {
    const big: DesignDocument = { ...PAIR, name: 'Too fine', refinement: { ...PAIR.refinement, targetRelError: 0.001, maxElements: 20_000 } };
    const dId = await newDesign(owner, big, 'Too fine');
    const r = await owner.post(`/api/projects/${projectId}/designs/${dId}/jobs`, { kind: 'mesh' });
    expect(r.status).toBe(422);
    expect(r.body.error.message).toMatch(/estimated at (about|more than) [\d,]+ tetrahedra, above the design's refinement\.maxElements of 20,000/);
    expect(await env.knex('jobs').where({ design_id: dId }).count<{ n: string }[]>('id as n')).toEqual([{ n: '0' }]);
  });

  it('a project whose revisions fill its storage quota gets 409 with the figures', async () => {
    const p3 = (await owner.post('/api/projects', { name: 'Jobs quota project' })).body.id as number;
    const d = (await owner.post(`/api/projects/${p3}/designs`, { name: 'Pair', document: PAIR })).body.design.id as number;
    const { sha256 } = (await env.knex('design_versions').where({ design_id: d, version: 1 }).first('sha256')) as { sha256: string };
    // a revision row that claims 3 GiB of pieces (the default quota is 2 GiB; no pieces needed for the check)
    await env.knex('revisions').insert({
      project_id: p3, design_id: d, design_version: 1, design_sha256: sha256, kind: 'mesh', options: '{"order":2}', options_key: '{"order":2}',
      software_version: 'test', timings: '{}', summary: '{}', stored_bytes: 3 * 1024 ** 3,
    });
    const r = await owner.post(`/api/projects/${p3}/designs/${d}/jobs`, { kind: 'mesh', options: { order: 1 } });
    expect(r.status).toBe(409);
    expect(r.body.error.message).toBe("The project's storage is full: its revisions take 3072.0 MiB of 2048.0 MiB. Delete designs you no longer need, or ask the administrator for a larger quota.");
  });

  it('revisions cannot be changed once stored (database trigger)', async () => {
    const rev = (await env.knex('revisions').where({ project_id: projectId }).first('id')) as { id: number };
    await expect(env.knex('revisions').where({ id: rev.id }).update({ summary: '{}' })).rejects.toThrow(/immutable/);
  });

  it('a missing design is a 404; a job of another project is a 404', async () => {
    expect((await owner.post(`/api/projects/${projectId}/designs/999999999/jobs`, { kind: 'mesh' })).status).toBe(404);
    expect((await owner.get(`/api/projects/${projectId}/jobs/999999999`)).status).toBe(404);
    expect((await owner.get(`/api/projects/${projectId}/revisions/999999999`)).status).toBe(404);
  });
});

describe('events, cancel and limits', () => {
  it('the event stream carries the job on every change and ends when it has finished', async () => {
    const r = await owner.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'mesh', options: { order: 2 } });
    expect(r.status).toBe(202);
    const jobId = r.body.job.id as number;
    const res = await viewer.agent
      .get(`/api/projects/${projectId}/jobs/${jobId}/events`)
      .buffer(true)
      .parse((stream, cb) => {
        let text = '';
        stream.setEncoding('utf8');
        stream.on('data', (s: string) => (text += s));
        stream.on('end', () => cb(null, text));
      });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/event-stream/);
    const events = (res.body as string)
      .split('\n\n')
      .filter((block) => block.startsWith('event: job'))
      .map((block) => jobResponseSchema.parse(JSON.parse(block.split('\n').find((l) => l.startsWith('data: '))!.slice(6))).job);
    expect(events.length).toBeGreaterThanOrEqual(2);
    expect(events.every((e) => e.id === jobId)).toBe(true);
    expect(events[0].state).not.toBe('succeeded');
    expect(events.at(-1)!.state).toBe('succeeded');
    // no two consecutive events are the same object
    for (let i = 1; i < events.length; i++) expect(events[i]).not.toEqual(events[i - 1]);
  }, 180_000);

  it('cancelling a running job marks it cancelled, stores nothing and frees the worker', async () => {
    const r = await owner.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'coulomb', options: { order: 2 } });
    expect(r.status).toBe(202);
    const jobId = r.body.job.id as number;
    await waitFor(owner, jobId, (j) => j.state === 'running' || ended(j));
    const c = await owner.post(`/api/projects/${projectId}/jobs/${jobId}/cancel`);
    expect(c.status).toBe(200);
    expect(jobResponseSchema.parse(c.body).job.state).toBe('cancelled');
    // the worker notices within its poll interval and ends the thread
    const until = Date.now() + 20_000;
    while (env.server.jobWorker!.running() > 0 && Date.now() < until) await new Promise((r) => setTimeout(r, 100));
    expect(env.server.jobWorker!.running()).toBe(0);
    expect(await env.knex('revisions').where({ job_id: jobId }).count<{ n: string }[]>('id as n')).toEqual([{ n: '0' }]);
    const again = await owner.post(`/api/projects/${projectId}/jobs/${jobId}/cancel`);
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/already finished \(cancelled\)/);
    const audit = await owner.get(`/api/projects/${projectId}/audit`);
    expect((audit.body.entries as { action: string; detail: { jobId?: number } }[]).some((e) => e.action === 'job.cancel' && e.detail.jobId === jobId)).toBe(true);
  }, 180_000);

  it('a project may have 3 active jobs (this server\'s limit); the 4th is refused 409; a cancelled queued job leaves pg-boss', async () => {
    const p2 = (await owner.post('/api/projects', { name: 'Jobs limit project' })).body.id as number;
    const d = (await owner.post(`/api/projects/${p2}/designs`, { name: 'Pair', document: PAIR })).body.design.id as number;
    const asks = [
      { kind: 'convergence', options: { sweep: 'box' } },
      { kind: 'convergence', options: { sweep: 'refinement' } },
      { kind: 'coulomb', options: { adaptive: true } },
    ];
    const ids: number[] = [];
    for (const a of asks) {
      const r = await owner.post(`/api/projects/${p2}/designs/${d}/jobs`, a);
      expect(r.status).toBe(202);
      ids.push(r.body.job.id as number);
    }
    const fourth = await owner.post(`/api/projects/${p2}/designs/${d}/jobs`, { kind: 'mesh', options: { order: 2 } });
    expect(fourth.status).toBe(409);
    expect(fourth.body.error.message).toMatch(/already has 3 job\(s\) queued or running/);
    for (const id of ids) {
      const c = await owner.post(`/api/projects/${p2}/jobs/${id}/cancel`);
      // a job may have finished on its own meanwhile (the worker is fast on a quiet machine)
      expect([200, 409]).toContain(c.status);
    }
    const rows = await env.knex('jobs').whereIn('id', ids).select('state', 'boss_job_id');
    expect(rows.every((r: { state: string }) => r.state !== 'queued' && r.state !== 'running')).toBe(true);
    const boss = await env.knex.raw(`SELECT state FROM pgboss.job WHERE id::text = ANY(?)`, [rows.map((r: { boss_job_id: string }) => r.boss_job_id)]);
    for (const b of boss.rows as { state: string }[]) expect(['cancelled', 'completed', 'failed', 'active']).toContain(b.state);
    expect((await owner.post(`/api/projects/${p2}/designs/${d}/jobs`, { kind: 'mesh', options: { order: 2 } })).status).toBe(202);
  }, 60_000);
});
