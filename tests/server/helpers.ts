/**
 * Test helpers for the server: the real server from `start({ port: 0 })` on the migrated test
 * database (DATABASE_URL), a fake SMTP server on port 0 that stores mail in `captured_mail`,
 * and clients that keep a cookie jar and send the CSRF header like the browser app does.
 *
 * Every test makes its own rows (random e-mail suffixes), so test files can run in parallel
 * against one database.
 */
import { randomBytes } from 'node:crypto';
import { readdirSync, readFileSync } from 'node:fs';
import supertest from 'supertest';
import { expect } from 'vitest';
import type { Knex } from 'knex';
import type { User } from '@contracts/api';
import { start, type RunningServer } from '../../server/index';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fakeSmtp';
import { createKnex } from '../../server/db/config';
import { migrateLatest } from '../../server/db/migrate';
import type { Logger, RateLimits, ServerOptions } from '../../server/config';

export function testDatabaseUrl(): string {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL must point at the (migrated) test database; `npm test` sets it.');
  return url;
}

/** Generous limits so ordinary tests never trip them; the rate-limit test sets small ones. */
export const RELAXED_LIMITS: RateLimits = {
  signIn: { windowMs: 60_000, limit: 100_000 },
  signInAddress: { windowMs: 60_000, limit: 100_000 },
  signUp: { windowMs: 60_000, limit: 100_000 },
  passwordReset: { windowMs: 60_000, limit: 100_000 },
  verifyEmail: { windowMs: 60_000, limit: 100_000 },
  resetConfirm: { windowMs: 60_000, limit: 100_000 },
  passwordChange: { windowMs: 60_000, limit: 100_000 },
};

/** Server errors are printed (a 500 in a test run is worth seeing); the rest stays quiet. */
const testLogger: Logger = { info() {}, warn() {}, error: (...a) => console.error('[server]', ...a) };

export interface TestEnv {
  server: RunningServer;
  smtp: FakeSmtp;
  /** the test's own connection, for setup rows and counting */
  knex: Knex;
  url: string;
  /** base of the links in e-mails (PUBLIC_URL, or the server's URL when none was given) */
  mailBase: string;
  client(): TestClient;
  stop(): Promise<void>;
}

export async function startTestEnv(opts: Partial<ServerOptions> = {}): Promise<TestEnv> {
  const databaseUrl = testDatabaseUrl();
  await migrateLatest(databaseUrl); // no-op when `npm test` already migrated
  const knex = createKnex(databaseUrl, { poolMax: 4 });
  const smtp = await startFakeSmtp({ port: 0, knex });
  const server = await start({
    port: 0,
    databaseUrl,
    sessionSecret: randomBytes(24).toString('hex'),
    smtp: { host: smtp.host, port: smtp.port },
    // bcrypt's cost factor changes only the time taken, not the behaviour under test
    bcryptRounds: 4,
    rateLimits: RELAXED_LIMITS,
    staticDir: null,
    logger: testLogger,
    // mail leaves through the queue (server/mail/queue.ts): a retry a second after a failure, not five
    mailQueue: { retryDelaySeconds: 1, pollSeconds: 0.5 },
    ...opts,
    // each test server its own queue names, so one file's server never takes (and, stopping, strands) another
    // file's mail or jobs; a file that names a prefix keeps it
    jobs: { ...opts.jobs, settings: { queuePrefix: `t${randomBytes(4).toString('hex')}-`, ...opts.jobs?.settings } },
  });
  const mailBase = (opts.publicUrl ?? server.url).replace(/\/+$/, '');
  return {
    server,
    smtp,
    knex,
    url: server.url,
    mailBase,
    client: () => new TestClient(server.url, { knex, mailBase }),
    async stop() {
      await server.stop();
      await smtp.stop();
      await knex.destroy();
    },
  };
}

export function uniqueEmail(prefix = 'user'): string {
  return `${prefix}-${randomBytes(5).toString('hex')}@lab.test`;
}

export const TEST_PASSWORD = 'correct-horse-battery-9';

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

/**
 * A browser-like client: keeps cookies, fetches the CSRF token, sends it on every
 * state-changing request, and refetches it after sign-in/sign-out (the session is
 * regenerated there, which drops the old token).
 */
export class TestClient {
  readonly agent: ReturnType<typeof supertest.agent>;
  csrf: string | null = null;
  user: User | null = null;

