import { performance } from 'node:perf_hooks';
import type { RequestHandler } from 'express';
import type { z } from 'zod';
import type { healthSchema } from '@contracts/api';
import type { Services } from '../services';
import type { RouteModule } from './context';
import { healthArrival } from '../http/healthTiming';

/**
 * GET /api/health: 200 when the database answers, 503 when it does not.
 *
 * The answer carries a `Server-Timing` header (W3C Server Timing): `db` is the probe's `select 1` round trip as this
 * poll saw it, `app` the time from the request's arrival at the app (its first middleware) to the answer, both in ms.
 * A poller that times the whole request can tell from them whether a slow poll was slow inside the server's code, at
 * the database, or before the server's event loop took the request at all (issue 8, item 7; tests/bench/load.bench.ts).
 *
 * The app answers polls with this handler before sessions, authentication, CSRF and the API router
 * (`isHealthPoll` in server/app.ts); the route below stays for the route list and for an app built without that.
 */
export function answerHealth(services: Pick<Services, 'health'>): RequestHandler {
  return async (req, res) => {
    const asked = performance.now();
    const up = await services.health.databaseUp();
    const answered = performance.now();
    const body: z.infer<typeof healthSchema> = { ok: up, database: up ? 'up' : 'down' };
    const arrived = healthArrival(req) ?? asked;
    res.setHeader('Server-Timing', `db;dur=${(answered - asked).toFixed(2)}, app;dur=${(answered - arrived).toFixed(2)}`);
    res.status(up ? 200 : 503).json(body);
  };
}

export const healthRoutes: RouteModule = (router, { services }) => {
  router.get('/health', answerHealth(services));
};
