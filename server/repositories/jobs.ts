/**
 * The `jobs` table: our record of every job, the only thing the API reads about jobs.
 * pg-boss moves the work (its own schema); `boss_job_id` links a row to its pg-boss job.
 */
import type { Job, JobKind, JobOptions, JobProgress, JobState } from '@contracts/api';
import type { ProjectRole } from '@contracts/roles';
import { type Db, iso, isoOrNull } from './db';
import { isoText, runStatement, type Statement } from './statements';

export interface JobRecord extends Job {
  projectId: number;
  designSha256: string;
  bossJobId: string | null;
  attempts: number;
  createdById: number | null;
}

export interface JobInsert {
  projectId: number;
  designId: number;
  designVersion: number;
  designSha256: string;
  kind: JobKind;
  options: JobOptions;
  state: JobState;
  progress: JobProgress;
  revisionId?: number | null;
  bossJobId?: string | null;
  createdBy: number;
  finished?: boolean;
}

interface JobRow {
  id: number;
  project_id: number;
  design_id: number;
  design_version: number;
  design_sha256: string;
  kind: JobKind;
  options: JobOptions;
  state: JobState;
  progress: JobProgress;
  revision_id: number | null;
  error: string | null;
  attempts: number;
  boss_job_id: string | null;
  created_by: number | null;
  created_by_name: string | null;
  created_at: Date;
  started_at: Date | null;
  finished_at: Date | null;
}

const toJob = (r: JobRow): JobRecord => ({
  id: r.id,
  projectId: r.project_id,
  kind: r.kind,
  designId: r.design_id,
  designVersion: r.design_version,
  designSha256: r.design_sha256,
  options: r.options,
  state: r.state,
  progress: r.progress,
  revisionId: r.revision_id,
  error: r.error,
  createdAt: iso(r.created_at),
  startedAt: isoOrNull(r.started_at),
  finishedAt: isoOrNull(r.finished_at),
  createdBy: r.created_by_name,
  createdById: r.created_by,
  bossJobId: r.boss_job_id,
  attempts: r.attempts,
});

/** Only the public fields (the API answer). */
export function publicJob(j: JobRecord): Job {
  return {
    id: j.id,
    kind: j.kind,
    designId: j.designId,
    designVersion: j.designVersion,
    options: j.options,
    state: j.state,
    progress: j.progress,
    revisionId: j.revisionId,
    error: j.error,
    createdAt: j.createdAt,
    startedAt: j.startedAt,
    finishedAt: j.finishedAt,
    createdBy: j.createdBy,
  };
}

/** A listed job: the answer's columns only, times as ISO text (statements.ts `isoText`), and the caller's role. */
interface ListedJobRow {
  member_role: ProjectRole;
  id: number | null;
  kind: JobKind;
  design_id: number;
  design_version: number;
  options: JobOptions;
  state: JobState;
  progress: JobProgress;
  revision_id: number | null;
  error: string | null;
  created_by_name: string | null;
  created_at: string;
  started_at: string | null;
  finished_at: string | null;
}

/** the same object, key for key and in the same order, as `publicJob(toJob(row))` (the one-job read) */
const listedJob = (r: ListedJobRow): Job => ({
  id: r.id!,
  kind: r.kind,
  designId: r.design_id,
  designVersion: r.design_version,
  options: r.options,
  state: r.state,
  progress: r.progress,
  revisionId: r.revision_id,
  error: r.error,
  createdAt: r.created_at,
  startedAt: r.started_at,
  finishedAt: r.finished_at,
  createdBy: r.created_by_name,
});

const LIST_FOR_MEMBER: Statement = {
  name: 'tetrawell-jobs-list-for-member-2',
  text: `
    SELECT m.role AS member_role, j.id, j.kind, j.design_id, j.design_version, j.options, j.state, j.progress, j.revision_id, j.error,
           u.display_name AS created_by_name,
           ${isoText('j.created_at')} AS created_at, ${isoText('j.started_at')} AS started_at, ${isoText('j.finished_at')} AS finished_at
    FROM memberships m
    LEFT JOIN LATERAL (SELECT * FROM jobs WHERE jobs.project_id = m.project_id ORDER BY jobs.id DESC LIMIT $3) AS j ON true
    LEFT JOIN users u ON u.id = j.created_by
    WHERE m.project_id = $1 AND m.user_id = $2
    ORDER BY j.id DESC`,
};

export const ACTIVE_STATES: JobState[] = ['queued', 'running'];