  constructor(
    readonly url: string,
    /** where the client reads its e-mail (the fake SMTP server's captured_mail) and the links' base */
    readonly mailbox: { knex: Knex; mailBase: string } | null = null,
  ) {
    this.agent = supertest.agent(url);
  }

  async refreshCsrf(): Promise<string> {
    const r = await this.agent.get('/api/auth/csrf').expect(200);
    this.csrf = r.body.csrfToken as string;
    return this.csrf;
  }

  /** a request with the CSRF header for state-changing methods; `csrf: false` sends none */
  async request(method: Method, path: string, body?: unknown, opts: { csrf?: boolean } = {}) {
    const sendToken = method !== 'get' && opts.csrf !== false;
    // fetch the token first: the agent attaches its cookies when a request is created
    const token = sendToken ? (this.csrf ?? (await this.refreshCsrf())) : null;
    let req = this.agent[method](path);
    if (token) req = req.set('x-csrf-token', token);
    if (body !== undefined) req = req.send(body as object);
    return req;
  }

  get(path: string) {
    return this.request('get', path);
  }
  post(path: string, body?: unknown) {
    return this.request('post', path, body ?? {});
  }
  put(path: string, body?: unknown) {
    return this.request('put', path, body ?? {});
  }
  patch(path: string, body?: unknown) {
    return this.request('patch', path, body ?? {});
  }
  delete(path: string) {
    return this.request('delete', path);
  }

  /**
   * The whole sign-up as a person does it: the form (202 "check your e-mail"), the
   * confirmation mail read from the fake SMTP server, the link's token posted to
   * /api/auth/verify, which signs in. Resolves to the signed-in user.
   */
  async signUp(email = uniqueEmail(), password = TEST_PASSWORD, displayName = `Tester ${email.slice(0, 12)}`): Promise<User> {
    if (!this.mailbox) throw new Error('signUp needs a client with a mailbox (TestEnv.client())');
    const { knex, mailBase } = this.mailbox;
    const sinceId = await lastMailId(knex);
    const r = await this.post('/api/auth/sign-up', { email, password, displayName });
    if (r.status !== 202) throw new Error(`sign-up failed: ${r.status} ${JSON.stringify(r.body)}`);
    const mail = await waitForMail(knex, email, VERIFY_SUBJECT, { sinceId });
    return this.verify(linkToken(mail.text, mailBase, 'verify'));
  }

  /** Post a confirmation token (signs in on success); throws unless 200. */
  async verify(token: string): Promise<User> {
    const r = await this.post('/api/auth/verify', { token });
    if (r.status !== 200) throw new Error(`verify failed: ${r.status} ${JSON.stringify(r.body)}`);
    this.user = r.body.user as User;
    await this.refreshCsrf();
    return this.user;
  }

  async signIn(email: string, password = TEST_PASSWORD): Promise<User> {
    const r = await this.post('/api/auth/sign-in', { email, password });
    if (r.status !== 200) throw new Error(`sign-in failed: ${r.status} ${JSON.stringify(r.body)}`);
    this.user = r.body.user as User;
    await this.refreshCsrf();
    return this.user;
  }

  async signOut(): Promise<void> {
    const r = await this.post('/api/auth/sign-out');
    if (r.status !== 204) throw new Error(`sign-out failed: ${r.status} ${JSON.stringify(r.body)}`);
    this.user = null;
    await this.refreshCsrf();
  }
}

/** A new account, signed in, with its own client. */
export async function newUser(env: TestEnv, prefix = 'user'): Promise<{ client: TestClient; user: User; email: string }> {
  const client = env.client();
  const email = uniqueEmail(prefix);
  const user = await client.signUp(email);
  return { client, user, email };
}

export interface CapturedMailRow {
  id: number;
  recipients: string[];
  subject: string;
  text: string;
}

/** Subject of the sign-up confirmation mail (server/mail/templates.ts). */
export const VERIFY_SUBJECT = /Confirm your e-mail address/;

/** Id of the newest captured message (0 when none): pass as `sinceId` to wait only for later mail. */
export async function lastMailId(knex: Knex): Promise<number> {
  const r = await knex('captured_mail').max<{ m: number | null }[]>({ m: 'id' });
  return Number(r[0]?.m ?? 0);
}

/**
 * Wait (up to `timeoutMs`) for a captured message to `to` whose subject matches; newest first.
 * `sinceId` skips messages up to that id (mail sent before the step under test).
 */
