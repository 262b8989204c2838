/**
 * Server configuration: what `start()` accepts and the resolved settings the layers read.
 * Environment variables are read only in server/main.ts; everything below is plain values,
 * so tests can start the real server with their own settings.
 */
import type { MailQueueSettings } from './mail/queue';
import type { JobSettings } from './jobs/settings';

export interface Logger {
  info(...args: unknown[]): void;
  warn(...args: unknown[]): void;
  error(...args: unknown[]): void;
}

export const consoleLogger: Logger = {
  info: (...a) => console.log(...a),
  warn: (...a) => console.warn(...a),
  error: (...a) => console.error(...a),
};

export const silentLogger: Logger = { info() {}, warn() {}, error() {} };

export interface SmtpConfig {
  host: string;
  port: number;
  /** true: TLS from the first byte (port 465); false: plain, upgraded with STARTTLS when the server offers it */
  secure?: boolean;
  user?: string;
  pass?: string;
}

export interface RateLimitRule {
  windowMs: number;
  /** requests per window per key (the client address unless the rule says otherwise) */
  limit: number;
}

export interface RateLimits {
  /**
   * failed sign-ins per account (the e-mail typed) and client address: one person's typos lock out only that
   * account from that address, never colleagues behind the same address; successful sign-ins do not count
   */
  signIn: RateLimitRule;
  /** failed sign-ins per client address over all accounts: a looser ceiling against password spraying */
  signInAddress: RateLimitRule;
  signUp: RateLimitRule;
  /** password-reset requests: each one may send an e-mail */
  passwordReset: RateLimitRule;
  /** e-mail confirmation (POST /api/auth/verify): guessing link tokens */
  verifyEmail: RateLimitRule;
  /** setting a new password with a reset link (POST /api/auth/password-reset/confirm) */
  resetConfirm: RateLimitRule;
  /** password change while signed in (POST /api/account/password): guessing the current password */
  passwordChange: RateLimitRule;
}

/** Jobs in this process (server/jobs). */
export interface JobOptionsConfig {
  /** job workers run inside this process (each runs one job at a time in a worker thread); 0 for none */
  workers?: number;
  settings?: Partial<JobSettings>;
  /** how often an idle worker asks the queue for work (ms) */
  pollIntervalMs?: number;
}

export interface ServerOptions {
  /** 0 picks a free port */
  port?: number;
  /** listen address; loopback unless told otherwise */
  host?: string;
  databaseUrl: string;
  /** signs the session cookie; a random one is generated when absent (sessions then end at restart) */
  sessionSecret?: string;
  /** base of links in e-mails, e.g. https://tetrawell.example.org; defaults to the listening URL */
  publicUrl?: string;
  /** where mail goes; without it, mail is logged and dropped */
  smtp?: SmtpConfig;
  mailFrom?: string;
  /** Express "trust proxy" setting: set when a TLS-terminating proxy sits in front */
  trustProxy?: boolean | number | string;
  /** Secure cookie flag: 'auto' sets it whenever the request arrived over HTTPS (via the proxy when trusted) */
  cookieSecure?: boolean | 'auto';
  rateLimits?: Partial<RateLimits>;
  /** folder of the built client; null disables static serving; default dist/app */
  staticDir?: string | null;
  logger?: Logger;
  /** largest JSON body (express.json syntax), taken by design saves; other routes take at most min(this, 1 MB) */
  bodyLimit?: string;
  /** design bodies above this many bytes are parsed and validated in a worker thread (256 KiB) */
  offThreadBodyBytes?: number;
  /** bcrypt cost factor; 12 by default (OWASP password storage guidance recommends ≥10; common practice) */
  bcryptRounds?: number;
  invitationTtlHours?: number;
  passwordResetTtlMinutes?: number;
  /** how long a sign-up confirmation link works */
  emailVerificationTtlHours?: number;
  /** lifetime of a signed-in session, from sign-in (7 days) */
  sessionMaxAgeMs?: number;
  /** lifetime of a session nobody has signed in to (it holds only the CSRF secret): 1 hour */
  anonymousSessionMaxAgeMs?: number;
  /** how often expired session rows are deleted (5 minutes) */
  sessionPruneIntervalSeconds?: number;
  jobs?: JobOptionsConfig;
  /** retries and polling of the mail queue (server/mail/queue.ts); the queue's name takes `jobs.settings.queuePrefix` */
  mailQueue?: Partial<MailQueueSettings>;
}

/**
 * Sized for MAX_SITES (100,000) sites: such a document with every optional field at typical lengths is ~17 MB of
 * compact JSON (measured by tests/bench/load.bench.ts); 40 MB leaves room for long ids and labels.
 */
