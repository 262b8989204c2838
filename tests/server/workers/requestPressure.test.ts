/**
 * Request pressure (server/workers/requestPressure.ts): the request thread counts the requests it is serving, and a
 * job thread of the same process computes in slices with pauses while it does (geometry/cooperate.ts).
 * The rule under test is our own (a job keeps 1 / (1 + PAUSE_RATIO) of the time under load, no single pause longer
 * than MAX_PAUSE_MS); the figures it was tuned on are in the module's header.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import express from 'express';
import supertest from 'supertest';
import { describe, expect, it } from 'vitest';
import {
  createRequestPressure,
  isBusy,
  MAX_PAUSE_MS,
  PAUSE_RATIO,
  pressureHook,
  pausesTaken,
  pressureMiddleware,
  QUIET_MS,
  SLICE_MS,
} from '../../../server/workers/requestPressure';
import { jobThreads } from '../../../server/jobs/threads';

const PAIR = readFileSync(fileURLToPath(new URL('../../fixtures/designs/pair-coarse.json', import.meta.url)), 'utf8');

/** Burn the CPU for `ms` (the work between two turn-taking points). */
function work(ms: number): void {
  const end = performance.now() + ms;
  while (performance.now() < end) {
    /* spin */
  }
}

describe('request pressure', () => {
  it('is busy while a request is in flight and for QUIET_MS after the last one', async () => {
    const p = createRequestPressure();
    expect(isBusy(p.buffer, Date.now() + 10 * QUIET_MS)).toBe(false);
    p.begin();
    // in flight: busy however long it takes
    expect(isBusy(p.buffer, Date.now() + 100 * QUIET_MS)).toBe(true);
    p.end();
    expect(isBusy(p.buffer)).toBe(true);
    expect(isBusy(p.buffer, Date.now() + QUIET_MS + 1)).toBe(false);
  });

  it('lets a job thread work SLICE_MS, then pauses it PAUSE_RATIO times as long as it worked while requests are served', () => {
    const p = createRequestPressure();
    const pauses: number[] = [];
    const hook = pressureHook(p.buffer, (ms) => pauses.push(ms));
    // quiet server: never a pause
    work(SLICE_MS + 5);
    hook();
    expect(pauses).toEqual([]);
    p.begin();
    // less than a slice since the last look: no pause yet
    hook();
    expect(pauses).toEqual([]);
    work(SLICE_MS + 5);
    hook();
    expect(pauses).toHaveLength(1);
    expect(pauses[0]).toBeGreaterThanOrEqual(PAUSE_RATIO * (SLICE_MS + 5));
    expect(pauses[0]).toBeLessThanOrEqual(MAX_PAUSE_MS);
    // a long stretch without a turn-taking point: the pause is capped
    work(MAX_PAUSE_MS / PAUSE_RATIO + 20);
    hook();
    expect(pauses[1]).toBe(MAX_PAUSE_MS);
    p.end();
  });

  it('counts a request from its start to its end, and leaves server-sent event streams out', async () => {
    const p = createRequestPressure();
    const app = express();
    app.use(pressureMiddleware(p));
    const seen: Record<string, boolean> = {};
    app.get('/api/slow', (_req, res) => {
      seen.during = isBusy(p.buffer, Date.now() + 10 * QUIET_MS);
      res.json({ ok: true });
    });
    app.get('/api/projects/1/jobs/2/events', (_req, res) => {
      seen.stream = isBusy(p.buffer, Date.now() + 10 * QUIET_MS);
      res.json({ ok: true });
    });
    await supertest(app).get('/api/slow').expect(200);
    expect(seen.during).toBe(true);
    // after the answer nothing is in flight: busy only within QUIET_MS
    expect(isBusy(p.buffer, Date.now() + 10 * QUIET_MS)).toBe(false);
    await supertest(app).get('/api/projects/1/jobs/2/events').expect(200);
    expect(seen.stream).toBe(false);
  });

  it('a real job thread pauses while requests are in flight and not otherwise, and its result does not change', async () => {
    const quiet = createRequestPressure();
    const busy = createRequestPressure();
    busy.begin();
    const a = jobThreads(1, quiet.buffer);
    const b = jobThreads(1, busy.buffer);
    try {
      // a mesh job of a few hundred ms: many turn-taking points, each SLICE_MS of work may end in a pause
      const task = { kind: 'mesh' as const, documentJson: PAIR, options: { order: 1 as const } };
      const [ra, rb] = await Promise.all([a.run(task, {}), b.run(task, {})]);
      expect(ra.ok && rb.ok).toBe(true);
      if (!ra.ok || !rb.ok) return;
      expect(rb.summary).toEqual(ra.summary);
      expect(pausesTaken(quiet.buffer)).toBe(0);
      expect(pausesTaken(busy.buffer)).toBeGreaterThan(0);
    } finally {
      busy.end();
      await Promise.all([a.close(), b.close()]);
    }
  }, 120_000);
});
