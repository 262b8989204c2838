/**
 * When a health poll reached the app (performance.now(), ms), for the `app` figure of its Server-Timing header
 * (server/routes/health.ts). Set by the app's first middleware (server/app.ts), only for health polls.
 */
import { performance } from 'node:perf_hooks';
import type { Request } from 'express';

const arrivals = new WeakMap<Request, number>();

export function markHealthArrival(req: Request): void {
  arrivals.set(req, performance.now());
}

export function healthArrival(req: Request): number | undefined {
  return arrivals.get(req);
}
