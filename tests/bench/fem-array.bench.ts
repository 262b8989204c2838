/**
 * Array benchmark (`npm run bench -- fem-array`, issue 11): a 10×10 square array of hydrogenic
 * donors 4.3 nm apart in a homogeneous host (multipole box, 20 nm margin), P2, target 1e-3: U for
 * every site and V for every bond-graph pair, by the default method (the split: closed forms plus a
 * remainder from the box walls) and, for comparison on a 4×4 corner, the full solve. Target: ≤ 30 s
 * on one core. Prints wall and CPU time and the load average (the machine is shared). Figures
 * only; nothing here asserts a timing.
 *
 * The device figure (issue 11: "the same array 20 nm under a 5 nm oxide with two gates: ≤ 60 s,
 * with lever arms"): the same 10×10 array with its plane 20 nm below a Si/SiO₂ interface, 5 nm of
 * oxide, vacuum above, two gates on the oxide each over half of the array; U, V of the bond-graph
 * pairs, and the lever arms. Permittivities: Si 11.7, SiO₂ 3.9, vacuum 1 (Sze & Ng, Physics of
 * Semiconductor Devices, 3rd ed., Appendix tables; from memory). Prints wall, CPU, tets/dofs per
 * level and the estimated errors of each part.
 * TETRAWELL_BENCH_ARRAY_PARTS = comma list of homogeneous, full, device (default all three);
 * TETRAWELL_BENCH_DEVICE_TARGET = the device's target (default 1e-3, the homogeneous figure's);
 * TETRAWELL_BENCH_DEVICE_N = the array's side (default 10; 2 for a quick look);
 * TETRAWELL_BENCH_DEVICE_EDGE_NM, TETRAWELL_BENCH_DEVICE_EDGE_EXPONENT = the finest U/V level's
 * electrode-edge size and grading exponent (default: the rule of geometry/mesh/edge-rule.ts, which
 * the run prints; a given size alone keeps sizefield.ts's β_E = 1 − (3/4)(2/3)/p).
 * Also prints the rates the U/V error bars used (observed or theoretical, and how many got the
 * asymptotic safety factor) and the observed rate of the lever arm with the worst bar.
 */
import { loadavg } from 'node:os';
import { solveCoulomb } from '../../geometry/fem/coulomb';
import { solveLeverArms } from '../../geometry/fem/lever';
import { electrodeEdgeRule } from '../../geometry/mesh/edge-rule';
import { GCI_SAFETY_OBSERVED, observedRate } from '../../geometry/fem/errorbars';
import type { Design } from '../../geometry/design/types';
import { siliconOxideVacuum } from '../fixtures/stacks';

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

const DEPTH_NM = 20;
const OXIDE_NM = 5;

/** The n×n array DEPTH_NM under OXIDE_NM of oxide, two gates (left and right half of the array) on the oxide. */
export function buriedArray(n: number, target: number): Design {
  const base = squareArray(n);
  const span = ((n - 1) * PITCH) / 2;
  const margin = 20;
  const half = span + margin;
  // box from DEPTH + margin below the donors to margin above the gates' top
  const zLo = -DEPTH_NM - margin;
  const zHi = OXIDE_NM + 2 + margin;
  return {
    ...base,
    name: `bench: ${n}×${n} donor array ${DEPTH_NM} nm under ${OXIDE_NM} nm oxide, two gates`,
    host: {
      material: 'Si',
      epsilonR: 11.7,
      latticeConstantNm: 0.5431020511,
      // Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (from memory): Si 11.7, SiO₂ 3.9
      layers: siliconOxideVacuum(OXIDE_NM),
    },
    sites: base.sites.map((s) => ({ ...s, position: [s.position[0], s.position[1], -DEPTH_NM] })),
    domain: { center: [0, 0, (zLo + zHi) / 2], halfExtentsNm: [half, half, (zHi - zLo) / 2], boundary: { kind: 'multipole', order: 2 } },
    electrodes: [
      { name: 'left gate', minNm: [-span - 2, -span - 2, OXIDE_NM], maxNm: [-1, span + 2, OXIDE_NM + 2], voltageV: 0.3 },
      { name: 'right gate', minNm: [1, -span - 2, OXIDE_NM], maxNm: [span + 2, span + 2, OXIDE_NM + 2], voltageV: 0.1 },
    ],
    refinement: { ...base.refinement, targetRelError: target },
  };
}

/** min–max of the rates the error bars used and how many numbers had the asymptotic safety factor (errorbars.ts) */
function rateSummary(budgets: { rate: number; rateSource: string; safetyFactor: number }[]): string {
  const rates = budgets.map((b) => b.rate);
  const asymptotic = budgets.filter((b) => b.safetyFactor === GCI_SAFETY_OBSERVED).length;
  const observed = budgets.filter((b) => b.rateSource === 'observed').length;
  return `rates ${Math.min(...rates).toFixed(2)}–${Math.max(...rates).toFixed(2)} (observed for ${observed}/${budgets.length}, safety factor ${GCI_SAFETY_OBSERVED} for ${asymptotic})`;
}