export function jobsRepo(db: Db) {
  const select = () => db('jobs as j').leftJoin('users as u', 'u.id', 'j.created_by').select('j.*', 'u.display_name as created_by_name');
  return {
    async insert(j: JobInsert): Promise<number> {
      const [row] = await db('jobs')
        .insert({
          project_id: j.projectId,
          design_id: j.designId,
          design_version: j.designVersion,
          design_sha256: j.designSha256,
          kind: j.kind,
          options: JSON.stringify(j.options),
          state: j.state,
          progress: JSON.stringify(j.progress),
          revision_id: j.revisionId ?? null,
          boss_job_id: j.bossJobId ?? null,
          created_by: j.createdBy,
          ...(j.finished ? { started_at: db.fn.now(), finished_at: db.fn.now() } : {}),
        })
        .returning('id');
      return (row as { id: number }).id;
    },
    async get(projectId: number, jobId: number): Promise<JobRecord | null> {
      const row = (await select().where({ 'j.project_id': projectId, 'j.id': jobId }).first()) as JobRow | undefined;
      return row ? toJob(row) : null;
    },
    async byId(jobId: number, lock = false): Promise<JobRecord | null> {
      const q = db('jobs').where({ id: jobId }).first();
      if (lock) q.forUpdate();
      const row = (await q) as JobRow | undefined;
      return row ? toJob({ ...row, created_by_name: null }) : null;
    },
    /**
     * The caller's role in the project and the project's newest jobs, in one statement (one database round trip
     * instead of two on the busiest read; the service applies the role table to `role`). No membership: role null
     * and no jobs. A fixed statement run as it is (statements.ts): only the answer's columns, times already as the
     * API's ISO text.
     */
    async listForMember(projectId: number, userId: number, limit: number): Promise<{ role: ProjectRole | null; jobs: Job[] }> {
      const rows = await runStatement<ListedJobRow>(db, LIST_FOR_MEMBER, [projectId, userId, limit]);
      if (!rows.length) return { role: null, jobs: [] };
      // a member of a project without jobs: one row, its job columns null
      const jobs: Job[] = [];
      for (const r of rows) if (r.id !== null) jobs.push(listedJob(r));
      return { role: rows[0]!.member_role, jobs };
    },
    async countActive(projectId: number): Promise<number> {
      const row = (await db('jobs').where({ project_id: projectId }).whereIn('state', ACTIVE_STATES).count<{ n: string }[]>('id as n').first()) as { n: string } | undefined;
      return Number(row?.n ?? 0);
    },
    /** queued or running → running (a retry after a worker died finds it running); false when it ended meanwhile */
    async markRunning(jobId: number): Promise<boolean> {
      const n = await db('jobs')
        .where({ id: jobId })
        .whereIn('state', ACTIVE_STATES)
        .update({
          state: 'running',
          started_at: db.raw('coalesce(started_at, now())'),
          attempts: db.raw('attempts + 1'),
          progress: JSON.stringify({ phase: 'start', fraction: 0 }),
          error: null,
          updated_at: db.fn.now(),
        });
      return n > 0;
    },
    async setProgress(jobId: number, progress: JobProgress): Promise<void> {
      await db('jobs').where({ id: jobId, state: 'running' }).update({ progress: JSON.stringify(progress), updated_at: db.fn.now() });
    },
    /** back to queued before a retry (`error` stays null: it is for jobs that failed for good; the worker logs why) */
    async requeue(jobId: number): Promise<void> {
      await db('jobs')
        .where({ id: jobId })
        .whereIn('state', ACTIVE_STATES)
        .update({ state: 'queued', progress: JSON.stringify({ phase: 'waiting to retry', fraction: 0 }), error: null, updated_at: db.fn.now() });
    },
    /** ends an active job; false when it had already ended */
    async finish(jobId: number, state: 'succeeded' | 'failed' | 'cancelled', fields: { error?: string | null; revisionId?: number | null; progress?: JobProgress }): Promise<boolean> {
      const n = await db('jobs')
        .where({ id: jobId })
        .whereIn('state', ACTIVE_STATES)
        .update({
          state,
          error: fields.error ?? null,
          revision_id: fields.revisionId ?? null,
          ...(fields.progress ? { progress: JSON.stringify(fields.progress) } : {}),
          finished_at: db.fn.now(),
          updated_at: db.fn.now(),
        });
      return n > 0;
    },
    async state(jobId: number): Promise<JobState | null> {
      const row = (await db('jobs').where({ id: jobId }).first('state')) as { state: JobState } | undefined;
      return row?.state ?? null;
    },
    /** active jobs whose pg-boss job has failed for good (retries used up after a worker died or timed out) */
    async orphans(bossSchema: string): Promise<{ id: number; retryCount: number }[]> {
      const rows = await db.raw(
        `SELECT j.id, b.retry_count FROM jobs j JOIN ${bossSchema}.job b ON b.id::text = j.boss_job_id
         WHERE j.state IN ('queued', 'running') AND b.state = 'failed'`,
      );
      return (rows.rows as { id: number; retry_count: number }[]).map((r) => ({ id: r.id, retryCount: r.retry_count }));
    },
  };
}
export type JobsRepo = ReturnType<typeof jobsRepo>;
