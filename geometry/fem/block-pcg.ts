/**
 * Preconditioned conjugate gradients for many right-hand sides on one matrix (issue 11, "Speed"):
 * k independent PCG iterations run in lock-step, their vectors stored interleaved (entry i of column
 * j at X[i·k + j]) so that the products and the preconditioner's sweeps stream the matrix once for
 * all k columns (block-kernels.ts).
 *
 * Each column is the single-vector PCG of pcg.ts, operation for operation: its own α, β, its own
 * stopping rule (relative residual ≤ tol on the recursive residual, or maxIter), the same sums in
 * the same order. The block kernels and the preconditioner's block form give each column the bits
 * of the single code, so every column's x, iterations and residuals are bit for bit those of
 * pcg(A, b_j, x0_j) with the same preconditioner. A converged column is frozen (its x, r and p are
 * no longer updated: the vector updates keep its bits under a lane mask); its lanes still pass
 * through the products and the preconditioner until the block is done, which costs a little
 * arithmetic and no change in its numbers.
 */
import { throwIfAborted } from '../errors';
import type { Csr } from './csr';
import { prepareBlockKernels, type BlockKernels } from './block-kernels';
import type { PcgOptions, PcgResult, Preconditioner } from './pcg';

/**
 * Columns per block in the solvers: 8 columns of x are one 64-byte cache line per gathered
 * nonzero, and 8 × 65,000 dofs of a block vector still fit a few MB of cache (common practice; not
 * tuned: on a 275,000-dof P2 matrix, widths 4 to 16 streamed about alike).
 */
export const BLOCK_WIDTH = 8;

export interface BlockPcgOptions extends Omit<PcgOptions, 'onProgress'> {
  /** progress of the block: the mean over columns of each one's log-residual fraction */
  onProgress?: (stage: string, fraction: number) => void;
}

/** z = M r on k interleaved columns, each column as M.apply would give it. */
export type BlockApply = (R: Float64Array, Z: Float64Array) => void;

/**
 * The kernels of the last width asked for on each matrix: a level solves all its blocks on one
 * matrix, and preparing copies the matrix into a fresh WebAssembly memory (measured: 5 s of CPU
 * on the 10×10 device bench when done per block). Dropped with the matrix (WeakMap).
 */
const kernelCache = new WeakMap<Csr, { k: number; kernel: 'auto' | 'js'; kern: BlockKernels; applies: Map<Preconditioner | undefined, BlockApply> }>();

function cached(A: Csr, k: number, kernel: 'auto' | 'js') {
  let c = kernelCache.get(A);
  if (!c || c.k !== k || c.kernel !== kernel) {
    c = { k, kernel, kern: prepareBlockKernels(A, k, { kernel }), applies: new Map() };
    kernelCache.set(A, c);
  }
  return c;
}

/** A preconditioner's block form: its own where it has one, else column by column (made once per kernels). */
export function blockApplyOf(M: Preconditioner | undefined, kern: BlockKernels): BlockApply {
  const { n, k } = kern;
  if (M?.block) return M.block(kern);
  const r = new Float64Array(n), z = new Float64Array(n);
  return (R, Z) => {
    for (let j = 0; j < k; j++) {
      if (M) {
        for (let i = 0; i < n; i++) r[i] = R[i * k + j];
        M.apply(r, z);
        for (let i = 0; i < n; i++) Z[i * k + j] = z[i];
      } else for (let i = 0; i < n; i++) Z[i * k + j] = R[i * k + j];
    }
  };
}

/**
 * Solve A x_j = b_j for every column j by PCG from x0_j (null: zero; inputs not modified), all in
 * one block. Returns one PcgResult per column, as pcg() would.
 */
