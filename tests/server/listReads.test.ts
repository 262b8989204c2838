/**
 * The two lists the studio polls while jobs run, GET /api/projects/:projectId/jobs and …/revisions, read the
 * caller's role in the same SQL statement as their rows (issue 10, "Faults and load": 50 clients, p95 < 100 ms),
 * and the service applies the role table (server/contracts/roles.ts) to that role. These tests hold the access
 * rules of every other project route (signed out 401, not a member 404, at the next request after a change:
 * OWASP Authorization cheat sheet, "Validate the permissions on every request") and the answers' content,
 * compared with the one-revision read, which keeps the separate role check; and they count the server's own
 * statements per request (the session row is read by the session store's pool, not counted here). The lists are
 * fixed SQL statements whose rows are already in the answer's shape (server/repositories/statements.ts): their
 * answers are held byte for byte to what the one-job and one-revision reads (Knex, Date objects) give.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { addMember, newUser, startTestEnv, type TestClient, type TestEnv } from './helpers';
import { jobsRepo } from '../../server/repositories/jobs';
import { revisionsRepo } from '../../server/repositories/revisions';
import { packFile } from '../../server/jobs/storage';
import { iso } from '../../server/repositories/db';
import { isoText } from '../../server/repositories/statements';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.stop();
});

interface Fixture {
  owner: TestClient;
  projectId: number;
  designId: number;
  otherDesignId: number;
  revisionIds: number[];
  jobIds: number[];
}

/** a project with two designs, three revisions (two with several files) and their jobs, plus one queued job */
async function fixture(): Promise<Fixture> {
  const { client: owner, user } = await newUser(env, 'lists-owner');
  const projectId = (await owner.post('/api/projects', { name: 'List reads' })).body.id as number;
  const designId = (await env.knex('designs').where({ project_id: projectId }).first('id')).id as number;
  const created = await owner.post(`/api/projects/${projectId}/designs`, { name: 'Second design' });
  expect(created.status).toBe(201);
  const otherDesignId = created.body.design.id as number;
  const revisionIds: number[] = [];
  const jobIds: number[] = [];
  const enc = new TextEncoder();
  for (const [k, d] of [designId, otherDesignId, designId].entries()) {
    const { sha256 } = (await env.knex('design_versions').where({ design_id: d, version: 1 }).first('sha256')) as { sha256: string };
    const common = { projectId, designId: d, designVersion: 1, designSha256: sha256, createdBy: user.id };
    // files written out of their listed order, so the answer's order is the repository's, not the insert's
    const files = k === 1 ? [packFile('results.json', enc.encode('{}\n'))] : [packFile('results.csv', enc.encode('a\n')), packFile('mesh.vtu', enc.encode('<x/>')), packFile('results.json', enc.encode('{}\n'))];
    const revisionId = await revisionsRepo(env.knex).insert({
      ...common, jobId: null, kind: 'mesh', options: { order: 2 }, optionsKey: `{"order":2,"k":${k}}`, software: { version: 'test', commit: null },
      timings: { meshSeconds: k }, summary: { tets: k }, files,
    });
    revisionIds.push(revisionId);
    jobIds.push(await jobsRepo(env.knex).insert({ ...common, kind: 'mesh', options: { order: 2 }, state: 'succeeded', progress: { phase: 'done', fraction: 1 }, revisionId, finished: true }));
  }
  const { sha256 } = (await env.knex('design_versions').where({ design_id: designId, version: 1 }).first('sha256')) as { sha256: string };
  jobIds.push(
    await jobsRepo(env.knex).insert({
      projectId, designId, designVersion: 1, designSha256: sha256, createdBy: user.id, kind: 'coulomb', options: { order: 2, adaptive: false },
      state: 'queued', progress: { phase: 'queued', fraction: 0 },
    }),
  );
  return { owner, projectId, designId, otherDesignId, revisionIds, jobIds };
}

/** counts the SQL statements the server's own Knex sends while `fn` runs */
async function statements<T>(knex: Knex, fn: () => Promise<T>): Promise<{ result: T; count: number; sql: string[] }> {
  const sql: string[] = [];
  const on = (q: { sql: string }) => sql.push(q.sql);
  knex.on('query', on);
  try {
    const result = await fn();
    return { result, count: sql.length, sql };
  } finally {
    knex.off('query', on);
  }
}

