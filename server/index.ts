/**
 * Start the real server: database pool, session store, mailer, services, Express app, HTTP
 * listener. Tests call `start({ port: 0, databaseUrl, ... })` and get the URL back.
 */
import http from 'node:http';
import { randomBytes } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import session from 'express-session';
import pg from 'pg';
import type { Express } from 'express';
import type { Knex } from 'knex';
import type PgBoss from 'pg-boss';
import { createKnex } from './db/config';
import { createHealthProbe } from './db/healthProbe';
import { createMailer, type Mailer } from './mail/mailer';
import { DEFAULT_MAIL_QUEUE, mailKey, queuedMailer, startMailDelivery, type MailDelivery } from './mail/queue';
import { createServices, type Services } from './services';
import { createApp } from './app';
import { createDesignBodyReader } from './http/designBody';
import { passwordHasher } from './workers/passwordHash';
import { createSessionStore } from './http/sessionStore';
import { consoleLogger, DEFAULT_BODY_LIMIT, DEFAULT_RATE_LIMITS, type ServerOptions } from './config';
import { queueName, sendOptions, startBoss } from './jobs/queue';
import { DEFAULT_JOB_SETTINGS } from './jobs/settings';
import { startJobWorker, type JobWorker } from './jobs/worker';
import { createRequestPressure } from './workers/requestPressure';
import type { JobQueue } from './services/jobs';

export type { ServerOptions } from './config';

export interface RunningServer {
  url: string;
  port: number;
  app: Express;
  knex: Knex;
  services: Services;
  /** the job worker running in this process, when `jobs.workers` > 0 */
  jobWorker: JobWorker | null;
  stop(): Promise<void>;
}

const REPO_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
export const DEFAULT_STATIC_DIR = path.join(REPO_ROOT, 'dist', 'app');

