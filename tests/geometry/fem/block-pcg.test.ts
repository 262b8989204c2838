/**
 * Block PCG (geometry/fem/block-pcg.ts) and its kernels (block-kernels.ts): k right-hand sides in
 * lock-step on one matrix must give, column by column, exactly what the single-vector code gives
 * (pcg.ts, csr.ts spmv, multigrid.ts), and the analytic answers where there are some.
 * Exactness on integer data: integer products and sums below 2^53 are exact in IEEE 754 double,
 * so any summation order gives the dense result bit for bit (IEEE 754-2008, exact operations).
 */
import { describe, expect, it } from 'vitest';
import { spmv, type Csr } from '../../../geometry/fem/csr';
import { blockModuleBytes, prepareBlockKernels, wasmBlockAvailable } from '../../../geometry/fem/block-kernels';
import { blockPcg } from '../../../geometry/fem/block-pcg';
import { pcg, jacobi, type PcgResult, type Preconditioner } from '../../../geometry/fem/pcg';
import { multigridPreconditioner } from '../../../geometry/fem/multigrid';
import { buildSpace } from '../../../geometry/fem/space';
import { assembleStiffness, applyDirichlet } from '../../../geometry/fem/assemble';
import { gradedBox } from './multigrid-fixture';

/** Deterministic uniform numbers in [0, 1) (a 32-bit LCG, Numerical Recipes constants). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

/**
 * A random sparse symmetric matrix with a positive diagonal larger than each row's off-diagonal
 * sum: symmetric and strictly diagonally dominant, hence positive definite (Gershgorin's theorem).
 * `integer` keeps every entry an integer (for the exact checks).
 */
function randomSpd(n: number, rand: () => number, integer: boolean): Csr {
  const rows: Map<number, number>[] = Array.from({ length: n }, () => new Map());
  for (let i = 0; i < n; i++) {
    const len = Math.floor(rand() * 7);
    for (let t = 0; t < len; t++) {
      const j = Math.floor(rand() * n);
      if (j === i) continue;
      const v = integer ? -(1 + Math.floor(rand() * 9)) : -rand();
      rows[i].set(j, v);
      rows[j].set(i, v);
    }
  }
  const rowPtr = new Uint32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  for (let i = 0; i < n; i++) {
    let off = 0;
    for (const v of rows[i].values()) off += Math.abs(v);
    rows[i].set(i, off + (integer ? 1 + Math.floor(rand() * 5) : 0.1 + rand()));
    for (const j of [...rows[i].keys()].sort((a, b) => a - b)) {
      cols.push(j);
      vals.push(rows[i].get(j)!);
    }
    rowPtr[i + 1] = cols.length;
  }
  return { n, rowPtr, cols: Uint32Array.from(cols), vals: Float64Array.from(vals) };
}

const kernels = wasmBlockAvailable() ? (['auto', 'js'] as const) : (['js'] as const);

function interleave(cols: Float64Array[], n: number): Float64Array {
  const k = cols.length;
  const X = new Float64Array(n * k);
  cols.forEach((c, j) => { for (let i = 0; i < n; i++) X[i * k + j] = c[i]; });
  return X;
}
const column = (X: Float64Array, n: number, k: number, j: number): Float64Array => Float64Array.from({ length: n }, (_, i) => X[i * k + j]);
const sameBits = (a: Float64Array, b: Float64Array): boolean => Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

function expectSameResult(a: PcgResult, b: PcgResult): void {
  expect(b.iterations).toBe(a.iterations);
  expect(b.converged).toBe(a.converged);
  expect(Object.is(b.relResidual, a.relResidual)).toBe(true);
  expect(sameBits(a.x, b.x)).toBe(true);
  expect(sameBits(a.history, b.history)).toBe(true);
}

