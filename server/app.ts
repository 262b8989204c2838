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
import { existsSync } from 'node:fs';
import path from 'node:path';
import express, { type Express, type RequestHandler, type Router } from 'express';
import helmet from 'helmet';
import session, { type Store } from 'express-session';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { csrfSync } from 'csrf-sync';
import { rateLimit } from 'express-rate-limit';
import type { User } from '@contracts/api';
import type { Logger, RateLimits, RateLimitRule } from './config';
import type { Services } from './services';
import { accessControl } from './http/access';
import { apiNotFound, errorHandler, sendError } from './http/errors';
import { routeModules } from './routes';
import './http/types';

export interface AppDeps {
  services: Services;
  sessionStore: Store;
  sessionSecret: string;
  sessionMaxAgeMs: number;
  cookieSecure: boolean | 'auto';
  trustProxy: boolean | number | string;
  rateLimits: RateLimits;
  /** folder holding the built client's index.html, or null */
  staticDir: string | null;
  bodyLimit: string;
  /** larger JSON limit for the requests that carry a design document */
  designBodyLimit: string;
  logger: Logger;
}

export interface ApiRoute {
  method: string;
  /** path below /api, Express syntax, e.g. /projects/:projectId */
  path: string;
}

export const SESSION_COOKIE = 'tetrawell.sid';

function limiter(rule: RateLimitRule, what: string): RequestHandler {
  return rateLimit({
    windowMs: rule.windowMs,
    limit: rule.limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, res) => {
      sendError(res, 'rate_limited', `Too many ${what} attempts from this address. Wait a few minutes, then try again.`);
    },
  });
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
  app.set('trust proxy', deps.trustProxy);

  const behindHttps = deps.cookieSecure === true || deps.trustProxy !== false;
  app.use(
    helmet({
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
    }),
  );
  const jsonBody = (limit: string) =>
    express.json({
      limit,
      // PostgreSQL text and jsonb cannot hold U+0000; refuse it at the door (400) rather than fail in the database (500)
      reviver: (_key, value: unknown) => {
        if (typeof value === 'string' && value.includes('\u0000')) throw new SyntaxError('NUL character in a string');
        return value;
      },
    });
  // design documents may be ~10 MB (100,000 sites): their create and save get a larger limit; body-parser
  // marks the body as read, so the general parser below leaves it alone
  const designJson = jsonBody(deps.designBodyLimit);
  const designDocumentBody: RequestHandler = (req, res, next) => {
    // only the exact paths (req.path is what is left below the mount point): not /imports, /versions, …
    if ((req.method === 'POST' || req.method === 'PUT') && req.path === '/') designJson(req, res, next);
    else next();
  };
  // one mount per path: Express matches a path list as one layer, with only the first matching path
  app.use('/api/projects/:projectId/designs', designDocumentBody);
  app.use('/api/projects/:projectId/designs/:designId', designDocumentBody);
  app.use(jsonBody(deps.bodyLimit));

  app.use(
    session({
      name: SESSION_COOKIE,
      store: deps.sessionStore,
      secret: deps.sessionSecret,
      resave: false,
      saveUninitialized: false,
      cookie: { httpOnly: true, sameSite: 'lax', secure: deps.cookieSecure, maxAge: deps.sessionMaxAgeMs },
    }),
  );

  // A passport instance of our own (not the module singleton) so several apps can live in one process (tests).
  const pass = new passport.Passport();
  pass.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      services.auth.verifyCredentials(email, password).then((u) => done(null, u ?? false), done);
    }),
  );
  pass.serializeUser<number>((user, done) => done(null, (user as User).id));
  pass.deserializeUser<number>((id, done) => {
    // a deleted account simply ends the session (false = signed out)
    services.auth.getUser(id).then((u) => done(null, u ?? false), done);
  });
  app.use(pass.initialize());
  app.use(pass.session());

  const { generateToken, csrfSynchronisedProtection } = csrfSync({
    getTokenFromRequest: (req) => {
      const h = req.headers['x-csrf-token'];
      return Array.isArray(h) ? h[0] : h;
    },
  });

  const api = express.Router();
  api.use(csrfSynchronisedProtection);
  const routeDeps = {
    services,
    access: accessControl(services),
    authenticateLocal: (req: express.Request, res: express.Response) =>
      new Promise<User | false>((resolve, reject) => {
        pass.authenticate('local', { session: false }, (err: unknown, user: User | false) => (err ? reject(err) : resolve(user)))(req, res, reject);
      }),
    generateCsrfToken: (req: express.Request, overwrite?: boolean) => generateToken(req, overwrite),
    limiters: {
      signIn: limiter(deps.rateLimits.signIn, 'sign-in'),
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
