/**
 * Mail through the job queue (issue 10, "Scripted use": "the e-mails that routes send today go through the
 * queue too, so a failed send is retried").
 *
 *   service ─► outbox.send(mail) ─► pg-boss queue `<prefix>mail` ─► delivery (the app process) ─► SMTP
 *                  (one INSERT; the request never waits for SMTP)        a refusal or an unreachable server
 *                                                                         throws: pg-boss retries with backoff
 *
 * Every process may put mail in the queue (the app, `npm run worker` for job e-mails); the app process, which
 * has the SMTP settings, delivers. A mail may carry a secret (a confirmation, reset or invitation link, whose
 * token the database otherwise keeps only as a sha256), so it is sealed with AES-256-GCM under a key derived
 * from SESSION_SECRET (HKDF, RFC 5869) before it is written to the queue's tables; a process without the
 * secret (a standalone worker started without SESSION_SECRET) writes its job e-mails, which hold no secret, in
 * the clear.
 */
import { createCipheriv, createDecipheriv, hkdfSync, randomBytes } from 'node:crypto';
import type PgBoss from 'pg-boss';
import type { Logger } from '../config';
import type { Mailer, OutgoingMail } from './mailer';

export interface MailQueueSettings {
  /** attempts after the first before a mail is given up */
  retryLimit: number;
  /** first retry after about this many seconds; each later one waits about twice as long (pg-boss backoff) */
  retryDelaySeconds: number;
  /** how often the delivering process looks for mail it was not woken for (mail from other processes) */
  pollSeconds: number;
}

export const DEFAULT_MAIL_QUEUE: MailQueueSettings = {
  // common practice: SMTP servers themselves retry for hours; 10 retries from 5 s double up to about 1.5 h in all
  retryLimit: 10,
  retryDelaySeconds: 5,
  pollSeconds: 2,
};

/** The pg-boss queue of outgoing mail: 'mail' after the installation's queue prefix. */
export const mailQueueName = (prefix = ''): string => `${prefix}mail`;

type Envelope = { sealed: string } | { mail: OutgoingMail };

/** The sealing key of an installation: HKDF-SHA256 of SESSION_SECRET (RFC 5869), 32 bytes for AES-256. */
export function mailKey(secret: string): Buffer {
  return Buffer.from(hkdfSync('sha256', secret, 'tetrawell', 'mail queue v1', 32));
}

export function sealMail(mail: OutgoingMail, key: Buffer | null): Envelope {
  if (!key) return { mail };
  const iv = randomBytes(12);
  const c = createCipheriv('aes-256-gcm', key, iv);
  const body = Buffer.concat([c.update(JSON.stringify(mail), 'utf8'), c.final()]);
  return { sealed: Buffer.concat([iv, c.getAuthTag(), body]).toString('base64') };
}

export function openMail(env: Envelope, key: Buffer | null): OutgoingMail {
  if ('mail' in env) return env.mail;
  if (!key) throw new Error('a sealed mail cannot be opened without SESSION_SECRET');
  const raw = Buffer.from(env.sealed, 'base64');
  const d = createDecipheriv('aes-256-gcm', key, raw.subarray(0, 12));
  d.setAuthTag(raw.subarray(12, 28));
  // a mail sealed under another SESSION_SECRET fails here (GCM tag), and is retried until given up
  return JSON.parse(Buffer.concat([d.update(raw.subarray(28)), d.final()]).toString('utf8')) as OutgoingMail;
}

/**
 * A Mailer that queues instead of sending: resolves true once the mail is in the queue (it is then retried
 * until the SMTP server takes it), false when the queue could not take it (logged; the database is away).
 */
export function queuedMailer(opts: {
  boss: () => Promise<PgBoss>;
  prefix: string;
  key: Buffer | null;
  settings?: MailQueueSettings;
  logger: Logger;
  /** called after each queued mail: wakes the delivery in this process at once */
  queued?: () => void;
}): Mailer {
  const s = opts.settings ?? DEFAULT_MAIL_QUEUE;
  return {
    async send(mail) {
      try {
        const boss = await opts.boss();
        await boss.send(mailQueueName(opts.prefix), sealMail(mail, opts.key), {
          retryLimit: s.retryLimit,
          retryDelay: s.retryDelaySeconds,
          retryBackoff: true,
          // one SMTP conversation: the transport's own timeouts end it well before this
          expireInSeconds: 120,
        });
        opts.queued?.();
        return true;
      } catch (err) {
        opts.logger.error(`Queueing mail "${mail.subject}" to ${mail.to} failed:`, err instanceof Error ? err.message : err);
        return false;
      }
    },
    close() {},
  };
}

export interface MailDelivery {
  /** look at the queue now (after this process queued a mail) */
  wake(): void;
  stop(): Promise<void>;
}

/** Deliver queued mail through `smtp` (the real transport) in this process. */
export async function startMailDelivery(opts: {
  boss: PgBoss;
  prefix: string;
  key: Buffer | null;
  smtp: Mailer;
  settings?: MailQueueSettings;
}): Promise<MailDelivery> {
  const s = opts.settings ?? DEFAULT_MAIL_QUEUE;
  const name = mailQueueName(opts.prefix);
  const inFlight = new Set<Promise<unknown>>();
  const workerId = await opts.boss.work<Envelope>(name, { pollingIntervalSeconds: s.pollSeconds, batchSize: 1 }, async (jobs) => {
    const p = (async () => {
      for (const job of jobs) {
        const mail = openMail(job.data, opts.key);
        // the mailer logs the reason; throwing makes pg-boss retry the mail later
        if (!(await opts.smtp.send(mail))) throw new Error(`the SMTP server did not take "${mail.subject}"; it is tried again later`);
      }
    })();
    inFlight.add(p);
    try {
      await p;
    } finally {
      inFlight.delete(p);
    }
  });
  return {
    wake: () => opts.boss.notifyWorker(workerId),
    async stop() {
      await opts.boss.offWork(name);
      await Promise.allSettled([...inFlight]);
    },
  };
}
