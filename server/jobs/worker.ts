/**
 * A job worker: takes jobs from the pg-boss queues when it has a free slot, runs each in a
 * worker thread (threads.ts), and stores the revision.
 *
 *   fetch (pg-boss) ─► jobs row queued|running → running ─► thread: pipeline + pack
 *        │                 (cancelled or gone: done)          │ progress → jobs.progress
 *        │                                                    │ jobs.state = cancelled → abort (thread ends)
 *        ▼                                                    ▼
 *   one transaction: lock the job row, check the storage quota, revision + files + pieces,
 *   job succeeded, audit `revision.create` ─► pg-boss complete
 *
 * A worker that dies leaves its pg-boss job active; pg-boss expires it and another worker (or
 * this one, restarted) takes it again: the jobs row is still `running`, which is allowed, and the
 * unique revisions.job_id means a second revision can never be stored. A fault inside the job is
 * retried (pg-boss fail); a refusal of the numerical core (too many elements, no electrons, …)
 * fails the job with its words at once. Every few seconds the worker also fails, in words, jobs
 * whose pg-boss job used up its retries (their workers kept dying).
 *
 * The app process runs one of these by default (TETRAWELL_WORKERS); `npm run worker` runs one on
 * its own (server/worker.ts).
 */
import type PgBoss from 'pg-boss';
import type { Knex } from 'knex';
import { jobKinds, type JobKind, type JobProgress } from '@contracts/api';
import type { Logger } from '../config';
import { createKnex } from '../db/config';
import { isUniqueViolation } from '../repositories/db';
import { jobsRepo } from '../repositories/jobs';
import { revisionsRepo } from '../repositories/revisions';
import { designsRepo } from '../repositories/designs';
import { recordAudit } from '../services/audit';
import { BOSS_SCHEMA, queueName, startBoss } from './queue';
import { DEFAULT_JOB_SETTINGS, mib, type JobSettings } from './settings';
import { jobThreads, type JobThreads } from './threads';
import { optionsKey } from './options';
import { softwareVersion } from './software';
import { storedSize } from './storage';
import { jobNotifier } from './notify';
import type { Mailer } from '../mail/mailer';
import { queuedMailer } from '../mail/queue';

export interface JobWorkerOptions {
  databaseUrl: string;
  /** jobs run at once (worker threads) */
  concurrency?: number;
  settings?: Partial<JobSettings>;
  logger: Logger;
  /** how often an idle worker asks the queue for work, and a running job checks for a cancel (ms) */
  pollIntervalMs?: number;
  /** sends the job e-mails (server/jobs/notify.ts); by default they go into the mail queue (server/mail/queue.ts) */
  mailer?: Mailer;
  /** seals the queued job e-mails (mailKey(SESSION_SECRET)); null writes them in the clear (they hold no secret) */
  mailKey?: Buffer | null;
  /** base of the links in those e-mails */
  publicUrl?: () => string;
  /** the request thread's gauge when this worker runs in the app process (server/workers/requestPressure.ts) */
  pressure?: SharedArrayBuffer;
}

export interface JobWorker {
  /** jobs running now */
  running(): number;
  /** stop taking work; wait up to `graceMs` for running jobs, then end their threads (their jobs are retried later) */
  stop(graceMs?: number): Promise<void>;
}

interface BossData {
  jobId: number;
}

const DONE: JobProgress = { phase: 'done', fraction: 1 };

function words(e: unknown): string {
  const m = e instanceof Error ? e.message : String(e);
  return m.length > 500 ? `${m.slice(0, 500)}…` : m;
}

