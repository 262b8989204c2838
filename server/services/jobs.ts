/**
 * Jobs and revisions: the story behind the routes of server/routes/jobs.ts.
 *
 * A job request is checked (options against the kind, the element estimate against the design's
 * maxElements and the server cap, the project's storage and its number of active jobs), written to
 * `jobs` with its audit entry, and then sent to pg-boss under an id chosen here (stored first, so
 * the row always names its pg-boss job). A request for a computation that already has a revision
 * (same design document sha256, kind and options, in the same project) is answered at once with
 * that revision: a job row that is already `succeeded`, and `reused: true`.
 */
import { randomUUID } from 'node:crypto';
import type { Job, JobCreateBody, JobKind } from '@contracts/api';
import type { Revision } from '@contracts/api';
import type { Capability } from '@contracts/roles';
import { MeshError, estimateDesignElements } from '../../geometry/mesh/index';
import type { Design } from '../../geometry/design/types';
import { designsRepo } from '../repositories/designs';
import { jobsRepo, publicJob, type JobRecord } from '../repositories/jobs';
import { revisionsRepo, type RevisionFileName, type RevisionRecord, type StoredFile } from '../repositories/revisions';
import { recordAudit } from './audit';
import { requireRole } from './projects';
import type { ServiceDeps } from './context';
import { AppError, conflict, notFound } from './errors';
import { storedDocument, fileBaseName } from './designs';
import { normalizeOptions, optionsKey } from '../jobs/options';
import { mib, type JobSettings } from '../jobs/settings';
import { unpackChunk } from '../jobs/storage';

/** What the HTTP side needs from the queue (pg-boss in the server; a stand-in in unit tests). */
export interface JobQueue {
  send(kind: JobKind, jobId: number, bossJobId: string): Promise<void>;
  cancel(kind: JobKind, bossJobId: string): Promise<void>;
}

export interface JobDeps {
  queue: JobQueue;
  settings: JobSettings;
}

const LIST_LIMIT = 100;

export interface RevisionDownload {
  file: StoredFile;
  fileName: string;
  /** the file's bytes, one inflated piece at a time */
  pieces(): AsyncGenerator<Uint8Array>;
}

