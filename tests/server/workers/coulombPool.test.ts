/**
 * Worker pool (piscina) running the TypeScript worker: progress events arrive through the
 * MessagePort, a real solve comes back with numbers, and aborting rejects with an AbortError.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { createCoulombPool } from '../../../server/workers/coulombPool';
import { COULOMB_EV_NM } from '../../../geometry/units';
import type { Design } from '../../../geometry/design/types';
import type { CoulombResult } from '../../../geometry/fem/coulomb';
import type { CoreProgress as Progress } from '../../../geometry/progress';
import { fileURLToPath } from 'node:url';
import type { PoolTestJob } from './pool-test-worker';

// the pool tests' own worker module: the product's jobs plus synthetic ones (pool-test-worker.ts)
const pool = createCoulombPool<PoolTestJob>({ maxThreads: 1, workerFile: fileURLToPath(new URL('./pool-test-worker.ts', import.meta.url)) });
afterAll(async () => {
  await pool.destroy();
});

function gaussianDesign(sigma: number): Design {
  return {
    format: 'tetrawell-design',
    version: 1,
    name: 'worker test',
    host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431020511 },
    sites: [{ id: 'g', species: 'P', position: [0, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: sigma } }],
    domain: { center: [0, 0, 0], halfExtentsNm: [20 * sigma, 20 * sigma, 20 * sigma], boundary: { kind: 'multipole', order: 0 } },
    refinement: { order: 2, targetRelError: 1e-2, maxElements: 200_000 },
  };
}

describe('coulomb worker pool', () => {
  it('reports progress and returns a solve from a worker thread', async () => {
    const events: Progress[] = [];
    const r = await pool.run<CoulombResult>({ kind: 'coulomb', design: gaussianDesign(1), options: { levels: 2 } }, { onProgress: (p) => events.push(p) });
    expect(events.length).toBeGreaterThan(2);
    expect(events.some((e) => e.phase === 'solve' && e.site === 'g' && e.level !== undefined)).toBe(true);
    // structured progress: data, never prose
    for (const e of events) expect(Object.keys(e).every((k) => ['phase', 'level', 'site', 'fraction'].includes(k))).toBe(true);
    for (const e of events) expect(e.fraction).toBeGreaterThanOrEqual(0);
    expect(events[events.length - 1].fraction).toBe(1);
    // Gaussian self-energy e²/(4πε0 εr)/(σ√π): standard result for Gaussian charge distributions
    const exact = COULOMB_EV_NM / (11.7 * Math.sqrt(Math.PI));
    expect(Math.abs(r.sites[0].uEv - exact)).toBeLessThan(r.sites[0].uErrorEv);
  });

  it('cancel rejects with an abort error and the pool keeps working', async () => {
    const ac = new AbortController();
    const events: Progress[] = [];
    // a job that never finishes on its own: the rejection below can only come from the cancel
    const p = pool.run({ kind: 'spin' }, { onProgress: (e) => events.push(e), signal: ac.signal });
    // abort once the worker has shown it is running
    await new Promise<void>((resolve) => {
      const t = setInterval(() => {
        if (events.length > 0) {
          clearInterval(t);
          resolve();
        }
      }, 10);
    });
    ac.abort();
    await expect(p).rejects.toMatchObject({ name: 'AbortError' });
    const again = await pool.run<{ value: number }>({ kind: 'echo', value: 10 });
    expect(again.value).toBe(10);
  });
});