function device(n: number, target: number): void {
  const d = buriedArray(n, target);
  // TETRAWELL_BENCH_DEVICE_EDGE_NM / _EDGE_EXPONENT: the finest level's electrode-edge size and β_E (sizefield.ts), for trials
  const edgeNm = process.env.TETRAWELL_BENCH_DEVICE_EDGE_NM ? Number(process.env.TETRAWELL_BENCH_DEVICE_EDGE_NM) : undefined;
  const edgeExp = process.env.TETRAWELL_BENCH_DEVICE_EDGE_EXPONENT ? Number(process.env.TETRAWELL_BENCH_DEVICE_EDGE_EXPONENT) : undefined;
  const mesh = { ...(edgeNm !== undefined ? { electrodeEdgeNm: edgeNm } : {}), ...(edgeExp !== undefined ? { electrodeEdgeExponent: edgeExp } : {}) };
  const rule = electrodeEdgeRule(d);
  if (rule && edgeNm === undefined) {
    console.log(`  default electrode-edge rule (edge-rule.ts): h_E ${rule.hNm.toFixed(2)} nm, β_E ${rule.exponent} (site ${rule.siteId}, ${rule.distanceNm.toFixed(1)} nm from the nearest edge, ℓ ${rule.lengthNm.toFixed(2)} nm)`);
  }
  const la = loadavg()[0];
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const r = solveCoulomb(d, { pairs: 'bond-graph', mesh });
  const c1 = process.cpuUsage(c0);
  const t1 = performance.now();
  const lv = solveLeverArms(d);
  const c2 = process.cpuUsage(c0);
  const t2 = performance.now();
  const cpu = (c: NodeJS.CpuUsage) => (c.user + c.system) / 1e6;
  const worstLever = lv.leverArms.reduce((w, a) => Math.max(w, a.errorMeVPerV), 0);
  const worstRelLever = lv.leverArms.reduce((w, a) => Math.max(w, a.errorMeVPerV / Math.abs(a.meVPerV)), 0);
  console.log(
    `${n}×${n} under oxide, ${r.method}: sites ${r.sites.length}, bond pairs ${r.pairs.length}, U/V unknowns ${r.levels.map((l) => l.dofs).join('/')}; ` +
      `estimated ${r.estimatedRelError.toExponential(2)} (meets ${target}: ${r.meetsTarget}); wall ${((t1 - t0) / 1000).toFixed(1)} s, CPU ${cpu(c1).toFixed(1)} s`,
  );
  console.log(`  U/V error bars: ${rateSummary([...r.sites.map((x) => x.budget), ...r.pairs.map((x) => x.budget)])}`);
  console.log(
    `  lever arms: ${lv.leverArms.length} (sites × 2 gates), P${lv.order}, tets ${lv.levels.map((l) => l.elements).join('/')}, dofs ${lv.levels.map((l) => l.dofs).join('/')}; ` +
      `worst error bar ${worstLever.toPrecision(2)} meV/V (relative ${worstRelLever.toExponential(2)}); wall ${((t2 - t1) / 1000).toFixed(1)} s, CPU ${(cpu(c2) - cpu(c1)).toFixed(1)} s`,
  );
  // observed rate (errorbars.ts observedRate, s = dofs^(−1/3)) of the lever arm with the worst bar
  const kWorst = lv.leverArms.findIndex((a) => a.errorMeVPerV === worstLever);
  const sLever = lv.levels.map((l) => Math.pow(l.dofs, -1 / 3));
  console.log(`  worst lever arm per level ${lv.levels.map((l) => l.meVPerV[kWorst].toFixed(4)).join(' / ')} meV/V, observed rate ${observedRate(sLever, lv.levels.map((l) => l.meVPerV[kWorst])).toFixed(2)}`);
  console.log(
    `  device total: wall ${((t2 - t0) / 1000).toFixed(1)} s, CPU ${cpu(c2).toFixed(1)} s; load average ${la.toFixed(1)} at the start, ${loadavg()[0].toFixed(1)} at the end (target ≤ 60 s on one core for 10×10)`,
  );
}

export async function run(): Promise<void> {
  const parts = (process.env.TETRAWELL_BENCH_ARRAY_PARTS ?? 'homogeneous,full,device').split(',').map((p) => p.trim());
  if (parts.includes('homogeneous')) one(10, 'auto');
  if (parts.includes('full')) one(4, 'full');
  if (parts.includes('device')) device(Number(process.env.TETRAWELL_BENCH_DEVICE_N ?? 10), Number(process.env.TETRAWELL_BENCH_DEVICE_TARGET ?? 1e-3));
}