describe('jobs and revisions lists: role and rows in one statement', () => {
  let f: Fixture;
  beforeAll(async () => {
    f = await fixture();
  });

  it('the jobs list is one statement of the server (role check included) and lists the jobs newest first', async () => {
    const { result: r, count, sql } = await statements(env.server.knex, () => f.owner.get(`/api/projects/${f.projectId}/jobs`));
    expect(r.status).toBe(200);
    expect(count, sql.join('\n')).toBe(1);
    expect((r.body.jobs as { id: number }[]).map((j) => j.id)).toEqual([...f.jobIds].reverse());
    // each entry is what the one-job read answers (that route keeps its separate role check)
    for (const j of r.body.jobs as { id: number }[]) {
      expect(j).toEqual((await f.owner.get(`/api/projects/${f.projectId}/jobs/${j.id}`)).body.job);
    }
  });

  it('the revisions list is one statement of the server and lists each revision with its files, as the one-revision read does', async () => {
    const { result: r, count, sql } = await statements(env.server.knex, () => f.owner.get(`/api/projects/${f.projectId}/revisions`));
    expect(r.status).toBe(200);
    expect(count, sql.join('\n')).toBe(1);
    const list = r.body.revisions as { id: number; files: { name: string }[] }[];
    expect(list.map((x) => x.id)).toEqual([...f.revisionIds].reverse());
    for (const rev of list) {
      const { summary, ...rest } = (await f.owner.get(`/api/projects/${f.projectId}/revisions/${rev.id}`)).body.revision as Record<string, unknown>;
      expect(summary).toBeDefined();
      expect(rev).toEqual(rest);
    }
    // the listed order of file names (server/repositories/revisions.ts ORDER), not the order they were written in
    expect(list.at(-1)!.files.map((x) => x.name)).toEqual(['mesh.vtu', 'results.json', 'results.csv']);
  });

  it('?designId= keeps the revisions of that design only', async () => {
    const r = await f.owner.get(`/api/projects/${f.projectId}/revisions?designId=${f.otherDesignId}`);
    expect(r.status).toBe(200);
    expect((r.body.revisions as { id: number; designId: number }[]).map((x) => [x.id, x.designId])).toEqual([[f.revisionIds[1], f.otherDesignId]]);
    const mine = await f.owner.get(`/api/projects/${f.projectId}/revisions?designId=${f.designId}`);
    expect((mine.body.revisions as { id: number }[]).map((x) => x.id)).toEqual([f.revisionIds[2], f.revisionIds[0]]);
  });

  it('a member of a project with no jobs and no revisions gets two empty lists', async () => {
    const { client } = await newUser(env, 'lists-empty');
    const projectId = (await client.post('/api/projects', { name: 'Nothing run yet' })).body.id as number;
    expect((await client.get(`/api/projects/${projectId}/jobs`)).body).toEqual({ jobs: [] });
    expect((await client.get(`/api/projects/${projectId}/revisions`)).body).toEqual({ revisions: [] });
  });

  it('signed out 401; not a member 404 (also with a malformed ?designId=, which a member gets as 422)', async () => {
    const anon = env.client();
    expect((await anon.get(`/api/projects/${f.projectId}/jobs`)).status).toBe(401);
    expect((await anon.get(`/api/projects/${f.projectId}/revisions`)).status).toBe(401);
    const { client: stranger } = await newUser(env, 'lists-stranger');
    for (const path of ['jobs', 'revisions', 'revisions?designId=abc']) {
      const r = await stranger.get(`/api/projects/${f.projectId}/${path}`);
      expect(r.status, path).toBe(404);
      expect(JSON.stringify(r.body)).not.toContain('revisions');
    }
    expect((await f.owner.get(`/api/projects/${f.projectId}/revisions?designId=abc`)).status).toBe(422);
    // a project id that is not a decimal integer: 422 before any database work, as on every project route
    expect((await f.owner.get('/api/projects/0x10/jobs')).status).toBe(422);
  });

  it('a viewer reads both lists; removed from the project, the very next request answers 404', async () => {
    const { client: viewer, user } = await newUser(env, 'lists-viewer');
    await addMember(env.knex, f.projectId, user.id, 'viewer');
    expect((await viewer.get(`/api/projects/${f.projectId}/jobs`)).body.jobs).toHaveLength(f.jobIds.length);
    expect((await viewer.get(`/api/projects/${f.projectId}/revisions`)).body.revisions).toHaveLength(f.revisionIds.length);
    await env.knex('memberships').where({ project_id: f.projectId, user_id: user.id }).delete();
    expect((await viewer.get(`/api/projects/${f.projectId}/jobs`)).status).toBe(404);
    expect((await viewer.get(`/api/projects/${f.projectId}/revisions`)).status).toBe(404);
  });

  it('a signed-out session reads neither list at its next request', async () => {
    const { client, user } = await newUser(env, 'lists-leaver');
    await addMember(env.knex, f.projectId, user.id, 'editor');
    expect((await client.get(`/api/projects/${f.projectId}/jobs`)).status).toBe(200);
    await client.signOut();
    expect((await client.get(`/api/projects/${f.projectId}/jobs`)).status).toBe(401);
    expect((await client.get(`/api/projects/${f.projectId}/revisions`)).status).toBe(401);
  });
});