export function jobService(deps: ServiceDeps, jd: JobDeps) {
  const { db } = deps;

  async function mustGetJob(projectId: number, jobId: number): Promise<JobRecord> {
    const job = await jobsRepo(db).get(projectId, jobId);
    if (!job) throw notFound('The job');
    return job;
  }

  async function mustGetRevision(projectId: number, revisionId: number): Promise<RevisionRecord> {
    const rev = await revisionsRepo(db).get(projectId, revisionId);
    if (!rev) throw notFound('The revision');
    return rev;
  }

  const toRevision = (r: RevisionRecord): Revision => {
    const { projectId: _p, storedBytes: _s, designName: _n, ...rest } = r;
    return rest;
  };

  return {
    async create(projectId: number, designId: number, body: JobCreateBody, userId: number): Promise<{ job: Job; reused: boolean }> {
      const rec = await designsRepo(db).get(projectId, designId);
      if (!rec) throw notFound('The design');
      const doc = storedDocument(rec);
      const version = await designsRepo(db).getVersion(designId, rec.version);
      if (!version) throw new AppError('internal', 'The current version of the design is not stored.');
      const norm = normalizeOptions(body.kind, body.options, doc);
      if ('problems' in norm) throw new AppError('validation_failed', 'Some options of the job need attention.', norm.problems);
      const options = norm.options;
      const key = optionsKey(options);

      const reusable = await revisionsRepo(db).findReusable(projectId, version.sha256, body.kind, key);
      if (reusable) {
        const jobId = await db.transaction(async (trx) => {
          const id = await jobsRepo(trx).insert({
            projectId, designId, designVersion: rec.version, designSha256: version.sha256, kind: body.kind, options,
            state: 'succeeded', progress: { phase: 'done', fraction: 1 }, revisionId: reusable.id, createdBy: userId, finished: true,
          });
          await recordAudit(trx, { projectId, actorId: userId, action: 'job.start', detail: { jobId: id, kind: body.kind, designId, designVersion: rec.version, options, reused: true, revisionId: reusable.id } });
          return id;
        });
        return { job: { ...publicJob((await jobsRepo(db).get(projectId, jobId))!), reused: true }, reused: true };
      }

      // the element estimate, before anything is queued (geometry/mesh: capped and fast)
      let estimate;
      try {
        estimate = estimateDesignElements(doc as Design, { order: options.order });
      } catch (e) {
        if (e instanceof MeshError) throw new AppError('unprocessable', `This design cannot be meshed: ${e.message}`);
        throw e;
      }
      if (estimate.aborted || estimate.estimate > estimate.limit) {
        const n = Math.round(estimate.estimate).toLocaleString('en-US');
        const which = estimate.maxElements <= estimate.hardCap ? `the design's refinement.maxElements of ${estimate.maxElements.toLocaleString('en-US')}` : `the server's cap of ${estimate.hardCap.toLocaleString('en-US')}`;
        throw new AppError(
          'unprocessable',
          `The mesh of this design is estimated at ${estimate.aborted ? 'more than ' : 'about '}${n} tetrahedra, above ${which}. Loosen targetRelError, shrink the domain, or raise maxElements (up to the server's cap).`,
        );
      }

      const used = await revisionsRepo(db).storedBytes(projectId);
      if (used >= jd.settings.storageQuotaBytes) {
        throw conflict(`The project's storage is full: its revisions take ${mib(used)} of ${mib(jd.settings.storageQuotaBytes)}. Delete designs you no longer need, or ask the administrator for a larger quota.`);
      }

      const bossJobId = randomUUID();
      const jobId = await db.transaction(async (trx) => {
        // one request at a time per project, so the limit cannot be passed by racing requests
        await trx('projects').where({ id: projectId }).forUpdate().first('id');
        const activeNow = await jobsRepo(trx).countActive(projectId);
        if (activeNow >= jd.settings.maxActivePerProject) {
          throw conflict(
            `This project already has ${activeNow} job(s) queued or running, the most it may have at once. Wait for one to finish or cancel one, then start this one again.`,
          );
        }
        const id = await jobsRepo(trx).insert({
          projectId, designId, designVersion: rec.version, designSha256: version.sha256, kind: body.kind, options,
          state: 'queued', progress: { phase: 'queued', fraction: 0 }, bossJobId, createdBy: userId,
        });
        await recordAudit(trx, {
          projectId,
          actorId: userId,
          action: 'job.start',
          detail: { jobId: id, kind: body.kind, designId, designVersion: rec.version, options, estimatedTets: Math.round(estimate.estimate) },
        });
        return id;
      });
      try {
        await jd.queue.send(body.kind, jobId, bossJobId);
      } catch (e) {
        deps.logger.error(`job ${jobId}: could not be queued:`, e);
        await jobsRepo(db).finish(jobId, 'failed', { error: 'The job could not be handed to the queue (the database did not accept it). Start it again.' });
      }
      return { job: publicJob((await jobsRepo(db).get(projectId, jobId))!), reused: false };
    },

    /** the project's newest jobs, for a caller whose role has `capability` (404 / 403 otherwise; one round trip) */
    async list(projectId: number, userId: number, capability: Capability): Promise<Job[]> {
      const { role, jobs } = await jobsRepo(db).listForMember(projectId, userId, LIST_LIMIT);
      requireRole(role, capability);
      return jobs;
    },

    async get(projectId: number, jobId: number): Promise<Job> {
      return publicJob(await mustGetJob(projectId, jobId));
    },

    async cancel(projectId: number, jobId: number, userId: number): Promise<Job> {
      const job = await mustGetJob(projectId, jobId);
      if (job.state !== 'queued' && job.state !== 'running') throw conflict(`The job has already finished (${job.state}); there is nothing to cancel.`);
      const done = await db.transaction(async (trx) => {
        const ok = await jobsRepo(trx).finish(jobId, 'cancelled', { progress: { ...job.progress, phase: 'cancelled' } });
        if (ok) await recordAudit(trx, { projectId, actorId: userId, action: 'job.cancel', detail: { jobId, kind: job.kind, designId: job.designId, wasState: job.state } });
        return ok;
      });
      if (!done) {
        const now = await mustGetJob(projectId, jobId);
        throw conflict(`The job has already finished (${now.state}); there is nothing to cancel.`);
      }
      // a queued job leaves the queue; a running one is stopped by its worker, which watches the row
      if (job.bossJobId) await jd.queue.cancel(job.kind, job.bossJobId).catch((e: unknown) => deps.logger.warn(`job ${jobId}: pg-boss cancel:`, e));
      return publicJob(await mustGetJob(projectId, jobId));
    },

    /** the project's newest revisions (of one design), for a caller whose role has `capability` (404 / 403 otherwise; one round trip) */
    async listRevisions(projectId: number, userId: number, capability: Capability, designId?: number): Promise<Omit<Revision, 'summary'>[]> {
      const { role, revisions } = await revisionsRepo(db).listForMember(projectId, userId, { designId, limit: LIST_LIMIT });
      requireRole(role, capability);
      return revisions;
    },

    async getRevision(projectId: number, revisionId: number): Promise<Revision> {
      return toRevision(await mustGetRevision(projectId, revisionId));
    },

    async download(projectId: number, revisionId: number, name: RevisionFileName, userId: number): Promise<RevisionDownload> {
      const rev = await mustGetRevision(projectId, revisionId);
      const file = await revisionsRepo(db).file(revisionId, name);
      if (!file) throw new AppError('not_found', `Revision ${revisionId} (${rev.kind}) has no ${name}; its files are ${rev.files.map((f) => f.name).join(', ')}.`);
      await recordAudit(db, { projectId, actorId: userId, action: 'revision.download', detail: { revisionId, file: name } });
      return {
        file,
        fileName: `${fileBaseName(rev.designName)}-r${revisionId}-${name}`,
        async *pieces() {
          for (let seq = 0; seq < file.chunks; seq++) {
            const stored = await revisionsRepo(db).chunk(revisionId, name, seq);
            if (!stored) throw new Error(`piece ${seq} of ${name} of revision ${revisionId} is missing`);
            yield unpackChunk(stored);
          }
        },
      };
    },
  };
}
export type JobService = ReturnType<typeof jobService>;