export const DEFAULT_BODY_LIMIT = '40mb';

export interface ResolvedConfig {
  publicUrl: string;
  mailFrom: string;
  bcryptRounds: number;
  invitationTtlMs: number;
  passwordResetTtlMs: number;
  emailVerificationTtlMs: number;
}

// Defaults: common practice for a small internal tool, not from a standard.
export const DEFAULT_RATE_LIMITS: RateLimits = {
  signIn: { windowMs: 15 * 60_000, limit: 10 },
  signInAddress: { windowMs: 15 * 60_000, limit: 100 },
  signUp: { windowMs: 60 * 60_000, limit: 20 },
  passwordReset: { windowMs: 60 * 60_000, limit: 10 },
  verifyEmail: { windowMs: 15 * 60_000, limit: 20 },
  resetConfirm: { windowMs: 15 * 60_000, limit: 20 },
  passwordChange: { windowMs: 15 * 60_000, limit: 20 },
};

export interface RateLimitEnv {
  NODE_ENV?: string;
  TETRAWELL_RATE_LIMIT_SIGN_IN?: number;
  TETRAWELL_RATE_LIMIT_SIGN_IN_ADDRESS?: number;
  TETRAWELL_RATE_LIMIT_SIGN_UP?: number;
  TETRAWELL_RATE_LIMIT_RESET?: number;
  TETRAWELL_RATE_LIMIT_VERIFY?: number;
  TETRAWELL_RATE_LIMIT_RESET_CONFIRM?: number;
  TETRAWELL_RATE_LIMIT_PASSWORD_CHANGE?: number;
}

/** Limits from the environment; NODE_ENV=test lifts the defaults (not explicit settings) to 1000. */
export function rateLimitsFromEnv(env: RateLimitEnv): RateLimits {
  const base = (limit: number) => (env.NODE_ENV === 'test' ? Math.max(limit, 1000) : limit);
  const rule = (key: keyof RateLimits, explicit: number | undefined): RateLimitRule => ({
    ...DEFAULT_RATE_LIMITS[key],
    limit: explicit ?? base(DEFAULT_RATE_LIMITS[key].limit),
  });
  return {
    signIn: rule('signIn', env.TETRAWELL_RATE_LIMIT_SIGN_IN),
    signInAddress: rule('signInAddress', env.TETRAWELL_RATE_LIMIT_SIGN_IN_ADDRESS),
    signUp: rule('signUp', env.TETRAWELL_RATE_LIMIT_SIGN_UP),
    passwordReset: rule('passwordReset', env.TETRAWELL_RATE_LIMIT_RESET),
    verifyEmail: rule('verifyEmail', env.TETRAWELL_RATE_LIMIT_VERIFY),
    resetConfirm: rule('resetConfirm', env.TETRAWELL_RATE_LIMIT_RESET_CONFIRM),
    passwordChange: rule('passwordChange', env.TETRAWELL_RATE_LIMIT_PASSWORD_CHANGE),
  };
}

/** Where outgoing mail goes, decided from the environment by server/main.ts. */
export type MailPlan = { kind: 'smtp' } | { kind: 'fake'; port: number } | { kind: 'none' };

/**
 * A real SMTP_HOST wins; otherwise the loopback mail sink when a port is given. Production
 * refuses the sink (it would swallow every sign-up confirmation and reset link) and refuses
 * to run without a real SMTP server: the Error's message tells the operator what to set.
 */
export function planMail(env: { NODE_ENV?: string; SMTP_HOST?: string; TETRAWELL_FAKE_SMTP_PORT?: number }): MailPlan {
  if (env.SMTP_HOST) return { kind: 'smtp' };
  if (env.NODE_ENV === 'production') {
    throw new Error(
      env.TETRAWELL_FAKE_SMTP_PORT !== undefined
        ? 'NODE_ENV=production does not run the development mail sink (TETRAWELL_FAKE_SMTP_PORT): set SMTP_HOST (and SMTP_PORT, SMTP_USER, SMTP_PASS, MAIL_FROM) to a real SMTP server.'
        : 'NODE_ENV=production needs a real SMTP server for sign-up confirmations and password resets: set SMTP_HOST (and SMTP_PORT, SMTP_USER, SMTP_PASS, MAIL_FROM).',
    );
  }
  return env.TETRAWELL_FAKE_SMTP_PORT !== undefined ? { kind: 'fake', port: env.TETRAWELL_FAKE_SMTP_PORT } : { kind: 'none' };
}