export function blockPcg(
  A: Csr,
  bs: readonly Float64Array[],
  x0s: readonly (Float64Array | null)[] | null,
  options: BlockPcgOptions = {},
): PcgResult[] {
  const n = A.n;
  const nc = bs.length;
  if (nc === 0) return [];
  const tol = options.tol ?? 1e-10;
  const maxIter = options.maxIter ?? 10000;
  const stage = options.stage ?? 'solve';
  // the WebAssembly kernels need an even width: a padding column stays zero (b = 0, done at once)
  const k = nc % 2 === 0 ? nc : nc + 1;
  const c = cached(A, k, options.spmvKernel ?? 'auto');
  const kern = c.kern;
  const [B, X, R, Z, P, Q] = [0, 1, 2, 3, 4, 5].map((slot) => kern.vector(slot));
  B.fill(0);
  X.fill(0);
  const M = options.preconditioner;
  let applyM = c.applies.get(M);
  if (!applyM) {
    applyM = blockApplyOf(M, kern);
    c.applies.set(M, applyM);
  }
  for (let j = 0; j < nc; j++) {
    const b = bs[j], x0 = x0s?.[j] ?? null;
    for (let i = 0; i < n; i++) B[i * k + j] = b[i];
    if (x0) for (let i = 0; i < n; i++) X[i * k + j] = x0[i];
  }
  const bnorm = new Float64Array(k);
  const rel = new Float64Array(k), rel0 = new Float64Array(k), logSpan = new Float64Array(k);
  const rz = new Float64Array(k), pq = new Float64Array(k), alpha = new Float64Array(k), acc = new Float64Array(k);
  const its = new Int32Array(k);
  const active = new Uint8Array(k);
  const histories: number[][] = Array.from({ length: k }, () => []);
  /** acc[j] = Σ_i U[i,j] V[i,j], in the order of pcg.ts's dot */
  const dots = (U: Float64Array, V: Float64Array): void => kern.dots(U, V, acc);
  dots(B, B);
  for (let j = 0; j < k; j++) bnorm[j] = Math.sqrt(acc[j]);
  // a zero right-hand side: x = 0 at once (as pcg does), and its lanes stay zero
  for (let j = 0; j < k; j++) if (bnorm[j] === 0) for (let i = 0; i < n; i++) X[i * k + j] = 0;
  kern.spmv(X, Q);
  for (let q = 0; q < n * k; q++) R[q] = B[q] - Q[q];
  dots(R, R);
  for (let j = 0; j < k; j++) {
    if (bnorm[j] === 0) {
      rel[j] = 0;
      histories[j].push(0);
      continue;
    }
    rel[j] = Math.sqrt(acc[j]) / bnorm[j];
    rel0[j] = rel[j];
    logSpan[j] = Math.log(rel0[j] / tol);
    histories[j].push(rel[j]);
    active[j] = rel[j] > tol && maxIter > 0 ? 1 : 0;
  }
  const report = (): void => {
    if (!options.onProgress) return;
    let f = 0;
    for (let j = 0; j < nc; j++) {
      const fj = bnorm[j] === 0 || !(logSpan[j] > 0) ? 1 : Math.log(rel0[j] / rel[j]) / logSpan[j];
      f += active[j] ? Math.min(1, Math.max(0, fj)) : 1;
    }
    options.onProgress(stage, f / nc);
  };
  report();

  applyM(R, Z);
  P.set(Z);
  dots(R, Z);
  rz.set(acc);
  let any = active.some((a) => a === 1);
  while (any) {
    throwIfAborted(options.signal);
    kern.spmv(P, Q);
    dots(P, Q);
    pq.set(acc);
    for (let j = 0; j < k; j++) {
      if (!active[j]) continue;
      if (!(pq[j] > 0)) throw new Error('conjugate gradients broke down: the matrix or preconditioner is not positive definite');
      alpha[j] = rz[j] / pq[j];
    }
    kern.update(alpha, active, X, P, R, Q, acc);
    for (let j = 0; j < k; j++) {
      if (!active[j]) continue;
      its[j]++;
      rel[j] = Math.sqrt(acc[j]) / bnorm[j];
      histories[j].push(rel[j]);
      if (rel[j] <= tol) active[j] = 0;
    }
    report();
    if (!active.some((a) => a === 1)) break;
    applyM(R, Z);
    dots(R, Z);
    for (let j = 0; j < k; j++) {
      if (!active[j]) continue;
      const beta = acc[j] / rz[j];
      rz[j] = acc[j];
      alpha[j] = beta; // reused as β below
    }
    kern.direction(alpha, active, Z, P);
    for (let j = 0; j < k; j++) if (active[j] && its[j] >= maxIter) active[j] = 0;
    any = active.some((a) => a === 1);
  }
  // the true residuals, so the caller never reports a drifted recursive one
  kern.spmv(X, Q);
  acc.fill(0);
  for (let i = 0, o = 0; i < n; i++, o += k) {
    for (let j = 0; j < k; j++) {
      const d = B[o + j] - Q[o + j];
      acc[j] += d * d;
    }
  }
  const out: PcgResult[] = [];
  for (let j = 0; j < nc; j++) {
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) x[i] = X[i * k + j];
    if (bnorm[j] === 0) {
      out.push({ x, iterations: 0, relResidual: 0, converged: true, history: new Float64Array([0]) });
      continue;
    }
    out.push({ x, iterations: its[j], relResidual: Math.sqrt(acc[j]) / bnorm[j], converged: rel[j] <= tol, history: Float64Array.from(histories[j]) });
  }
  return out;
}