describe('jobs and revisions lists: the same bytes as the one-item reads', () => {
  let f: Fixture;
  beforeAll(async () => {
    f = await fixture();
    // times at the edges of a millisecond: PostgreSQL keeps microseconds, the API writes milliseconds (a JavaScript
    // Date truncates, ECMA-262 MakeTime); a started and a finished time on the queued job too, and one left null
    await env.knex('jobs').where({ id: f.jobIds[0] }).update({ created_at: '2026-02-28 23:59:59.999999+00', started_at: '2026-03-01 00:00:00.000001+00', finished_at: '2026-03-01 00:00:00.0005+00' });
    await env.knex('jobs').where({ id: f.jobIds[3] }).update({ created_at: '2024-02-29 12:00:00.123456+05:30', started_at: '2024-02-29 12:00:01+00', progress: JSON.stringify({ phase: 'refine', fraction: 0.1 + 0.2 }) });
  });

  it('GET …/jobs is, byte for byte, the list of what GET …/jobs/:jobId answers', async () => {
    const r = await f.owner.get(`/api/projects/${f.projectId}/jobs`);
    expect(r.status).toBe(200);
    const singles = [];
    for (const id of [...f.jobIds].reverse()) singles.push((await f.owner.get(`/api/projects/${f.projectId}/jobs/${id}`)).body.job);
    expect(r.text).toBe(JSON.stringify({ jobs: singles }));
    // the edge times as a JavaScript Date writes them (Date.prototype.toISOString, milliseconds truncated)
    const first = (r.body.jobs as { id: number; createdAt: string; startedAt: string; finishedAt: string }[]).find((j) => j.id === f.jobIds[0])!;
    expect([first.createdAt, first.startedAt, first.finishedAt]).toEqual(['2026-02-28T23:59:59.999Z', '2026-03-01T00:00:00.000Z', '2026-03-01T00:00:00.000Z']);
    const queued = (r.body.jobs as { id: number; createdAt: string; startedAt: string; finishedAt: string | null }[]).find((j) => j.id === f.jobIds[3])!;
    expect([queued.createdAt, queued.startedAt, queued.finishedAt]).toEqual(['2024-02-29T06:30:00.123Z', '2024-02-29T12:00:01.000Z', null]);
  });

  it('GET …/revisions (all, and of one design) is, byte for byte, the list of what GET …/revisions/:revisionId answers without its summary', async () => {
    const one = async (id: number) => {
      const { summary: _s, ...rest } = (await f.owner.get(`/api/projects/${f.projectId}/revisions/${id}`)).body.revision as Record<string, unknown>;
      return rest;
    };
    const all = await f.owner.get(`/api/projects/${f.projectId}/revisions`);
    expect(all.status).toBe(200);
    const singles = [];
    for (const id of [...f.revisionIds].reverse()) singles.push(await one(id));
    expect(all.text).toBe(JSON.stringify({ revisions: singles }));
    const mine = await f.owner.get(`/api/projects/${f.projectId}/revisions?designId=${f.designId}`);
    expect(mine.text).toBe(JSON.stringify({ revisions: [await one(f.revisionIds[2]!), await one(f.revisionIds[0]!)] }));
  });

  it('a list statement refuses to run inside a transaction (it would read outside it)', async () => {
    await expect(env.knex.transaction((trx) => jobsRepo(trx).listForMember(f.projectId, 1, 10))).rejects.toThrow(/not inside a transaction/);
  });

  it("isoText (PostgreSQL's to_char) writes every instant as a JavaScript Date's toISOString does, whatever the session's time zone", async () => {
    // instants with 0, 1 and 6 fraction digits, the last microsecond of a millisecond, a leap day, a year below 1000
    // and one far ahead; written in three zones; compared with pg's own Date parsing + toISOString (server/repositories/db.ts iso)
    const instants = [
      '2026-12-02 16:07:18+00', '2026-12-02 16:07:18.5+00', '2026-12-02 16:07:18.123456+00', '2026-12-02 16:07:18.999999+00',
      '2028-02-29 23:59:59.999999-03:30', '0999-01-01 00:00:00.001+00', '9999-12-31 23:59:59.999999+00', '1970-01-01 00:00:00+00',
    ];
    for (const zone of ['UTC', 'America/St_Johns', 'Asia/Kathmandu']) {
      await env.knex.transaction(async (trx) => {
        await trx.raw(`SET LOCAL TIME ZONE '${zone}'`);
        for (const t of instants) {
          const row = (await trx.raw(`SELECT x AS d, ${isoText('x')} AS s FROM (SELECT ?::timestamptz AS x) q`, [t])).rows[0] as { d: Date; s: string };
          expect(row.s, `${t} in ${zone}`).toBe(iso(row.d));
        }
        const nul = (await trx.raw(`SELECT ${isoText('NULL::timestamptz')} AS s`)).rows[0] as { s: string | null };
        expect(nul.s).toBeNull();
      });
    }
  });
});
