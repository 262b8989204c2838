/**
 * Job settings from the environment, read by server/main.ts (`npm start`) and server/worker.ts
 * (`npm run worker`):
 *
 *   TETRAWELL_WORKERS              job workers in the app process (default 1; 0 for none);
 *                                  for `npm run worker`: jobs it runs at once (default 1)
 *   TETRAWELL_MAX_ACTIVE_JOBS      queued + running jobs per project (default 4)
 *   TETRAWELL_STORAGE_QUOTA_MB     compressed revision storage per project (default 2048)
 *   TETRAWELL_JOB_EXPIRE_SECONDS   a job running longer is taken as lost and retried (default 1800)
 *   TETRAWELL_JOB_RETRIES          retries after a fault or a lost worker (default 2)
 *   TETRAWELL_QUEUE_PREFIX         put before the pg-boss queue names (default none): several installations on one database
 *   TETRAWELL_COMMIT               git commit written on revisions (default: `git rev-parse HEAD`)
 */
import { z } from 'zod';
import type { JobSettings } from './settings';

const count = z.coerce.number().int().min(0).max(64);

export const jobEnvSchema = z.object({
  TETRAWELL_WORKERS: count.default(1),
  TETRAWELL_MAX_ACTIVE_JOBS: z.coerce.number().int().min(1).max(1000).optional(),
  TETRAWELL_STORAGE_QUOTA_MB: z.coerce.number().positive().optional(),
  TETRAWELL_JOB_EXPIRE_SECONDS: z.coerce.number().int().min(5).max(23 * 3600).optional(),
  TETRAWELL_JOB_RETRIES: z.coerce.number().int().min(0).max(20).optional(),
  TETRAWELL_QUEUE_PREFIX: z.string().regex(/^[A-Za-z0-9_-]{0,40}$/, 'letters, digits, - and _ only (at most 40)').optional(),
});
export type JobEnv = z.infer<typeof jobEnvSchema>;

export function jobSettingsFromEnv(env: JobEnv): Partial<JobSettings> {
  const s: Partial<JobSettings> = {};
  if (env.TETRAWELL_MAX_ACTIVE_JOBS !== undefined) s.maxActivePerProject = env.TETRAWELL_MAX_ACTIVE_JOBS;
  if (env.TETRAWELL_STORAGE_QUOTA_MB !== undefined) s.storageQuotaBytes = Math.round(env.TETRAWELL_STORAGE_QUOTA_MB * 1024 ** 2);
  if (env.TETRAWELL_JOB_EXPIRE_SECONDS !== undefined) {
    s.expireInSeconds = env.TETRAWELL_JOB_EXPIRE_SECONDS;
    // look for lost jobs a few times per expiry period
    s.maintenanceIntervalSeconds = Math.max(1, Math.min(30, Math.floor(env.TETRAWELL_JOB_EXPIRE_SECONDS / 4)));
  }
  if (env.TETRAWELL_JOB_RETRIES !== undefined) s.retryLimit = env.TETRAWELL_JOB_RETRIES;
  if (env.TETRAWELL_QUEUE_PREFIX !== undefined) s.queuePrefix = env.TETRAWELL_QUEUE_PREFIX;
  return s;
}
