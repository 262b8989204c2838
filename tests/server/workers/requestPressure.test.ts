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

  it('slows a real job thread down while requests are in flight, and the job still finishes with the same result', async () => {
    const quiet = createRequestPressure();
    const busy = createRequestPressure();
    busy.begin();
    const a = jobThreads(1, quiet.buffer);
    const b = jobThreads(1, busy.buffer);
    try {
      const task = { kind: 'mesh' as const, documentJson: PAIR, options: { order: 1 as const } };
      // warm both threads (module loading is not what is measured)
      await a.run(task, {});
      await b.run(task, {});
      const t0 = performance.now();
      const ra = await a.run(task, {});
      const t1 = performance.now();
      const rb = await b.run(task, {});
      const t2 = performance.now();
      expect(ra.ok && rb.ok).toBe(true);
      if (!ra.ok || !rb.ok) return;
      expect(rb.summary).toEqual(ra.summary);
      // under pressure the thread works about 1 / (1 + PAUSE_RATIO) of the time: at least twice as long here
      // (a margin for a loaded machine; the quiet run is ~0.1–0.3 s)
      expect(t2 - t1).toBeGreaterThan(2 * (t1 - t0));
    } finally {
      busy.end();
      await Promise.all([a.close(), b.close()]);
    }
  }, 60_000);
});
