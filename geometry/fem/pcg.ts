/**
 * Preconditioned conjugate gradients for symmetric positive definite CSR systems.
 *
 * Stopping rule: relative residual ‖b − A x‖₂ / ‖b‖₂ ≤ tol, on the recursively updated residual
 * (checked against a true residual at the end). Progress is reported as (stage, fraction) with the
 * fraction log(‖r₀‖/‖r‖)/log(1/tol), which moves evenly for a steadily converging solve.
 * Cancellation: an AbortSignal (or any { aborted: boolean }) is checked every iteration.
 * The products A·p run on the WebAssembly SIMD kernel where available (spmv-wasm.ts), which gives
 * the same bits as the JS spmv, so a solve is reproducible whichever kernel runs it.
 */
import { throwIfAborted } from '../errors';
import { type Csr, diagonal } from './csr';
import { prepareSpmv } from './spmv-wasm';
import type { BlockKernels } from './block-kernels';

/** z = B r for an SPD approximation B of A⁻¹. */
export interface Preconditioner {
  name: string;
  apply(r: Float64Array, z: Float64Array): void;
  /**
   * The same operator on the k interleaved columns of block-pcg.ts, each column with the bits of
   * apply(); `kernels` are bound to the system matrix. Optional: without it the block solver
   * applies `apply` column by column.
   */
  block?(kernels: BlockKernels): (R: Float64Array, Z: Float64Array) => void;
}

export interface PcgOptions {
  preconditioner?: Preconditioner;
  /** relative residual target (default 1e-10) */
  tol?: number;
  maxIter?: number;
  onProgress?: (stage: string, fraction: number) => void;
  /** checked every iteration; an AbortSignal works */
  signal?: { readonly aborted: boolean };
  /** stage name given to onProgress (default "solve") */
  stage?: string;
  /** product kernel: 'auto' (WebAssembly SIMD where available, the default) or 'js'; same bits either way */
  spmvKernel?: 'auto' | 'js';
}

export interface PcgResult {
  x: Float64Array;
  iterations: number;
  /** true relative residual ‖b − A x‖/‖b‖ at exit */
  relResidual: number;
  converged: boolean;
  /** recursive relative residual after each iteration (index 0 = initial) */
  history: Float64Array;
}


function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

/** The Jacobi (diagonal) preconditioner: the baseline. */
export function jacobi(A: Csr): Preconditioner {
  const d = diagonal(A);
  const inv = new Float64Array(A.n);
  for (let i = 0; i < A.n; i++) {
    if (!(d[i] > 0)) throw new Error(`matrix row ${i} has no positive diagonal`);
    inv[i] = 1 / d[i];
  }
  return {
    name: 'jacobi',
    apply(r, z) {
      for (let i = 0; i < inv.length; i++) z[i] = inv[i] * r[i];
    },
  };
}

/** Solve A x = b by PCG from x0 (not modified). */
export function pcg(A: Csr, b: Float64Array, x0: Float64Array | null, options: PcgOptions = {}): PcgResult {
  const n = A.n;
  const tol = options.tol ?? 1e-10;
  const maxIter = options.maxIter ?? 10000;
  const M = options.preconditioner;
  const stage = options.stage ?? 'solve';
  const x = x0 ? x0.slice() : new Float64Array(n);
  const r = new Float64Array(n);
  const z = new Float64Array(n);
  const p = new Float64Array(n);
  const q = new Float64Array(n);
  const history: number[] = [];

  const bnorm = Math.sqrt(dot(b, b));
  if (bnorm === 0) {
    x.fill(0);
    return { x, iterations: 0, relResidual: 0, converged: true, history: new Float64Array([0]) };
  }
  // the matrix is copied into the kernel's memory once per solve: about one product's traffic
  const spmv = prepareSpmv(A, { kernel: options.spmvKernel ?? 'auto' });
  spmv(x, q);
  for (let i = 0; i < n; i++) r[i] = b[i] - q[i];
  let rel = Math.sqrt(dot(r, r)) / bnorm;
  const rel0 = rel;
  history.push(rel);
  const logSpan = Math.log(rel0 / tol);
  const report = (): void => {
    if (!options.onProgress) return;
    const f = logSpan > 0 ? Math.log(rel0 / rel) / logSpan : 1;
    options.onProgress(stage, Math.min(1, Math.max(0, f)));
  };
  report();

  if (M) M.apply(r, z);
  else z.set(r);
  p.set(z);
  let rz = dot(r, z);
  let it = 0;
  while (rel > tol && it < maxIter) {
    throwIfAborted(options.signal);
    spmv(p, q);
    const pq = dot(p, q);
    if (!(pq > 0)) throw new Error('conjugate gradients broke down: the matrix or preconditioner is not positive definite');
    const alpha = rz / pq;
    let rr = 0;
    for (let i = 0; i < n; i++) {
      x[i] += alpha * p[i];
      const ri = r[i] - alpha * q[i];
      r[i] = ri;
      rr += ri * ri;
    }
    it++;
    rel = Math.sqrt(rr) / bnorm;
    history.push(rel);
    report();
    if (rel <= tol) break;
    if (M) M.apply(r, z);
    else z.set(r);
    const rzNew = dot(r, z);
    const beta = rzNew / rz;
    rz = rzNew;
    for (let i = 0; i < n; i++) p[i] = z[i] + beta * p[i];
  }
  // the true residual, so the caller never reports a drifted recursive one
  spmv(x, q);
  let tr = 0;
  for (let i = 0; i < n; i++) {
    const d = b[i] - q[i];
    tr += d * d;
  }
  const trueRel = Math.sqrt(tr) / bnorm;
  return { x, iterations: it, relResidual: trueRel, converged: rel <= tol, history: Float64Array.from(history) };
}