export async function startJobWorker(opts: JobWorkerOptions): Promise<JobWorker> {
  const settings: JobSettings = { ...DEFAULT_JOB_SETTINGS, ...opts.settings };
  const concurrency = Math.max(1, opts.concurrency ?? 1);
  const pollMs = opts.pollIntervalMs ?? 500;
  const logger = opts.logger;
  const knex: Knex = createKnex(opts.databaseUrl, { poolMax: 2 + concurrency, logger });
  const boss: PgBoss = await startBoss(opts.databaseUrl, settings, logger);
  const threads: JobThreads = jobThreads(concurrency, opts.pressure);
  const software = softwareVersion();
  // without a mailer of the app's (a standalone `npm run worker`), job e-mails go into the mail queue through
  // this worker's own pg-boss; the app process delivers them (server/mail/queue.ts)
  const mailer = opts.mailer ?? queuedMailer({ boss: async () => boss, prefix: settings.queuePrefix, key: opts.mailKey ?? null, logger });
  const notifier = jobNotifier({ knex, mailer, publicUrl: opts.publicUrl ?? (() => ''), notifyAfterSeconds: settings.notifyAfterSeconds, logger });

  let active = 0;
  let stopped = false;
  let ticking = false;
  let next = 0;
  const inFlight = new Set<Promise<void>>();

  const settle = async (what: 'complete' | 'fail', kind: JobKind, bossId: string, message?: string) => {
    try {
      if (what === 'complete') await boss.complete(queueName(kind, settings.queuePrefix), bossId);
      else await boss.fail(queueName(kind, settings.queuePrefix), bossId, { message: message ?? 'failed' });
    } catch (e) {
      // the pg-boss job was cancelled meanwhile: nothing left to settle
      logger.warn(`job queue: could not mark ${bossId} ${what}d: ${words(e)}`);
    }
  };

  async function handle(kind: JobKind, bj: PgBoss.JobWithMetadata<BossData>): Promise<void> {
    const jobId = bj.data.jobId;
    const repo = jobsRepo(knex);
    const stored = await revisionsRepo(knex).byJob(jobId);
    if (stored) {
      // a previous attempt committed its revision and died before telling pg-boss
      await repo.finish(jobId, 'succeeded', { revisionId: stored.id, progress: DONE });
      return settle('complete', kind, bj.id);
    }
    if (!(await repo.markRunning(jobId))) return settle('complete', kind, bj.id);
    const job = (await repo.byId(jobId))!;
    const documentJson = await designsRepo(knex).getVersionText(job.designId, job.designVersion);
    if (documentJson === null) {
      await repo.finish(jobId, 'failed', { error: `Version ${job.designVersion} of the design is no longer stored, so there is nothing to compute.` });
      return settle('complete', kind, bj.id);
    }

    const ac = new AbortController();
    const watch = setInterval(() => {
      repo.state(jobId).then(
        (s) => {
          if (s !== 'running') ac.abort();
        },
        () => {},
      );
    }, pollMs);
    let lastWrite = 0;
    let writing = false;
    const onProgress = (p: JobProgress) => {
      const now = Date.now();
      if (writing || now - lastWrite < 250) return;
      lastWrite = now;
      writing = true;
      repo.setProgress(jobId, p).finally(() => {
        writing = false;
      });
    };

    const t0 = performance.now();
    let out;
    try {
      out = await threads.run({ kind, documentJson, options: job.options, chunkBytes: settings.chunkBytes }, { onProgress, signal: ac.signal });
    } catch (e) {
      if (ac.signal.aborted) return settle('complete', kind, bj.id);
      return fault(kind, bj, words(e));
    } finally {
      clearInterval(watch);
    }
    if (!out.ok) {
      await repo.finish(jobId, 'failed', { error: out.refusal });
      return settle('complete', kind, bj.id);
    }

    await repo.setProgress(jobId, { phase: 'store', fraction: 0.98 });
    const s0 = performance.now();
    const newBytes = out.files.reduce((s, f) => s + storedSize(f), 0);
    try {
      await knex.transaction(async (trx) => {
        // the project row lock orders concurrent stores of one project, so the quota holds
        await trx('projects').where({ id: job.projectId }).forUpdate().first('id');
        const locked = await jobsRepo(trx).byId(jobId, true);
        if (!locked || locked.state !== 'running') return; // cancelled while computing
        const used = await revisionsRepo(trx).storedBytes(job.projectId);
        if (used + newBytes > settings.storageQuotaBytes) {
          await jobsRepo(trx).finish(jobId, 'failed', {
            error: `The project's storage is full: its revisions take ${mib(used)} of ${mib(settings.storageQuotaBytes)} and this result needs ${mib(newBytes)} more. Delete designs you no longer need, or ask the administrator for a larger quota.`,
          });
          return;
        }
        const timings = {
          queuedSeconds: Math.max(0, (Date.parse(job.startedAt ?? job.createdAt) - Date.parse(job.createdAt)) / 1000),
          computeSeconds: out.computeSeconds,
          packSeconds: out.packSeconds,
          storeSeconds: 0,
          totalSeconds: (performance.now() - t0) / 1000,
        };
        const revisionId = await revisionsRepo(trx).insert({
          projectId: job.projectId,
          jobId,
          designId: job.designId,
          designVersion: job.designVersion,
          designSha256: job.designSha256,
          kind,
          options: job.options,
          optionsKey: optionsKey(job.options),
          software,
          timings: { ...timings, storeSeconds: (performance.now() - s0) / 1000 },
          summary: out.summary,
          files: out.files,
          createdBy: job.createdById,
        });
        await jobsRepo(trx).finish(jobId, 'succeeded', { revisionId, progress: DONE });
        await recordAudit(trx, {
          projectId: job.projectId,
          actorId: job.createdById,
          action: 'revision.create',
          detail: { revisionId, jobId, kind, designId: job.designId, designVersion: job.designVersion, storedBytes: newBytes },
        });
      });
    } catch (e) {
      if (isUniqueViolation(e)) {
        const other = await revisionsRepo(knex).byJob(jobId);
        if (other) await repo.finish(jobId, 'succeeded', { revisionId: other.id, progress: DONE });
        return settle('complete', kind, bj.id);
      }
      return fault(kind, bj, words(e));
    }
    return settle('complete', kind, bj.id);
  }

  async function fault(kind: JobKind, bj: PgBoss.JobWithMetadata<BossData>, message: string): Promise<void> {
    const repo = jobsRepo(knex);
    const attempt = bj.retryCount + 1;
    if (bj.retryCount < bj.retryLimit) {
      logger.warn(`job ${bj.data.jobId}: attempt ${attempt} failed (${message}); it will be retried`);
      await repo.requeue(bj.data.jobId);
    } else {
      logger.error(`job ${bj.data.jobId}: attempt ${attempt} failed (${message}); no retries left`);
      await repo.finish(bj.data.jobId, 'failed', { error: `The job failed ${attempt} time(s) and was given up: ${message}` });
    }
    await settle('fail', kind, bj.id, message);
  }

  async function fetchOne(): Promise<{ kind: JobKind; job: PgBoss.JobWithMetadata<BossData> } | null> {
    // start from a different queue each time so one kind cannot starve the others
    for (let i = 0; i < jobKinds.length; i++) {
      const kind = jobKinds[(next + i) % jobKinds.length];
      const [job] = await boss.fetch<BossData>(queueName(kind, settings.queuePrefix), { batchSize: 1, includeMetadata: true });
      if (job) {
        next = (next + i + 1) % jobKinds.length;
        return { kind, job };
      }
    }
    return null;
  }

  async function tick(): Promise<void> {
    if (ticking || stopped) return;
    ticking = true;
    try {
      while (!stopped && active < concurrency) {
        const got = await fetchOne();
        if (!got) break;
        active++;
        const p = handle(got.kind, got.job)
          .then(() => notifier.afterJob(got.job.data.jobId))
          .catch((e: unknown) => logger.error(`job ${got.job.data.jobId}: ${words(e)}`))
          .finally(() => {
            active--;
            inFlight.delete(p);
            void tick();
          });
        inFlight.add(p);
      }
    } catch (e) {
      logger.error(`job queue: ${words(e)}`);
    } finally {
      ticking = false;
    }
  }

  async function sweep(): Promise<void> {
    try {
      for (const o of await jobsRepo(knex).orphans(BOSS_SCHEMA)) {
        await jobsRepo(knex).finish(o.id, 'failed', {
          error: `The job was started ${o.retryCount + 1} time(s) and never finished: the worker running it stopped (ended, killed or out of memory) or it ran past its time limit of ${settings.expireInSeconds} s.`,
        });
        // its starter hears of it like of any other failed job (the claim in jobs.notified_at keeps it to one mail)
        await notifier.afterJob(o.id);
      }
    } catch (e) {
      logger.error(`job sweep: ${words(e)}`);
    }
  }

  const poll = setInterval(() => void tick(), pollMs);
  const sweeper = setInterval(() => void sweep(), Math.max(2_000, 10 * pollMs));
  void tick();

  return {
    running: () => active,
    async stop(graceMs = 10_000) {
      if (stopped) return;
      stopped = true;
      clearInterval(poll);
      clearInterval(sweeper);
      await Promise.race([Promise.allSettled([...inFlight]), new Promise((r) => setTimeout(r, graceMs).unref())]);
      await threads.close();
      await Promise.allSettled([...inFlight]);
      await boss.stop({ graceful: false, wait: true }).catch(() => {});
      await knex.destroy();
    },
  };
}
