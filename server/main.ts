/**
 * Process entry used by `npm start`: read the environment, start the fake SMTP server when
 * asked (development), start the HTTP server, and shut both down cleanly on SIGINT/SIGTERM.
 *
 * Environment:
 *   DATABASE_URL              PostgreSQL connection string (required)
 *   PORT / HOST               listen port (8080) and address (127.0.0.1)
 *   SESSION_SECRET            signs session cookies (random per start when unset: sign-ins end at restart)
 *   PUBLIC_URL                base of links in e-mails (default: the listening URL)
 *   SMTP_HOST, SMTP_PORT, SMTP_SECURE, SMTP_USER, SMTP_PASS, MAIL_FROM   a real SMTP server
 *   TETRAWELL_FAKE_SMTP_PORT  without SMTP_HOST: run the loopback mail sink on this port and send there
 *                             (refused under NODE_ENV=production, which needs SMTP_HOST)
 *   TRUST_PROXY               Express "trust proxy" (e.g. 1, loopback) when behind a TLS proxy
 *   COOKIE_SECURE             true | false | auto (default auto: Secure whenever the request came over HTTPS)
 *   TETRAWELL_RATE_LIMIT_SIGN_IN / _SIGN_UP / _RESET / _VERIFY / _RESET_CONFIRM / _PASSWORD_CHANGE
 *                             attempts per window and client address (sign-in: failures per account and
 *                             address; TETRAWELL_RATE_LIMIT_SIGN_IN_ADDRESS: failures per address, any account)
 *                             (defaults in server/config.ts; NODE_ENV=test raises them to 1000 so browser tests
 *                             that sign up many people from one address are not throttled)
 *   NODE_ENV=production       refuses to start without SESSION_SECRET or without SMTP_HOST
 *   TETRAWELL_WORKERS         job workers in this process (default 1; 0 for none: run `npm run worker`)
 *   TETRAWELL_MAX_ACTIVE_JOBS, TETRAWELL_STORAGE_QUOTA_MB, TETRAWELL_JOB_EXPIRE_SECONDS, TETRAWELL_JOB_RETRIES
 *                             job limits (server/jobs/env.ts)
 */
import { z } from 'zod';
import { start, type RunningServer } from './index';
import { startFakeSmtp, type FakeSmtp } from './mail/fakeSmtp';
import { createKnex } from './db/config';
import { planMail, rateLimitsFromEnv, type MailPlan, type SmtpConfig } from './config';
import { jobEnvSchema, jobSettingsFromEnv } from './jobs/env';

const bool = z.enum(['true', 'false', '1', '0', 'yes', 'no']).transform((v) => v === 'true' || v === '1' || v === 'yes');
const port = z.coerce.number().int().min(0).max(65535);

const envSchema = jobEnvSchema.extend({
  DATABASE_URL: z.string().min(1, 'DATABASE_URL is required (a PostgreSQL connection string).'),
  PORT: port.default(8080),
  HOST: z.string().min(1).default('127.0.0.1'),
  SESSION_SECRET: z.string().min(16, 'SESSION_SECRET must be at least 16 characters.').optional(),
  PUBLIC_URL: z.url().optional(),
  SMTP_HOST: z.string().min(1).optional(),
  SMTP_PORT: port.default(587),
  SMTP_SECURE: bool.optional(),
  SMTP_USER: z.string().optional(),
  SMTP_PASS: z.string().optional(),
  MAIL_FROM: z.string().min(3).optional(),
  TETRAWELL_FAKE_SMTP_PORT: port.optional(),
  TRUST_PROXY: z.string().optional(),
  COOKIE_SECURE: z.enum(['true', 'false', 'auto']).default('auto'),
  TETRAWELL_RATE_LIMIT_SIGN_IN: z.coerce.number().int().positive().optional(),
  TETRAWELL_RATE_LIMIT_SIGN_IN_ADDRESS: z.coerce.number().int().positive().optional(),
  TETRAWELL_RATE_LIMIT_SIGN_UP: z.coerce.number().int().positive().optional(),
  TETRAWELL_RATE_LIMIT_RESET: z.coerce.number().int().positive().optional(),
  TETRAWELL_RATE_LIMIT_VERIFY: z.coerce.number().int().positive().optional(),
  TETRAWELL_RATE_LIMIT_RESET_CONFIRM: z.coerce.number().int().positive().optional(),
  TETRAWELL_RATE_LIMIT_PASSWORD_CHANGE: z.coerce.number().int().positive().optional(),
  NODE_ENV: z.string().optional(),
});

