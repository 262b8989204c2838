/**
 * Solver section of the FEM benchmark (called from fem.bench.ts):
 *   1. sparse matrix-vector product bandwidth against a plain memory copy in the same process, for
 *      the JS spmv and the WebAssembly SIMD kernel PCG uses (geometry/fem/spmv-wasm.ts);
 *   2. PCG iteration counts to a relative residual of 1e-10, Jacobi against multigrid, on graded
 *      meshes from about 1e4 to 1e6 unknowns (P1 and P2).
 * Figures are printed, never asserted. Set TETRAWELL_BENCH_MAX_DOFS to cap the largest problems
 * (default 1.3e6) and TETRAWELL_BENCH_JACOBI_MAX_DOFS to skip slow Jacobi runs (default: no cap).
 */
import { cpus, loadavg } from 'node:os';
import type { TetMesh } from '../../geometry/mesh/types';
import { buildSpace } from '../../geometry/fem/space';
import { applyDirichlet, assembleSystem } from '../../geometry/fem/assemble';
import { spmv, type Csr } from '../../geometry/fem/csr';
import { prepareSpmv } from '../../geometry/fem/spmv-wasm';
import { pcg, jacobi } from '../../geometry/fem/pcg';
import { multigridPreconditioner } from '../../geometry/fem/multigrid';
import { gradedBox, uniformBox } from '../geometry/fem/multigrid-fixture';

type V3 = [number, number, number];
const SITE: V3 = [0.93, 1.07, 1.01];
const EPS = 11.7; // silicon εr, common practice (geometry/units.ts)

/** The box [0, 2]³ (2³ Kuhn cells) graded towards the site: element size h0 + 10·h0·r. */
function gradedMesh(h0: number): TetMesh {
  return gradedBox(2, 1, SITE, h0, 10 * h0);
}

const density = (x: number, y: number, z: number): number =>
  Math.exp(-((x - SITE[0]) ** 2 + (y - SITE[1]) ** 2 + (z - SITE[2]) ** 2) / 0.01);

export function spmvBandwidth(): void {
  console.log('\n-- spmv bandwidth vs memcpy');
  console.log(`   (load average ${loadavg().map((v) => v.toFixed(1)).join(' ')} on ${cpus().length} cores: other work skews both figures)`);
  // memcpy reference: 128 MB, far beyond the caches, read + write counted as in STREAM Copy.
  // It is timed interleaved with the spmv (best of 20 each) so that load from other processes
  // hits both figures alike.
  const src = new Uint8Array(128 * 2 ** 20).fill(7);
  const dst = new Uint8Array(src.length);
  // uniform meshes large enough that the matrix (~50–100 MB) is far outside the caches:
  // P1 after 15 bisection generations (274,625 unknowns), P2 after 12 (274,625 unknowns)
  for (const [order, times] of [[1, 15], [2, 12]] as const) {
    const space = buildSpace(uniformBox(2, 1, times), order);
    const A: Csr = assembleSystem(space, [EPS]).A;
    const n = A.n;
    const nnz = A.cols.length;
    const x = new Float64Array(n).fill(1);
    const y = new Float64Array(n);
    // bytes an spmv must move at least: vals (8) + cols (4) per nonzero, rowPtr (4), x read once, y written once
    const bytes = 12 * nnz + 4 * (n + 1) + 8 * n + 8 * n;
    // the kernel PCG uses (WebAssembly SIMD where available); its time includes copying x in and y out
    const prepared = prepareSpmv(A);
    spmv(A, x, y);
    prepared(x, y);
    dst.set(src); // warm-up
    let tJs = Infinity;
    let tWasm = Infinity;
    let tCopy = Infinity;
    for (let r = 0; r < 20; r++) {
      let t = performance.now();
      dst.set(src);
      tCopy = Math.min(tCopy, (performance.now() - t) / 1000);
      t = performance.now();
      spmv(A, x, y);
      tJs = Math.min(tJs, (performance.now() - t) / 1000);
      t = performance.now();
      prepared(x, y);
      tWasm = Math.min(tWasm, (performance.now() - t) / 1000);
    }
    const bwCopy = (2 * src.length) / tCopy / 1e9;
    const fig = (label: string, t: number): string => {
      const bw = bytes / t / 1e9;
      return `${label} ${(t * 1e3).toFixed(2)} ms = ${bw.toFixed(2)} GB/s = ${((100 * bw) / bwCopy).toFixed(0)}% of memcpy`;
    };
    console.log(
      `P${order}: n=${n} nnz=${nnz} (${(nnz / n).toFixed(1)}/row, ${(bytes / 2 ** 20).toFixed(0)} MB)   memcpy ${bwCopy.toFixed(2)} GB/s`,
    );
    console.log(`      ${fig('JS spmv    ', tJs)}`);
    console.log(`      ${fig(`${prepared.kernel === 'js' ? 'wasm n/a, JS' : 'wasm SIMD  '}`, tWasm)} (target ≥ 50%; includes copying x in, y out)`);
    console.log(`      PCG uses: ${prepared.kernel === 'wasm-simd' ? 'wasm SIMD (same bits as JS)' : 'JS (no WebAssembly SIMD here)'}`);
  }
  console.log('   spmv bytes = 12·nnz + 4·(n+1) + 16·n (x read once, y written once): a lower bound on traffic');
}

