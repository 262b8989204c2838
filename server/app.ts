/**
 * The Express application: security middleware, sessions, passport, CSRF, the API routes,
 * the one error handler, and the built client with SPA fallback.
 *
 *   request ─► helmet ─► json body ─► session (PostgreSQL) ─► passport ─► /api router
 *                                                                          ├─ CSRF check (POST/PUT/PATCH/DELETE)
 *                                                                          ├─ routes (zod ─► service)
 *                                                                          └─ 404 JSON
 *            ─► static client (dist/app) ─► index.html for other GETs       ─► error handler
 */
import { pressureMiddleware, type RequestPressure } from './workers/requestPressure';
import { existsSync } from 'node:fs';
import path from 'node:path';
import express, { type Express, type RequestHandler, type Router } from 'express';
import helmet from 'helmet';
import session, { type Store } from 'express-session';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { csrfSync } from 'csrf-sync';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { User } from '@contracts/api';
import type { Logger, RateLimits, RateLimitRule } from './config';
import type { Services } from './services';
import { accessControl } from './http/access';
import { bearerAuth, csrfUnlessBearer } from './http/bearer';
import { apiNotFound, errorHandler, sendError } from './http/errors';
import { refuseUnstorableText } from './http/wellFormed';
import { jsonBodies, parseByteSize } from './http/bodies';
import { markHealthArrival } from './http/healthTiming';
import { answerHealth } from './routes/health';
import type { DesignBodyReader } from './http/designBody';
import { routeModules } from './routes';
import { SESSION_FREE_READS } from './routes/jobs';
import type { SessionStoreWithUsers } from './http/sessionStore';
import './http/types';

export interface AppDeps {
  services: Services;
  /** counts the requests being served, for the job threads of this process (server/workers/requestPressure.ts) */
  pressure?: RequestPressure;
  sessionStore: Store;
  /** the account the store read with this request's session, when it did (server/http/sessionStore.ts) */
  sessionUser?: (req: express.Request) => User | false | undefined;
  /** the busiest signed-in reads without express-session and passport (server/http/sessionStore.ts `sessionFreeReads`) */
  sessionFree?: Pick<SessionStoreWithUsers, 'sessionFreeReads' | 'unlessSessionFree'>;
  sessionSecret: string;
  /** lifetime of a signed-in session (cookie and stored row), counted from sign-in */
  sessionMaxAgeMs: number;
  /** lifetime of a session that holds only a CSRF secret (nobody signed in): short, so loops of anonymous requests leave little behind */
  anonymousSessionMaxAgeMs: number;
  cookieSecure: boolean | 'auto';
  trustProxy: boolean | number | string;
  rateLimits: RateLimits;
  /** folder holding the built client's index.html, or null */
  staticDir: string | null;
  /** largest JSON body, taken by design saves only; other routes take at most min(this, 1 MB) */
  bodyLimit: string;
  /** design bodies larger than this are parsed and validated in a worker thread */
  offThreadBodyBytes: number;
  designBodies: DesignBodyReader;
  logger: Logger;
}

export interface ApiRoute {
  method: string;
  /** path below /api, Express syntax, e.g. /projects/:projectId */
  path: string;
}

export const SESSION_COOKIE = 'tetrawell.sid';

function limiter(
  rule: RateLimitRule,
  what: string,
  opts: { failuresOnly?: boolean; keyGenerator?: (req: express.Request) => string; message?: string } = {},
): RequestHandler {
  return rateLimit({
    windowMs: rule.windowMs,
    limit: rule.limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    // answers below 400 give their slot back: only failures count
    skipSuccessfulRequests: opts.failuresOnly ?? false,
    ...(opts.keyGenerator ? { keyGenerator: opts.keyGenerator } : {}),
    handler: (_req, res) => {
      sendError(res, 'rate_limited', opts.message ?? `Too many ${what} attempts from this address. Wait a few minutes, then try again.`);
    },
  });
}

/** Both handlers in turn (the second only when the first let the request through). */
function both(a: RequestHandler, b: RequestHandler): RequestHandler {
  return (req, res, next) => {
    void a(req, res, (err?: unknown) => (err ? next(err) : void b(req, res, next)));
  };
}

/** Sign-in limits key on the account typed and the client address together (issue 8, item 4). */
function accountAndAddress(req: express.Request): string {
  const body = req.body as { email?: unknown } | undefined;
  const email = typeof body?.email === 'string' ? body.email.trim().toLowerCase() : '';
  // ipKeyGenerator groups an IPv6 client's /56, as express-rate-limit's default key does
  return `${ipKeyGenerator(req.ip ?? '')}|${email}`;
}

