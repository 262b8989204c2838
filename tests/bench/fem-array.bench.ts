/**
 * Array benchmark (`npm run bench -- fem-array`, issue 11): a 10×10 square array of hydrogenic
 * donors 4.3 nm apart in a homogeneous host (multipole box, 20 nm margin), P2, target 1e-3: U for
 * every site and V for every bond-graph pair, by the default method (the split: closed forms plus a
 * remainder from the box walls) and, for comparison on a 4×4 corner, the full solve. Target: ≤ 30 s
 * on one core. Prints wall and CPU time and the load average (the machine is shared). Figures
 * only; nothing here asserts a timing.
 */
import { loadavg } from 'node:os';
import { solveCoulomb } from '../../geometry/fem/coulomb';
import type { Design } from '../../geometry/design/types';

const PITCH = 4.3;

function squareArray(n: number): Design {
  const sites: Design['sites'] = [];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) sites.push({ id: `d${i}_${j}`, species: 'P', position: [(i - (n - 1) / 2) * PITCH, (j - (n - 1) / 2) * PITCH, 0.1], electrons: 1 });
  }
  const half = ((n - 1) * PITCH) / 2 + 20;
  return {
    format: 'tetrawell-design',
    version: 2,
    name: `bench: ${n}×${n} donor array`,
    host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431 },
    sites,
    domain: { center: [0, 0, 0], halfExtentsNm: [half, half, half], boundary: { kind: 'multipole', order: 0 } },
    refinement: { order: 2, targetRelError: 1e-3, maxElements: 3_000_000 },
  };
}

function one(n: number, method: 'auto' | 'full'): void {
  const la = loadavg()[0];
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const r = solveCoulomb(squareArray(n), { method, pairs: 'bond-graph' });
  const c = process.cpuUsage(c0);
  console.log(
    `${n}×${n} ${r.method.padEnd(5)} sites ${r.sites.length}, bond pairs ${r.pairs.length}, unknowns ${r.levels.map((l) => l.dofs).join('/')}; ` +
      `estimated ${r.estimatedRelError.toExponential(2)} (meets 1e-3: ${r.meetsTarget}); wall ${((performance.now() - t0) / 1000).toFixed(1)} s, ` +
      `CPU ${((c.user + c.system) / 1e6).toFixed(1)} s; load average ${la.toFixed(1)} (target ≤ 30 s on one core for 10×10)`,
  );
}

export async function run(): Promise<void> {
  one(10, 'auto');
  one(4, 'full');
}