export function iterationTable(): void {
  console.log('\n-- iteration counts Jacobi vs multigrid from 1e4 to 1e6 unknowns (PCG, relative residual 1e-10)');
  const maxDofs = Number(process.env.TETRAWELL_BENCH_MAX_DOFS ?? 1.3e6);
  const jacobiMax = Number(process.env.TETRAWELL_BENCH_JACOBI_MAX_DOFS ?? Infinity);
  // graded meshes around one site; h0 chosen for about 1e4, 1e5, 1e6 unknowns per order
  const plan: { order: 1 | 2; h0: number }[] = [
    { order: 1, h0: 0.03 }, { order: 1, h0: 0.011 }, { order: 1, h0: 0.005 },
    { order: 2, h0: 0.05 }, { order: 2, h0: 0.022 }, { order: 2, h0: 0.0095 },
  ];
  console.log('order  unknowns   tets      levels  jacobi(it, s)      multigrid(it, setup s, solve s; wall and cpu)  N^(1/3)');
  const rows: { order: number; n: number; jac: number; mg: number }[] = [];
  const meshes = new Map<number, TetMesh>();
  for (const { order, h0 } of plan) {
    let mesh = meshes.get(h0);
    if (!mesh) {
      mesh = gradedMesh(h0);
      meshes.clear(); // keep one mesh alive at a time
      meshes.set(h0, mesh);
    }
    const nT = mesh.tets.length / 4;
    const nV = mesh.coords.length / 3;
    const estimate = order === 1 ? nV : 7.4 * nV;
    if (estimate > maxDofs) {
      console.log(`P${order}     ~${estimate.toExponential(1)} skipped (TETRAWELL_BENCH_MAX_DOFS=${maxDofs})`);
      continue;
    }
    const space = buildSpace(mesh, order);
    const { A, b } = assembleSystem(space, [EPS], { load: density });
    const sys = applyDirichlet(A, b, space.boundaryDof);
    const cpu = (): number => {
      const u = process.cpuUsage();
      return (u.user + u.system) / 1e6;
    };
    let t = performance.now();
    let c = cpu();
    const mg = multigridPreconditioner(space, sys.A, { epsByRegion: [EPS] });
    const setup = (performance.now() - t) / 1000;
    const setupCpu = cpu() - c;
    t = performance.now();
    c = cpu();
    const rm = pcg(sys.A, sys.b, null, { preconditioner: mg, tol: 1e-10 });
    const solve = (performance.now() - t) / 1000;
    const solveCpu = cpu() - c;
    let jac = 'skipped';
    let jacIt = NaN;
    if (space.nDofs <= jacobiMax) {
      t = performance.now();
      const rj = pcg(sys.A, sys.b, null, { preconditioner: jacobi(sys.A), tol: 1e-10, maxIter: 20000 });
      jac = `${rj.iterations}${rj.converged ? '' : '(!)'}, ${((performance.now() - t) / 1000).toFixed(1)}`;
      jacIt = rj.iterations;
    }
    rows.push({ order, n: space.nDofs, jac: jacIt, mg: rm.iterations });
    console.log(
      `P${order}     ${String(space.nDofs).padEnd(10)} ${String(nT).padEnd(9)} ${String(mg.stats.levels).padEnd(7)} ` +
        `${jac.padEnd(18)} ${String(rm.iterations).padEnd(3)} ${setup.toFixed(2).padStart(6)} (${setupCpu.toFixed(2)} cpu) ` +
        `${solve.toFixed(2).padStart(6)} (${solveCpu.toFixed(2)} cpu)   ${Math.cbrt(space.nDofs).toFixed(0)}`,
    );
  }
  // least-squares slope of log(iterations) against log(N), per order and method
  const slope = (pts: [number, number][]): number => {
    const ok = pts.filter(([, y]) => Number.isFinite(y));
    if (ok.length < 2) return NaN;
    const mx = ok.reduce((s, [x]) => s + Math.log(x), 0) / ok.length;
    const my = ok.reduce((s, [, y]) => s + Math.log(y), 0) / ok.length;
    let num = 0, den = 0;
    for (const [x, y] of ok) {
      num += (Math.log(x) - mx) * (Math.log(y) - my);
      den += (Math.log(x) - mx) ** 2;
    }
    return num / den;
  };
  for (const order of [1, 2]) {
    const r = rows.filter((q) => q.order === order);
    console.log(
      `   P${order}: iterations ∝ N^k with k = ${slope(r.map((q) => [q.n, q.jac])).toFixed(2)} (Jacobi), ` +
        `${slope(r.map((q) => [q.n, q.mg])).toFixed(2)} (multigrid); N^(1/3) growth means k = 0.33`,
    );
  }
  console.log('   target: multigrid under 30 iterations across the range; Jacobi grows like N^(1/3)');
}

export async function runSolverBench(): Promise<void> {
  spmvBandwidth();
  iterationTable();
}