/** GET or HEAD /api/health exactly as routed (its answer depends on the database alone, never on a session) */
function isHealthPoll(req: express.Request): boolean {
  return (req.method === 'GET' || req.method === 'HEAD') && req.path === '/api/health';
}

/** GET or HEAD of exactly `/api/health`, no query string: a string comparison, no URL parsing */
function isPlainHealthPoll(req: express.Request): boolean {
  return req.url === '/api/health' && (req.method === 'GET' || req.method === 'HEAD');
}

/** The (method, path) pairs registered on the API router: lets tests prove they cover every route. */
function listRoutes(router: Router): ApiRoute[] {
  const out: ApiRoute[] = [];
  for (const layer of router.stack) {
    const route = (layer as { route?: { path: string; methods: Record<string, boolean> } }).route;
    if (!route) continue;
    for (const [method, on] of Object.entries(route.methods)) if (on && method !== '_all') out.push({ method: method.toUpperCase(), path: route.path });
  }
  return out;
}

export function createApp(deps: AppDeps): Express {
  const { services, logger } = deps;
  const app = express();
  app.disable('x-powered-by');
  const pressure = deps.pressure ? pressureMiddleware(deps.pressure) : null;
  // API answers are no-store (nothing may revalidate them), so Express's ETag, a SHA-1 over every JSON body on the
  // request thread, only cost time (tens of ms for a large design); express.static keeps its own validators
  app.set('etag', false);
  app.set('trust proxy', deps.trustProxy);

  const behindHttps = deps.cookieSecure === true || deps.trustProxy !== false;
  const securityHeaders = helmet({
      contentSecurityPolicy: {
        directives: {
          // the client is bundled; nothing is fetched from another origin at run time
          'default-src': ["'self'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'font-src': ["'self'", 'data:'],
          'style-src': ["'self'", "'unsafe-inline'"],
          'worker-src': ["'self'", 'blob:'],
          'connect-src': ["'self'"],
          // upgrading requests only makes sense when the site is served over HTTPS
          'upgrade-insecure-requests': behindHttps ? [] : null,
        },
      },
      // HSTS is ignored over plain HTTP anyway; only claim it when the site is served over HTTPS
      strictTransportSecurity: behindHttps ? { maxAge: 31_536_000, includeSubDomains: true } : false,
    });

  // GET /api/health (exactly that, no query string) is answered first, with the same security headers and no-store,
  // before bodies, sessions, passport, token and CSRF checks and the API router: its answer depends on the database
  // alone. Through the whole stack each poll cost the request thread ~1.6–2.7 ms of CPU and ~50 KB of garbage
  // (load bench, 2-core machine: about as much main-thread time as the 100,000-site PUTs it was polled beside, and a
  // young-generation collection every few seconds; issue 8, item 7). A poll with a query string takes the usual way.
  const health = answerHealth(services);
  app.use((req, res, next) => {
    if (!isPlainHealthPoll(req)) return next();
    markHealthArrival(req);
    const answer = () =>
      securityHeaders(req, res, (err?: unknown) => {
        if (err) return next(err);
        // what the API router sets on every answer (below)
        res.setHeader('Cache-Control', 'no-store');
        Promise.resolve(health(req, res, next)).catch(next);
      });
    // counted by the job threads' request pressure like any request
    if (pressure) pressure(req, res, answer);
    else answer();
  });
  if (pressure) app.use(pressure);
  app.use(securityHeaders);
  app.use(jsonBodies({ designLimit: parseByteSize(deps.bodyLimit), offThreadBytes: deps.offThreadBodyBytes }));
  // PostgreSQL text and jsonb cannot hold U+0000 or a lone surrogate: refuse them at the door (400 / 422 naming
  // the field) rather than fail in the database (500) or be changed silently (jsonb stores U+FFFD)
  app.use(refuseUnstorableText);

  // the jobs and revisions lists polled while jobs run: the signed-in account from one query, then straight on
  // (express-session and passport skipped; same answers, see sessionFreeReads); every other request as below
  // and a health poll with a query string (a plain one never gets here) needs no session either
  const unlessSessionFree = deps.sessionFree?.unlessSessionFree ?? ((h: RequestHandler) => h);
  const skipIfSessionFree = (h: RequestHandler): RequestHandler => {
    const usual = unlessSessionFree(h);
    return (req, res, next) => (isHealthPoll(req) ? next() : usual(req, res, next));
  };
  if (deps.sessionFree) app.use(deps.sessionFree.sessionFreeReads({ cookieName: SESSION_COOKIE, secrets: [deps.sessionSecret], paths: SESSION_FREE_READS }));
  app.use(
    skipIfSessionFree(session({
      name: SESSION_COOKIE,
      store: deps.sessionStore,
      secret: deps.sessionSecret,
      resave: false,
      saveUninitialized: false,
      cookie: { httpOnly: true, sameSite: 'lax', secure: deps.cookieSecure, maxAge: deps.sessionMaxAgeMs },
    })),
  );

  // A passport instance of our own (not the module singleton) so several apps can live in one process (tests).
  const pass = new passport.Passport();
  pass.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      services.auth.verifyCredentials(email, password).then((u) => done(null, u ?? false), done);
    }),
  );
  pass.serializeUser<number>((user, done) => done(null, (user as User).id));
  // three parameters: passport then passes the request first
  pass.deserializeUser<number>((req: express.Request, id: number, done: (err: unknown, user?: User | false) => void) => {
    // the store read the account with the session row (one round trip for both); false = the account is gone
    const read = deps.sessionUser?.(req);
    if (read !== undefined && (read === false || read.id === id)) return done(null, read);
    // a deleted account simply ends the session (false = signed out)
    services.auth.getUser(id).then((u) => done(null, u ?? false), done);
  });
  app.use(skipIfSessionFree(pass.initialize()));
  app.use(skipIfSessionFree(pass.session()));
  // a personal API token replaces the session's user for this request (server/http/bearer.ts)
  app.use('/api', bearerAuth(services));
  // Nobody signed in: the session, if it is stored at all (saveUninitialized: false; csrf-sync keeps its secret in
  // it), lives `anonymousSessionMaxAgeMs`. Sign-in regenerates the session, which brings back the full lifetime.
  // originalMaxAge too: express-session resets maxAge to it before saving.
  app.use((req, _res, next) => {
    if (!req.user && req.session) {
      req.session.cookie.originalMaxAge = deps.anonymousSessionMaxAgeMs;
      req.session.cookie.maxAge = deps.anonymousSessionMaxAgeMs;
    }
    next();
  });

  const { generateToken, csrfSynchronisedProtection } = csrfSync({
    getTokenFromRequest: (req) => {
      const h = req.headers['x-csrf-token'];
      return Array.isArray(h) ? h[0] : h;
    },
  });

  const api = express.Router();
  // API answers hold account and project data: no browser or proxy cache may keep them (OWASP Session
  // Management cheat sheet, "Web content caching")
  api.use((_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  api.use(csrfUnlessBearer(csrfSynchronisedProtection));
  const routeDeps = {
    services,
    designBodies: deps.designBodies,
    access: accessControl(services),
    authenticateLocal: (req: express.Request, res: express.Response) =>
      new Promise<User | false>((resolve, reject) => {
        pass.authenticate('local', { session: false }, (err: unknown, user: User | false) => (err ? reject(err) : resolve(user)))(req, res, reject);
      }),
    generateCsrfToken: (req: express.Request, overwrite?: boolean) => generateToken(req, overwrite),
    limiters: {
      signIn: both(
        limiter(deps.rateLimits.signInAddress, 'sign-in', {
          failuresOnly: true,
          message: 'Too many failed sign-ins from this address. Wait a few minutes, then try again.',
        }),
        limiter(deps.rateLimits.signIn, 'sign-in', {
          failuresOnly: true,
          keyGenerator: accountAndAddress,
          message: 'Too many failed sign-ins for this account from this address. Wait a few minutes, or reset the password.',
        }),
      ),
      signUp: limiter(deps.rateLimits.signUp, 'sign-up'),
      passwordReset: limiter(deps.rateLimits.passwordReset, 'password-reset'),
      verifyEmail: limiter(deps.rateLimits.verifyEmail, 'confirmation'),
      resetConfirm: limiter(deps.rateLimits.resetConfirm, 'password-reset'),
      passwordChange: limiter(deps.rateLimits.passwordChange, 'password-change'),
    },
    logger,
  };
  for (const mount of routeModules) mount(api, routeDeps);
  app.locals.apiRoutes = listRoutes(api);
  api.use(apiNotFound);
  app.use('/api', api);

  if (deps.staticDir) {
    const staticDir = deps.staticDir;
    const indexHtml = path.join(staticDir, 'index.html');
    app.use(express.static(staticDir, { index: false, maxAge: '1h' }));
    // client-side routes (/projects/3, /invite/<token>, …) all load the single page; looked up per request
    // so a client built (or rebuilt) while the server runs is picked up without a restart
    app.use((req, res, next) => {
      if (req.method !== 'GET' && req.method !== 'HEAD') return next();
      if (!existsSync(indexHtml)) {
        res.status(503).type('text/plain').send('The Tetrawell client is not built yet: run `npm run build` (npm start does this for you).');
        return;
      }
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(indexHtml);
    });
  }

  app.use(errorHandler(logger));
  return app;
}
