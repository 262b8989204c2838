/**
 * `npm run worker`: a job worker on its own, without HTTP. Run as many as you like, on as many
 * machines as you like, against the same DATABASE_URL: pg-boss hands each job to one of them.
 * This is the documented way to scale out (README, "Jobs").
 *
 * Environment: DATABASE_URL (required), TETRAWELL_WORKERS (jobs at once, default 1) and the job
 * settings of server/jobs/env.ts. Job e-mails go into the mail queue, which the app process delivers
 * (server/mail/queue.ts): PUBLIC_URL gives their links the site's address, and SESSION_SECRET (the app's)
 * seals them in the queue like the app's own mail. SIGINT/SIGTERM: stop taking jobs, let running ones finish for
 * up to 30 s; a job still running then is retried by another worker.
 */
import { z } from 'zod';
import { jobEnvSchema, jobSettingsFromEnv } from './jobs/env';
import { startJobWorker } from './jobs/worker';
import { consoleLogger } from './config';
import { mailKey } from './mail/queue';

const envSchema = jobEnvSchema.extend({
  DATABASE_URL: z.string({ error: 'is required: the PostgreSQL connection string of the database the app uses' }).min(1, 'is required: the PostgreSQL connection string of the database the app uses'),
  TETRAWELL_WORKERS: z.coerce.number().int().min(1).max(64).default(1),
  PUBLIC_URL: z.url().optional(),
  SESSION_SECRET: z.string().min(1).optional(),
});

async function main(): Promise<void> {
  const parsed = envSchema.safeParse(Object.fromEntries(Object.entries(process.env).filter(([, v]) => v !== '')));
  if (!parsed.success) {
    for (const issue of parsed.error.issues) console.error(`Configuration: ${issue.path.join('.')}: ${issue.message}`);
    process.exit(2);
  }
  const env = parsed.data;
  let worker;
  try {
    const publicUrl = env.PUBLIC_URL?.replace(/\/+$/, '') ?? '';
    if (!publicUrl) console.warn('PUBLIC_URL is not set: the links in job e-mails from this worker have no site address.');
    worker = await startJobWorker({
      databaseUrl: env.DATABASE_URL,
      concurrency: env.TETRAWELL_WORKERS,
      settings: jobSettingsFromEnv(env),
      logger: consoleLogger,
      publicUrl: () => publicUrl,
      mailKey: env.SESSION_SECRET ? mailKey(env.SESSION_SECRET) : null,
    });
  } catch (err) {
    console.error(`Could not start the job worker: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  }
  console.log(`Tetrawell job worker running ${env.TETRAWELL_WORKERS} job(s) at once (pid ${process.pid}).`);
  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) process.exit(1);
    stopping = true;
    console.log(`${signal}: finishing running jobs (up to 30 s)…`);
    await worker.stop(30_000);
    console.log('Job worker stopped.');
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
}

void main();