function trustProxy(v: string | undefined): boolean | number | string {
  if (v === undefined || v === '' || v === 'false') return false;
  if (v === 'true') return true;
  return /^\d+$/.test(v) ? Number(v) : v;
}

async function main(): Promise<void> {
  const parsed = envSchema.safeParse(Object.fromEntries(Object.entries(process.env).filter(([, v]) => v !== '')));
  if (!parsed.success) {
    for (const issue of parsed.error.issues) console.error(`Configuration: ${issue.path.join('.')}: ${issue.message}`);
    process.exit(2);
  }
  const env = parsed.data;
  if (env.NODE_ENV === 'production' && !env.SESSION_SECRET) {
    console.error('Configuration: SESSION_SECRET must be set when NODE_ENV=production.');
    process.exit(2);
  }

  let mailPlan: MailPlan;
  try {
    mailPlan = planMail(env);
  } catch (err) {
    console.error(`Configuration: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(2);
  }

  let fake: FakeSmtp | null = null;
  let fakeKnex: ReturnType<typeof createKnex> | null = null;
  let smtp: SmtpConfig | undefined;
  if (mailPlan.kind === 'smtp' && env.SMTP_HOST) {
    smtp = { host: env.SMTP_HOST, port: env.SMTP_PORT, secure: env.SMTP_SECURE, user: env.SMTP_USER, pass: env.SMTP_PASS };
  } else if (mailPlan.kind === 'fake') {
    fakeKnex = createKnex(env.DATABASE_URL, { poolMax: 2 });
    try {
      fake = await startFakeSmtp({ port: mailPlan.port, knex: fakeKnex });
    } catch (err) {
      const busy = (err as { code?: string }).code === 'EADDRINUSE';
      console.error(
        busy
          ? `Port ${env.TETRAWELL_FAKE_SMTP_PORT} for the development mail sink is taken: set TETRAWELL_FAKE_SMTP_PORT to a free port.`
          : `Could not start the development mail sink: ${err instanceof Error ? err.message : String(err)}`,
      );
      await fakeKnex.destroy();
      process.exit(1);
    }
    smtp = { host: fake.host, port: fake.port, secure: false };
    console.log(`Development mail sink on smtp://${fake.host}:${fake.port} (messages appear in the app's mail room for site admins).`);
  }

  let server: RunningServer;
  try {
    server = await start({
      port: env.PORT,
      host: env.HOST,
      databaseUrl: env.DATABASE_URL,
      sessionSecret: env.SESSION_SECRET,
      publicUrl: env.PUBLIC_URL,
      smtp,
      mailFrom: env.MAIL_FROM,
      trustProxy: trustProxy(env.TRUST_PROXY),
      cookieSecure: env.COOKIE_SECURE === 'auto' ? 'auto' : env.COOKIE_SECURE === 'true',
      rateLimits: rateLimitsFromEnv(env),
      jobs: { workers: env.TETRAWELL_WORKERS, settings: jobSettingsFromEnv(env) },
    });
  } catch (err) {
    const busy = (err as { code?: string }).code === 'EADDRINUSE';
    console.error(busy ? `Port ${env.PORT} on ${env.HOST} is taken: stop whatever uses it or set PORT.` : `Could not start the server: ${err instanceof Error ? err.message : String(err)}`);
    await fake?.stop();
    await fakeKnex?.destroy();
    process.exit(1);
  }
  console.log(`Tetrawell is listening on ${server.url}`);

  let shuttingDown = false;
  const shutdown = async (signal: string) => {
    if (shuttingDown) {
      console.error(`${signal} again: exiting without waiting.`);
      process.exit(1);
    }
    shuttingDown = true;
    console.log(`${signal}: stopping the server…`);
    await server.stop();
    await fake?.stop();
    await fakeKnex?.destroy();
    console.log('Server stopped.');
    process.exit(0);
  };
  process.on('SIGINT', () => void shutdown('SIGINT'));
  process.on('SIGTERM', () => void shutdown('SIGTERM'));
}

void main();
