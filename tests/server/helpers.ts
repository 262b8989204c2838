/**
 * Test helpers for the server: the real server from `start({ port: 0 })` on the migrated test
 * database (DATABASE_URL), a fake SMTP server on port 0 that stores mail in `captured_mail`,
 * and clients that keep a cookie jar and send the CSRF header like the browser app does.
 *
 * Every test makes its own rows (random e-mail suffixes), so test files can run in parallel
 * against one database.
 */
import { randomBytes } from 'node:crypto';
import supertest from 'supertest';
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
  signUp: { windowMs: 60_000, limit: 100_000 },
  passwordReset: { windowMs: 60_000, limit: 100_000 },
};

/** Server errors are printed (a 500 in a test run is worth seeing); the rest stays quiet. */
const testLogger: Logger = { info() {}, warn() {}, error: (...a) => console.error('[server]', ...a) };

export interface TestEnv {
  server: RunningServer;
  smtp: FakeSmtp;
  /** the test's own connection, for setup rows and counting */
  knex: Knex;
  url: string;
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
    ...opts,
  });
  return {
    server,
    smtp,
    knex,
    url: server.url,
    client: () => new TestClient(server.url),
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

  constructor(readonly url: string) {
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

  async signUp(email = uniqueEmail(), password = TEST_PASSWORD, displayName = `Tester ${email.slice(0, 12)}`): Promise<User> {
    const r = await this.post('/api/auth/sign-up', { email, password, displayName });
    if (r.status !== 201) throw new Error(`sign-up failed: ${r.status} ${JSON.stringify(r.body)}`);
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

/** Wait (up to `timeoutMs`) for a captured message to `to` whose subject matches; newest first. */
export async function waitForMail(knex: Knex, to: string, subject: RegExp, timeoutMs = 8_000): Promise<CapturedMailRow> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const rows = (await knex('captured_mail')
      .whereRaw('recipients @> ?::jsonb', [JSON.stringify([to.toLowerCase()])])
      .orderBy('id', 'desc')) as CapturedMailRow[];
    const hit = rows.find((r) => subject.test(r.subject));
    if (hit) return hit;
    if (Date.now() > until) throw new Error(`no mail to ${to} matching ${subject} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

export async function countMail(knex: Knex, to: string): Promise<number> {
  const r = await knex('captured_mail').whereRaw('recipients @> ?::jsonb', [JSON.stringify([to.toLowerCase()])]).count<{ n: string }[]>({ n: '*' });
  return Number(r[0].n);
}

/** The token at the end of a `${PUBLIC_URL}/<kind>/<token>` link in a mail body. */
export function linkToken(text: string, baseUrl: string, kind: 'invite' | 'reset'): string {
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