export async function start(opts: ServerOptions): Promise<RunningServer> {
  const logger = opts.logger ?? consoleLogger;
  const host = opts.host ?? '127.0.0.1';
  const knex = createKnex(opts.databaseUrl, { logger });
  // Every pool needs an 'error' listener: when PostgreSQL stops (pg_ctl -m fast sends 57P01 to every backend) an
  // idle client emits 'error', and an EventEmitter without a listener throws, which ended the process
  // (issue 8, item 1). The pool drops that client and connects afresh once the database is back. Knex's pool
  // listens on its own connections already (dialects/postgres: connection.on('error')).
  const sessionPool = new pg.Pool({ connectionString: opts.databaseUrl, max: 5, connectionTimeoutMillis: 5_000 });
  sessionPool.on('error', (err) => logger.warn('session store: an idle database connection ended:', err.message));
  // connect-pg-simple, reading the signed-in account in the same query as the session (server/http/sessionStore.ts)
  const { store: sessionStore, userOf: sessionUser, sessionFreeReads, unlessSessionFree } = createSessionStore(session, sessionPool, {
    pruneSessionIntervalSeconds: opts.sessionPruneIntervalSeconds ?? 5 * 60,
    errorLog: (...args: unknown[]) => logger.error('session store:', ...args),
  });

  let sessionSecret = opts.sessionSecret;
  if (!sessionSecret) {
    sessionSecret = randomBytes(32).toString('hex');
    logger.warn('SESSION_SECRET is not set: using a random one, so sign-ins end when the server restarts.');
  }

  // the config object is shared by reference: publicUrl is filled in once the port is known
  const config = {
    publicUrl: opts.publicUrl?.replace(/\/+$/, '') ?? '',
    mailFrom: opts.mailFrom ?? 'Tetrawell <no-reply@tetrawell.invalid>',
    bcryptRounds: opts.bcryptRounds ?? 12,
    invitationTtlMs: (opts.invitationTtlHours ?? 7 * 24) * 3_600_000,
    passwordResetTtlMs: (opts.passwordResetTtlMinutes ?? 60) * 60_000,
    emailVerificationTtlMs: (opts.emailVerificationTtlHours ?? 48) * 3_600_000,
  };
  const jobSettings = { ...DEFAULT_JOB_SETTINGS, ...opts.jobs?.settings };
  // the SMTP transport; with SMTP configured, services and job e-mails queue their mail and this process
  // delivers it from the queue with retries (server/mail/queue.ts); without, mail is logged and dropped as before
  const smtpMailer = createMailer(opts.smtp, config.mailFrom, logger);
  const mailSettings = { ...DEFAULT_MAIL_QUEUE, ...opts.mailQueue };
  const sealKey = mailKey(sessionSecret);
  let delivery: MailDelivery | null = null;
  // pg-boss starts in the background: the server answers (health 503 and all) while the database is down,
  // and a failed start is tried again at the next send
  let bossStarting: Promise<PgBoss> | null = null;
  const getBoss = () =>
    (bossStarting ??= startBoss(opts.databaseUrl, jobSettings, logger)
      .then(async (boss) => {
        if (opts.smtp && !delivery) {
          try {
            delivery = await startMailDelivery({ boss, prefix: jobSettings.queuePrefix, key: sealKey, smtp: smtpMailer, settings: mailSettings });
          } catch (e) {
            logger.error(`Mail delivery from the queue could not start: ${e instanceof Error ? e.message : String(e)}`);
          }
        }
        return boss;
      })
      .catch((e: unknown) => {
        bossStarting = null;
        throw e;
      }));
  const mailer: Mailer = opts.smtp
    ? queuedMailer({ boss: getBoss, prefix: jobSettings.queuePrefix, key: sealKey, settings: mailSettings, logger, queued: () => delivery?.wake() })
    : smtpMailer;
  getBoss().catch((e: unknown) => logger.warn(`The job queue is not ready yet (${e instanceof Error ? e.message : String(e)}); it is tried again when a job is started.`));
  const queue: JobQueue = {
    async send(kind, jobId, bossJobId) {
      await (await getBoss()).send(queueName(kind, jobSettings.queuePrefix), { jobId }, sendOptions(jobSettings, bossJobId));
    },
    cancel: async (kind, bossJobId) => (await getBoss()).cancel(queueName(kind, jobSettings.queuePrefix), bossJobId),
  };
  const stopBoss = async () => {
    const b = await bossStarting?.catch(() => null);
    await delivery?.stop();
    await b?.stop({ graceful: false, wait: true });
  };
  // GET /api/health asks over a connection of its own, which request traffic cannot hold up (server/db/healthProbe.ts)
  const healthProbe = createHealthProbe(opts.databaseUrl, { logger });
  // bcrypt in a worker thread: a sign-in at cost 12 held the request thread ~270 ms
  const passwords = passwordHasher({ rounds: config.bcryptRounds });
  const services = createServices({ db: knex, mailer, config, logger, now: () => new Date() }, { queue, settings: jobSettings }, { databaseUp: healthProbe.up, passwords });

  // large design bodies are validated and written by a helper process at nice 10 with a database connection of its own
  const designBodies = createDesignBodyReader({ databaseUrl: opts.databaseUrl });
  // the job threads of this process give way while requests are being served (server/workers/requestPressure.ts)
  const pressure = createRequestPressure();
  const app = createApp({
    services,
    pressure,
    sessionStore,
    sessionUser,
    sessionFree: { sessionFreeReads, unlessSessionFree },
    sessionSecret,
    sessionMaxAgeMs: opts.sessionMaxAgeMs ?? 7 * 24 * 3_600_000,
    anonymousSessionMaxAgeMs: opts.anonymousSessionMaxAgeMs ?? 60 * 60_000,
    cookieSecure: opts.cookieSecure ?? 'auto',
    trustProxy: opts.trustProxy ?? false,
    rateLimits: { ...DEFAULT_RATE_LIMITS, ...opts.rateLimits },
    staticDir: opts.staticDir === undefined ? DEFAULT_STATIC_DIR : opts.staticDir,
    bodyLimit: opts.bodyLimit ?? DEFAULT_BODY_LIMIT,
    offThreadBodyBytes: opts.offThreadBodyBytes ?? 256 * 1024,
    designBodies,
    logger,
  });

  const server = http.createServer(app);
  try {
    await new Promise<void>((resolve, reject) => {
      server.once('error', reject);
      server.listen(opts.port ?? 8080, host, () => {
        server.off('error', reject);
        resolve();
      });
    });
  } catch (err) {
    sessionStore.close();
    await Promise.allSettled([knex.destroy(), sessionPool.end(), healthProbe.close(), services.designs.close(), designBodies.destroy(), passwords.close(), stopBoss()]);
    smtpMailer.close();
    throw err;
  }
  const workers = opts.jobs?.workers ?? 0;
  let jobWorker: JobWorker | null = null;
  if (workers > 0) {
    try {
      jobWorker = await startJobWorker({
        databaseUrl: opts.databaseUrl,
        concurrency: workers,
        settings: jobSettings,
        logger,
        pollIntervalMs: opts.jobs?.pollIntervalMs,
        mailer,
        publicUrl: () => config.publicUrl ?? '',
        pressure: pressure.buffer,
      });
    } catch (e) {
      // the database is down: the server still answers; jobs wait in the queue for a worker (restart, or `npm run worker`)
      logger.error(`The job worker could not start (${e instanceof Error ? e.message : String(e)}); jobs wait until one runs.`);
    }
  }
  const port = (server.address() as AddressInfo).port;
  // a wildcard listen address is not somewhere a browser can go: name loopback instead
  const shown = host === '0.0.0.0' ? '127.0.0.1' : host === '::' ? '::1' : host;
  const url = `http://${shown.includes(':') ? `[${shown}]` : shown}:${port}`;
  if (!config.publicUrl) config.publicUrl = url;

  let stopping: Promise<void> | null = null;
  const stop = () =>
    (stopping ??= (async () => {
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        // keep-alive sockets would hold close() open
        server.closeIdleConnections();
        setTimeout(() => server.closeAllConnections(), 2_000).unref();
      });
      // npm start sends SIGTERM 8 s after SIGINT: running jobs get 5 s, then their threads end and pg-boss retries them later
      await jobWorker?.stop(5_000);
      sessionStore.close();
      // a mail being handed to the SMTP server finishes first (stopBoss waits for it); the rest stays queued
      await Promise.allSettled([knex.destroy(), sessionPool.end(), healthProbe.close(), services.designs.close(), designBodies.destroy(), passwords.close(), stopBoss()]);
      smtpMailer.close();
    })());

  return { url, port, app, knex, services, jobWorker, stop };
}