describe('block kernels', () => {
  it('the WebAssembly module validates for even widths and the widths are refused otherwise', () => {
    for (const k of [2, 4, 8, 16]) expect(WebAssembly.validate(blockModuleBytes(k))).toBe(wasmBlockAvailable());
    expect(() => blockModuleBytes(3)).toThrow(/even/);
  });

  it('y = A x on integer data equals the dense definition y_i = Σ_j A_ij x_j for every column (exact arithmetic), WebAssembly and JS', () => {
    const rand = lcg(7);
    const A = randomSpd(301, rand, true);
    for (const kernel of kernels) {
      for (const k of [1, 2, 4, 6]) {
        const xs = Array.from({ length: k }, () => Float64Array.from({ length: A.n }, () => Math.floor(rand() * 21) - 10));
        const kern = prepareBlockKernels(A, k, { kernel });
        const Y = new Float64Array(A.n * k);
        kern.spmv(interleave(xs, A.n), Y);
        for (let j = 0; j < k; j++) {
          for (let i = 0; i < A.n; i++) {
            let s = 0;
            for (let p = A.rowPtr[i]; p < A.rowPtr[i + 1]; p++) s += A.vals[p] * xs[j][A.cols[p]];
            expect(Y[i * k + j]).toBe(s);
          }
        }
      }
    }
  });

  it('on an assembled P2 stiffness matrix with random data: every column has the bits of the single-vector spmv, and the Gauss–Seidel passes satisfy their definitions', () => {
    const mesh = gradedBox(2, 1, [0.93, 1.07, 1.01], 0.1, 0.5);
    const space = buildSpace(mesh, 2);
    const { A } = applyDirichlet(assembleStiffness(space, [11.7]), new Float64Array(space.nDofs), space.boundaryDof);
    const n = A.n;
    const rand = lcg(11);
    const k = 4;
    const xs = Array.from({ length: k }, () => Float64Array.from({ length: n }, () => rand() - 0.5));
    const X = interleave(xs, n);
    const y = new Float64Array(n);
    const outs: Float64Array[] = [];
    for (const kernel of kernels) {
      const kern = prepareBlockKernels(A, k, { kernel });
      const Y = kern.vector(0);
      kern.spmv(X, Y);
      for (let j = 0; j < k; j++) {
        spmv(A, xs[j], y);
        expect(sameBits(column(Y, n, k, j), y)).toBe(true);
      }
      // forward sweep from zero: (D + L) Z = B, and Out = B − A Z (Gauss–Seidel, e.g. Saad, Iterative Methods, §4.1)
      const Z = new Float64Array(n * k), Out = new Float64Array(n * k), AZ = new Float64Array(n * k);
      kern.gsForwardFromZeroWithResidual(X, Z, Out);
      prepareBlockKernels(A, k, { kernel: 'js' }).spmv(Z, AZ);
      for (let q = 0; q < n * k; q++) expect(Math.abs(Out[q] - (X[q] - AZ[q]))).toBeLessThan(1e-9 * (1 + Math.abs(X[q])));
      // backward sweep (rows n−1 … 0): row 0 is updated last, so its equation holds exactly after it
      const Zb = Z.slice();
      kern.gsBackward(X, Zb);
      outs.push(Zb);
      const last = 0;
      for (let j = 0; j < k; j++) {
        let s = 0;
        for (let p = A.rowPtr[last]; p < A.rowPtr[last + 1]; p++) s += A.vals[p] * Zb[A.cols[p] * k + j];
        expect(Math.abs(s - X[last * k + j])).toBeLessThan(1e-9 * (1 + Math.abs(X[last * k + j])));
      }
    }
    // WebAssembly and JS: the same bits
    if (outs.length === 2) expect(sameBits(outs[0], outs[1])).toBe(true);
  });
});

