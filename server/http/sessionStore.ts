/**
 * The session store: connect-pg-simple's, with one change on the hot path. Reading a session also reads the
 * account it is signed in as, in the same query, so a signed-in request costs one database round trip for
 * "who is this" instead of two (session row, then user row in passport's deserializeUser).
 *
 * Nothing is cached: the user row is read at the same moment as the session row, on every request, so
 * sign-out (row deleted), a password change (other rows deleted), a role change and account removal take
 * effect at the very next request, exactly as before. The user travels from `get` to `deserializeUser` on the
 * session's own `passport` object (express-session copies that object by reference into `req.session`), held
 * in a WeakMap, so nothing outlives the request and two requests never see each other's rows.
 */
import type session from 'express-session';
import type { Request, RequestHandler } from 'express';
import { createRequire } from 'node:module';
import connectPgSimple from 'connect-pg-simple';
import type pg from 'pg';
import type { SiteRole } from '@contracts/roles';
import type { User } from '@contracts/api';

interface SessionUserRow {
  sess: unknown;
  user_id: number | null;
  email: string | null;
  display_name: string | null;
  site_role: SiteRole | null;
  version: number | null;
}

// `passport.user` is the numeric user id (serializeUser in app.ts); anything else joins no user. The regular
// expression keeps the cast from failing on a malformed row, and the join stays a primary-key lookup.
// `expire >= to_timestamp($2)` is connect-pg-simple's own test, with its own clock (whole seconds, rounded up).
const GET_WITH_USER = `
  SELECT s.sess, u.id AS user_id, u.email, u.display_name, u.site_role, u.version
  FROM sessions s
  LEFT JOIN users u ON u.id = CASE WHEN (s.sess -> 'passport' ->> 'user') ~ '^[0-9]{1,9}$'
                                   THEN (s.sess -> 'passport' ->> 'user')::int END
  WHERE s.sid = $1 AND s.expire >= to_timestamp($2)`;

// the signed-in account alone, for the session-free reads below: only a live session naming an existing account
// gives a row (same expiry test and same join as GET_WITH_USER)
const SIGNED_IN_USER = `
  SELECT u.id AS user_id, u.email, u.display_name, u.site_role, u.version
  FROM sessions s
  JOIN users u ON u.id = CASE WHEN (s.sess -> 'passport' ->> 'user') ~ '^[0-9]{1,9}$'
                              THEN (s.sess -> 'passport' ->> 'user')::int END
  WHERE s.sid = $1 AND s.expire >= to_timestamp($2)`;

// express-session's own cookie parser and signature check (its dependencies, resolved from its folder), so the
// session-free path reads exactly the session id express-session would read from the same header
const fromSessionModule = createRequire(createRequire(import.meta.url).resolve('express-session'));
const cookieModule = fromSessionModule('cookie') as { parse(header: string): Record<string, string | undefined> };
const signature = fromSessionModule('cookie-signature') as { unsign(value: string, secret: string): string | false };

/** The session id in a `Cookie` header, as express-session reads it (`s:` + signed id), or null. */
export function signedSessionId(header: string | undefined, cookieName: string, secrets: string[]): string | null {
  if (!header) return null;
  const raw = cookieModule.parse(header)[cookieName];
  if (!raw || raw.slice(0, 2) !== 's:') return null;
  for (const secret of secrets) {
    const sid = signature.unsign(raw.slice(2), secret);
    if (sid !== false) return sid;
  }
  return null;
}

export interface SessionStoreWithUsers {
  store: session.Store & { close(): void };
  /**
   * The account read with this request's session: a User, false when the session names an account that no
   * longer exists, undefined when the session was not read by `get` in this request (then ask the database).
   */
  userOf(req: Request): User | false | undefined;
  /**
   * Session-free reads (issue 10's load target): for a GET whose path matches `paths`, carrying a valid signed
   * session cookie of a live session whose account exists, and no Authorization header, this middleware sets
   * `req.user` from one query and the request skips express-session and passport (`unlessSessionFree`). Such a
   * request changes nothing in its session (resave and rolling are off and nothing writes to it), so express-session
   * would neither store nor send anything, and the answer is the same bytes. Anything else (no or bad cookie,
   * expired or unknown session, account gone, Bearer token, other paths and methods) goes the usual way, which
   * answers as before (401, a new anonymous session, passport dropping a vanished account). Nothing is cached:
   * the session row and account are read at this request, so sign-out and role changes apply at once.
   */
  sessionFreeReads(opts: { cookieName: string; secrets: string[]; paths: RegExp }): RequestHandler;
  /** `handler`, skipped for a request `sessionFreeReads` has served (express-session, passport) */
  unlessSessionFree(handler: RequestHandler): RequestHandler;
}

