/**
 * Server configuration: what `start()` accepts and the resolved settings the layers read.
 * Environment variables are read only in server/main.ts; everything below is plain values,
 * so tests can start the real server with their own settings.
 */

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
  /** requests per window per client address */
  limit: number;
}

export interface RateLimits {
  signIn: RateLimitRule;
  signUp: RateLimitRule;
  /** password-reset requests: each one may send an e-mail */
  passwordReset: RateLimitRule;
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
  /** JSON body size limit (express.json syntax) */
  bodyLimit?: string;
  /** bcrypt cost factor; 12 by default (OWASP password storage guidance recommends ≥10; common practice) */
  bcryptRounds?: number;
  invitationTtlHours?: number;
  passwordResetTtlMinutes?: number;
  /** session lifetime */
  sessionMaxAgeMs?: number;
}

export interface ResolvedConfig {
  publicUrl: string;
  mailFrom: string;
  bcryptRounds: number;
  invitationTtlMs: number;
  passwordResetTtlMs: number;
}

// Defaults: common practice for a small internal tool, not from a standard.
export const DEFAULT_RATE_LIMITS: RateLimits = {
  signIn: { windowMs: 15 * 60_000, limit: 20 },
  signUp: { windowMs: 60 * 60_000, limit: 20 },
  passwordReset: { windowMs: 60 * 60_000, limit: 10 },
};

/** Limits from the environment; NODE_ENV=test lifts the defaults (not explicit settings) to 1000. */
export function rateLimitsFromEnv(env: { NODE_ENV?: string; TETRAWELL_RATE_LIMIT_SIGN_IN?: number; TETRAWELL_RATE_LIMIT_SIGN_UP?: number; TETRAWELL_RATE_LIMIT_RESET?: number }): RateLimits {
  const base = (limit: number) => (env.NODE_ENV === 'test' ? Math.max(limit, 1000) : limit);
  return {
    signIn: { ...DEFAULT_RATE_LIMITS.signIn, limit: env.TETRAWELL_RATE_LIMIT_SIGN_IN ?? base(DEFAULT_RATE_LIMITS.signIn.limit) },
    signUp: { ...DEFAULT_RATE_LIMITS.signUp, limit: env.TETRAWELL_RATE_LIMIT_SIGN_UP ?? base(DEFAULT_RATE_LIMITS.signUp.limit) },
    passwordReset: { ...DEFAULT_RATE_LIMITS.passwordReset, limit: env.TETRAWELL_RATE_LIMIT_RESET ?? base(DEFAULT_RATE_LIMITS.passwordReset.limit) },
  };
}
