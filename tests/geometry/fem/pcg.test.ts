import { describe, expect, it } from 'vitest';
import { pcg, jacobi } from '../../../geometry/fem/pcg';
import { CoreAbortError } from '../../../geometry/errors';
import type { Csr } from '../../../geometry/fem/csr';

/** tridiag(−1, 2, −1) of size n: the 1D second-difference matrix. */
function laplace1d(n: number, scale: Float64Array | null = null): Csr {
  const rowPtr = new Uint32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  for (let i = 0; i < n; i++) {
    const s = scale ? scale[i] : 1;
    for (const j of [i - 1, i, i + 1]) {
      if (j < 0 || j >= n) continue;
      cols.push(j);
      vals.push((j === i ? 2 : -1) * s * (scale ? scale[j] : 1));
    }
    rowPtr[i + 1] = cols.length;
  }
  return { n, rowPtr, cols: Uint32Array.from(cols), vals: Float64Array.from(vals) };
}

describe('preconditioned conjugate gradients', () => {
  it('solves the 1D discrete Poisson problem to its exact solution i(n+1−i)/2', () => {
    // Source: the second difference of the quadratic x_i = i(n+1−i)/2 is exactly 1 (with x_0 = x_{n+1} = 0).
    const n = 200;
    const A = laplace1d(n);
    const b = new Float64Array(n).fill(1);
    const res = pcg(A, b, null, { tol: 1e-12 });
    expect(res.converged).toBe(true);
    expect(res.relResidual).toBeLessThan(1e-11);
    for (let i = 0; i < n; i++) expect(res.x[i]).toBeCloseTo(((i + 1) * (n - i)) / 2, 6);
    // CG terminates in at most n steps in exact arithmetic (Hestenes & Stiefel 1952); symmetric b halves it
    expect(res.iterations).toBeLessThanOrEqual(n);
  });

  it('Jacobi removes a bad diagonal scaling of the 1D Laplacian', () => {
    // With B = D A D, Jacobi-preconditioned CG on B generates the iterates of CG on A up to the
    // scaling D (the preconditioned operator is D⁻¹ B D⁻¹ / 2 = A / 2): the scaling costs nothing.
    const n = 120;
    const s = Float64Array.from({ length: n }, (_, i) => 10 ** ((i % 7) - 3));
    const B = laplace1d(n, s);
    const x = Float64Array.from({ length: n }, (_, i) => Math.cos(i));
    const b = new Float64Array(n);
    for (let i = 0; i < n; i++) for (let k = B.rowPtr[i]; k < B.rowPtr[i + 1]; k++) b[i] += B.vals[k] * x[B.cols[k]];
    const pre = pcg(B, b, null, { tol: 1e-12, preconditioner: jacobi(B) });
    expect(pre.converged).toBe(true);
    const err = (y: Float64Array): number => Math.max(...y.map((v, i) => Math.abs(v - x[i])));
    expect(err(pre.x)).toBeLessThan(1e-6);
    expect(pre.iterations).toBeLessThanOrEqual(n + 2); // finite termination in n steps (Hestenes & Stiefel 1952), plus rounding
    const plain = pcg(B, b, null, { tol: 1e-30, maxIter: pre.iterations });
    expect(err(plain.x)).toBeGreaterThan(1e-3);
  });

  it('reports progress from 0 to 1 with the stage name', () => {
    const A = laplace1d(100);
    const b = new Float64Array(100).fill(1);
    const seen: [string, number][] = [];
    pcg(A, b, null, { tol: 1e-10, stage: 'site P1', onProgress: (stage, f) => seen.push([stage, f]) });
    expect(seen[0]).toEqual(['site P1', 0]);
    expect(seen[seen.length - 1][1]).toBe(1);
    for (const [stage, f] of seen) {
      expect(stage).toBe('site P1');
      expect(f).toBeGreaterThanOrEqual(0);
      expect(f).toBeLessThanOrEqual(1);
    }
  });

  it('stops with an AbortError when the signal is raised', () => {
    const A = laplace1d(400);
    const b = new Float64Array(400).fill(1);
    const controller = new AbortController();
    let calls = 0;
    const run = (): unknown =>
      pcg(A, b, null, {
        signal: controller.signal,
        onProgress: () => {
          if (++calls === 5) controller.abort();
        },
      });
    expect(run).toThrow(CoreAbortError);
    try {
      run();
    } catch (e) {
      expect((e as Error).name).toBe('AbortError');
    }
    expect(calls).toBeLessThan(10);
  });

  it('returns zero for a zero right-hand side and refuses an indefinite matrix', () => {
    const A = laplace1d(10);
    expect(pcg(A, new Float64Array(10), null).x.every((v) => v === 0)).toBe(true);
    const N: Csr = { ...A, vals: A.vals.map((v) => -v) };
    expect(() => pcg(N, new Float64Array(10).fill(1), null)).toThrow(/positive definite/);
    expect(() => jacobi(N)).toThrow(/positive diagonal/);
  });
});