export function createSessionStore(
  sessionModule: typeof session,
  pool: pg.Pool,
  opts: { pruneSessionIntervalSeconds: number; errorLog: (...args: unknown[]) => void },
): SessionStoreWithUsers {
  const PgStore = connectPgSimple(sessionModule);
  const users = new WeakMap<object, User | false>();

  class PgStoreWithUsers extends PgStore {
    override get(sid: string, fn: (err: unknown, sess?: session.SessionData | null) => void): void {
      // a named prepared statement: each pooled connection parses and plans it once, not on every request
      pool.query<SessionUserRow>({ name: 'tetrawell-session-with-user', text: GET_WITH_USER, values: [sid, Math.ceil(Date.now() / 1000)] }).then(
        (res) => {
          const row = res.rows[0];
          // express-session reads null as "no such session"
          if (!row) return fn(null);
          let sess: session.SessionData & { passport?: { user?: unknown } };
          try {
            sess = (typeof row.sess === 'string' ? JSON.parse(row.sess) : row.sess) as typeof sess;
          } catch {
            // connect-pg-simple's behaviour for an unreadable row: drop it, no session
            return this.destroy(sid, (e) => fn(e ?? null));
          }
          const p = sess.passport;
          if (p && typeof p === 'object' && p.user !== undefined) {
            users.set(
              p,
              row.user_id === null
                ? false
                : { id: row.user_id, email: row.email!, displayName: row.display_name!, siteRole: row.site_role!, version: row.version! },
            );
          }
          fn(null, sess);
        },
        // express-session reads an error coded ENOENT as "no such session" (a file store's missing file) and would
        // carry on signed out; a stopped PostgreSQL's Unix-domain socket fails with exactly that code, so hand it on
        // wrapped (the error middleware still finds the cause and answers 503)
        (err: unknown) => fn((err as { code?: unknown } | null)?.code === 'ENOENT' ? new Error(`the session could not be read: ${(err as Error).message}`, { cause: err }) : err),
      );
    }
  }

  const store = new PgStoreWithUsers({
    pool,
    tableName: 'sessions',
    createTableIfMissing: false,
    // expired rows (mostly short anonymous sessions) are deleted this often (±50 %, randomised by the store)
    pruneSessionInterval: opts.pruneSessionIntervalSeconds,
    // No UPDATE of the row's expiry on every request: the browser's cookie is not renewed either (rolling: false),
    // so a sign-in lasts sessionMaxAgeMs from sign-in whatever the store does; the write per request only cost time.
    disableTouch: true,
    errorLog: opts.errorLog,
  });
  // connect-pg-simple arms its prune timer from get/set/destroy; our get does not call it, so prune once now
  // (which arms the timer): a server that only serves reads still deletes expired rows
  store.pruneSessions();

  const sessionFree = new WeakSet<Request>();
  return {
    store,
    sessionFreeReads({ cookieName, secrets, paths }) {
      return (req, _res, next) => {
        if (req.method !== 'GET' || req.headers.authorization !== undefined || !paths.test(req.path)) return next();
        const sid = signedSessionId(req.headers.cookie, cookieName, secrets);
        if (sid === null) return next();
        pool.query<SessionUserRow>({ name: 'tetrawell-signed-in-user', text: SIGNED_IN_USER, values: [sid, Math.ceil(Date.now() / 1000)] }).then(
          (res) => {
            const row = res.rows[0];
            if (!row || row.user_id === null) return next();
            req.user = { id: row.user_id, email: row.email!, displayName: row.display_name!, siteRole: row.site_role!, version: row.version! };
            sessionFree.add(req);
            next();
          },
          // the same error the session store's get hands on (ENOENT wrapped: see get above), so the same 503
          (err: unknown) => next((err as { code?: unknown } | null)?.code === 'ENOENT' ? new Error(`the session could not be read: ${(err as Error).message}`, { cause: err }) : err),
        );
      };
    },
    unlessSessionFree(handler) {
      return (req, res, next) => (sessionFree.has(req) ? next() : handler(req, res, next));
    },
    userOf(req) {
      const p = (req.session as { passport?: unknown } | undefined)?.passport;
      return p && typeof p === 'object' ? users.get(p) : undefined;
    },
  };
}
