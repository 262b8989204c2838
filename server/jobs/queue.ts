/**
 * The pg-boss queue that moves jobs between the HTTP process and the workers. pg-boss keeps its
 * own tables in the PostgreSQL schema `pgboss` (created by pg-boss itself at start, not by our
 * migrations). One queue per job kind: mesh, coulomb, convergence.
 *
 * Retries: a job whose worker died is expired by pg-boss after `expireInSeconds` and retried
 * `retryLimit` times with exponential backoff from `retryDelaySeconds`; a fault inside a job
 * (not a refusal of the numerical core) is retried the same way.
 */
import PgBoss from 'pg-boss';
import { jobKinds, type JobKind } from '@contracts/api';
import type { Logger } from '../config';
import { isDatabaseUnavailable } from '../http/errors';
import { mailQueueName } from '../mail/queue';

export const BOSS_SCHEMA = 'pgboss';

export interface QueueSettings {
  /** a job running longer than this is taken to be lost (its worker died) and retried */
  expireInSeconds: number;
  retryLimit: number;
  retryDelaySeconds: number;
  /** how often pg-boss looks for expired jobs */
  maintenanceIntervalSeconds: number;
  /** put before each queue name (letters, digits, '-', '_'); '' by default */
  queuePrefix: string;
}

export const DEFAULT_QUEUE_SETTINGS: QueueSettings = {
  // common practice: far above the longest job the element cap allows on one core
  expireInSeconds: 30 * 60,
  retryLimit: 2,
  retryDelaySeconds: 5,
  maintenanceIntervalSeconds: 30,
  queuePrefix: '',
};

/** pg-boss queue of a kind: the kind's name, after an optional prefix (separate installations or test files sharing one database) */
export const queueName = (kind: JobKind, prefix = ''): string => `${prefix}${kind}`;

/** The options every job is sent with (they travel with the job, so workers need not agree). */
export function sendOptions(settings: QueueSettings, id: string): PgBoss.SendOptions {
  return { id, retryLimit: settings.retryLimit, retryDelay: settings.retryDelaySeconds, retryBackoff: true, expireInSeconds: settings.expireInSeconds };
}

export async function startBoss(databaseUrl: string, settings: QueueSettings, logger: Logger): Promise<PgBoss> {
  const boss = new PgBoss({
    connectionString: databaseUrl,
    schema: BOSS_SCHEMA,
    max: 4,
    application_name: 'tetrawell-jobs',
    maintenanceIntervalSeconds: settings.maintenanceIntervalSeconds,
    schedule: false,
  });
  // a database restart is an outage, not a fault of ours: logged as a warning, as the HTTP side does (503)
  boss.on('error', (err) => {
    const text = err instanceof Error ? err.message : String(err);
    if (isDatabaseUnavailable(err)) logger.warn(`job queue: the database is not reachable (${text}); waiting for it to return`);
    else logger.error('job queue:', text);
  });
  await boss.start();
  // the job kinds' queues, and the outgoing mail's (server/mail/queue.ts: every send names its own retries)
  for (const name of [...jobKinds.map((kind) => queueName(kind, settings.queuePrefix)), mailQueueName(settings.queuePrefix)]) {
    const queue = {
      name,
      retryLimit: settings.retryLimit,
      retryDelay: settings.retryDelaySeconds,
      retryBackoff: true,
      expireInSeconds: settings.expireInSeconds,
    };
    // the queue's own settings are only defaults: every send names its retry and expiry settings.
    // Two processes starting at once may both create it: one wins, the other sees a unique violation or a
    // deadlock (both add the queue's partition) and finds the queue on a later look.
    for (let attempt = 1; !(await boss.getQueue(name)); attempt++) {
      try {
        await boss.createQueue(name, queue);
      } catch (e) {
        if (attempt >= 5) throw e;
        await new Promise((r) => setTimeout(r, 100 * attempt));
      }
    }
  }
  return boss;
}