export async function waitForMail(
  knex: Knex,
  to: string,
  subject: RegExp,
  opts: number | { timeoutMs?: number; sinceId?: number } = {},
): Promise<CapturedMailRow> {
  const { timeoutMs = 8_000, sinceId = 0 } = typeof opts === 'number' ? { timeoutMs: opts } : opts;
  const until = Date.now() + timeoutMs;
  for (;;) {
    const rows = (await knex('captured_mail')
      .whereRaw('recipients @> ?::jsonb', [JSON.stringify([to.toLowerCase()])])
      .where('id', '>', sinceId)
      .orderBy('id', 'desc')) as CapturedMailRow[];
    const hit = rows.find((r) => subject.test(r.subject));
    if (hit) return hit;
    if (Date.now() > until) throw new Error(`no mail to ${to} matching ${subject} within ${timeoutMs} ms`);
    // mail leaves after the HTTP answer: poll briefly rather than sleep long
    await new Promise((r) => setTimeout(r, 25));
  }
}

/**
 * Wait (up to `timeoutMs`) until `to` has `n` captured messages. Mail leaves through the queue after the HTTP
 * answer (server/mail/queue.ts), so a count right after a request may still be short.
 */
export async function waitForMailCount(knex: Knex, to: string, n: number, timeoutMs = 8_000): Promise<number> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const got = await countMail(knex, to);
    if (got >= n || Date.now() > until) return got;
    await new Promise((r) => setTimeout(r, 25));
  }
}

export async function countMail(knex: Knex, to: string): Promise<number> {
  const r = await knex('captured_mail').whereRaw('recipients @> ?::jsonb', [JSON.stringify([to.toLowerCase()])]).count<{ n: string }[]>({ n: '*' });
  return Number(r[0].n);
}

/** The token at the end of a `${PUBLIC_URL}/<kind>/<token>` link in a mail body. */
export function linkToken(text: string, baseUrl: string, kind: 'invite' | 'reset' | 'verify'): string {
  const escaped = baseUrl.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  const m = new RegExp(`${escaped}/${kind}/([A-Za-z0-9_-]+)`).exec(text);
  if (!m) throw new Error(`no ${kind} link to ${baseUrl} in mail:\n${text}`);
  return m[1];
}

/** Make `userId` a member of `projectId` directly (test set-up, not the behaviour under test). */
export async function addMember(knex: Knex, projectId: number, userId: number, role: 'owner' | 'editor' | 'viewer'): Promise<void> {
  await knex('memberships').insert({ project_id: projectId, user_id: userId, role });
}

export async function countRows(knex: Knex, table: string): Promise<number> {
  const r = await knex(table).count<{ n: string }[]>({ n: '*' });
  return Number(r[0].n);
}

/** Session cookie value from a Set-Cookie header list. */
export function sessionCookie(setCookie: string[] | string | undefined): string | null {
  const list = Array.isArray(setCookie) ? setCookie : setCookie ? [setCookie] : [];
  const c = list.find((s) => s.startsWith('tetrawell.sid='));
  return c ? c.split(';')[0].slice('tetrawell.sid='.length) : null;
}

/**
 * Session fixation defence (OWASP Session Management): after a sign-in the id the client held
 * before is dead and the new one is live. Returns the /api/auth/me answer for the new id.
 */
export async function expectSessionRotated(url: string, before: string | null, after: string | null): Promise<supertest.Response> {
  expect(before).not.toBeNull();
  expect(after).not.toBeNull();
  expect(after).not.toBe(before);
  const replay = await supertest(url).get('/api/auth/me').set('Cookie', `tetrawell.sid=${before}`);
  expect(replay.status).toBe(401);
  const legit = await supertest(url).get('/api/auth/me').set('Cookie', `tetrawell.sid=${after}`);
  expect(legit.status).toBe(200);
  return legit;
}

/** the design-body processes started by this test process's server (server/http/designBody.child.ts) */
export function bodyProcesses(): number[] {
  const out: number[] = [];
  for (const name of readdirSync('/proc')) {
    if (!/^\d+$/.test(name)) continue;
    try {
      const stat = readFileSync(`/proc/${name}/stat`, 'utf8');
      // proc(5): "pid (comm) state ppid …"; the comm may hold spaces, so read after its last ')'
      const [state, ppid] = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      if (Number(ppid) !== process.pid || state === 'Z') continue;
      if (readFileSync(`/proc/${name}/cmdline`, 'utf8').includes('designBody.child')) out.push(Number(name));
    } catch {
      // a process that ended while being read
    }
  }
  return out;
}