describe('block PCG against the single-vector PCG', () => {
  it('random SPD systems (Jacobi, none): every column is bit for bit pcg() on its own, zero right-hand sides, warm starts and an odd width included', () => {
    const rand = lcg(3);
    const A = randomSpd(400, rand, false);
    const nc = 5;
    const bs = Array.from({ length: nc }, (_, j) => (j === 2 ? new Float64Array(A.n) : Float64Array.from({ length: A.n }, () => rand() - 0.5)));
    const x0s = bs.map((_, j) => (j === 1 ? Float64Array.from({ length: A.n }, () => rand()) : null));
    const preconditioners: (Preconditioner | undefined)[] = [jacobi(A), undefined];
    for (const M of preconditioners) {
      for (const kernel of kernels) {
        const blk = blockPcg(A, bs, x0s, { preconditioner: M, tol: 1e-9, spmvKernel: kernel });
        bs.forEach((b, j) => expectSameResult(pcg(A, b, x0s[j], { preconditioner: M, tol: 1e-9 }), blk[j]));
        expect(blk[2].iterations).toBe(0);
        expect(blk[2].x.every((v) => Object.is(v, 0))).toBe(true);
        expect(blk[0].relResidual).toBeLessThan(1e-8);
      }
    }
  });

  it('a column given its exact solution does no iteration and keeps it; the others converge (each column its own stopping rule)', () => {
    // Source: the 1D second difference of x_i = i(n+1−i)/2 is exactly 1 (x_0 = x_{n+1} = 0).
    const n = 150;
    const rowPtr = new Uint32Array(n + 1), cols: number[] = [], vals: number[] = [];
    for (let i = 0; i < n; i++) {
      for (const j of [i - 1, i, i + 1]) if (j >= 0 && j < n) { cols.push(j); vals.push(j === i ? 2 : -1); }
      rowPtr[i + 1] = cols.length;
    }
    const A: Csr = { n, rowPtr, cols: Uint32Array.from(cols), vals: Float64Array.from(vals) };
    const exact = Float64Array.from({ length: n }, (_, i) => ((i + 1) * (n - i)) / 2);
    const ones = new Float64Array(n).fill(1);
    const twos = new Float64Array(n).fill(2);
    const [a, b, c] = blockPcg(A, [ones, ones, twos], [null, exact, null], { tol: 1e-12 });
    expect(b.iterations).toBe(0);
    expect(sameBits(b.x, exact)).toBe(true);
    expect(a.iterations).toBeGreaterThan(0);
    for (let i = 0; i < n; i++) {
      expect(a.x[i]).toBeCloseTo(exact[i], 6);
      expect(c.x[i]).toBeCloseTo(2 * exact[i], 6);
    }
  });

  it('an assembled mesh with the multigrid preconditioner, P1 and P2: bit for bit pcg() per column, and the same bytes twice', () => {
    const mesh = gradedBox(2, 1, [0.93, 1.07, 1.01], 0.05, 0.5);
    for (const order of [1, 2] as const) {
      const space = buildSpace(mesh, order);
      const n = space.nDofs;
      const K = assembleStiffness(space, [11.7]);
      const rand = lcg(order);
      // walls at a smooth potential (the lifting of coulomb-level.ts and lever.ts), random interior loads
      const g = Float64Array.from({ length: n }, (_, i) => (space.boundaryDof[i] ? Math.sin(space.dofCoords[3 * i] + 2 * space.dofCoords[3 * i + 2]) : 0));
      const sys = applyDirichlet(K, new Float64Array(n), space.boundaryDof, g);
      const M = multigridPreconditioner(space, sys.A);
      const bs = [sys.b, ...Array.from({ length: 5 }, () => Float64Array.from({ length: n }, (_, i) => (space.boundaryDof[i] ? 0 : rand() - 0.5)))];
      const x0s = bs.map((_, j) => (j === 0 ? g : null));
      const one = blockPcg(sys.A, bs, x0s, { preconditioner: M, tol: 1e-8 });
      const two = blockPcg(sys.A, bs, x0s, { preconditioner: M, tol: 1e-8 });
      bs.forEach((b, j) => {
        expectSameResult(pcg(sys.A, b, x0s[j], { preconditioner: M, tol: 1e-8 }), one[j]);
        expect(sameBits(one[j].x, two[j].x)).toBe(true);
        expect(one[j].relResidual).toBeLessThan(1e-7);
      });
    }
  });
});
