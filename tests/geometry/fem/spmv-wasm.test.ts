/**
 * The WebAssembly SIMD product (geometry/fem/spmv-wasm.ts) against the JS spmv and the dense
 * definition y_i = Σ_j A_ij x_j (the textbook matrix-vector product).
 * Exactness on integer data: integer products and sums below 2^53 are exact in IEEE 754 double,
 * so any summation order gives the dense result bit for bit (IEEE 754-2008, exact operations).
 */
import { describe, expect, it } from 'vitest';
import { spmv, type Csr } from '../../../geometry/fem/csr';
import { prepareSpmv, releaseSpmvMemory, spmvArenaBytes, spmvModuleBytes, wasmSpmvAvailable } from '../../../geometry/fem/spmv-wasm';
import { buildSpace } from '../../../geometry/fem/space';
import { assembleSystem } from '../../../geometry/fem/assemble';
import { pcg, jacobi } from '../../../geometry/fem/pcg';
import { uniformBox, gradedBox } from './multigrid-fixture';

/** Deterministic uniform numbers in [0, 1) (a 32-bit LCG, Numerical Recipes constants). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

/** A random integer CSR matrix: row lengths 0..7 (odd and even tails), sorted unique columns. */
function randomIntegerCsr(n: number, rand: () => number): Csr {
  const rowPtr = new Uint32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  for (let i = 0; i < n; i++) {
    const len = Math.floor(rand() * 8);
    const set = new Set<number>();
    while (set.size < Math.min(len, n)) set.add(Math.floor(rand() * n));
    for (const j of [...set].sort((a, b) => a - b)) {
      cols.push(j);
      vals.push(Math.floor(rand() * 41) - 20);
    }
    rowPtr[i + 1] = cols.length;
  }
  return { n, rowPtr, cols: Uint32Array.from(cols), vals: Float64Array.from(vals) };
}

function dense(A: Csr, x: Float64Array): Float64Array {
  const y = new Float64Array(A.n);
  for (let i = 0; i < A.n; i++) {
    let s = 0;
    for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) s += A.vals[k] * x[A.cols[k]];
    y[i] = s;
  }
  return y;
}

describe('WebAssembly SIMD spmv', () => {
  it('the hand-assembled module validates and Node 20 runs the SIMD kernel', () => {
    const bytes = spmvModuleBytes();
    expect(Array.from(bytes.subarray(0, 8))).toEqual([0x00, 0x61, 0x73, 0x6d, 1, 0, 0, 0]);
    expect(WebAssembly.validate(bytes)).toBe(true);
    expect(wasmSpmvAvailable()).toBe(true);
    const A = randomIntegerCsr(5, lcg(1));
    expect(prepareSpmv(A).kernel).toBe('wasm-simd');
    expect(prepareSpmv(A, { kernel: 'js' }).kernel).toBe('js');
  });

  it('is exact on small integer matrices (rows of 0 to 7 entries)', () => {
    const rand = lcg(7);
    for (const n of [1, 2, 3, 17, 200]) {
      const A = randomIntegerCsr(n, rand);
      const x = Float64Array.from({ length: n }, () => Math.floor(rand() * 201) - 100);
      const y = new Float64Array(n).fill(NaN);
      prepareSpmv(A)(x, y);
      expect(Array.from(y)).toEqual(Array.from(dense(A, x)));
    }
  });

  for (const order of [1, 2] as const) {
    it(`P${order} assembled matrix, random x: same bits as the JS spmv (hence within 1e-14 relative)`, () => {
      const A = assembleSystem(buildSpace(gradedBox(2, 0.5, [0.31, 0.57, 0.44], 0.03, 0.6), order), [11.7]).A;
      const rand = lcg(order * 101);
      const x = Float64Array.from({ length: A.n }, () => 2 * rand() - 1);
      const yJs = new Float64Array(A.n);
      const yW = new Float64Array(A.n);
      spmv(A, x, yJs);
      const P = prepareSpmv(A);
      expect(P.kernel).toBe('wasm-simd');
      P(x, yW);
      // relative to the row's absolute sum Σ|A_ij x_j| (the scale of rounding in that row)
      let worst = 0;
      for (let i = 0; i < A.n; i++) {
        let scale = 0;
        for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) scale += Math.abs(A.vals[k] * x[A.cols[k]]);
        worst = Math.max(worst, Math.abs(yW[i] - yJs[i]) / scale);
      }
      expect(worst).toBeLessThan(1e-14);
      // the lanes of the kernel follow the JS accumulators exactly (see spmv-wasm.ts)
      expect(Buffer.from(yW.buffer).equals(Buffer.from(yJs.buffer))).toBe(true);
    });
  }

  it('a matrix prepared earlier stays correct after another one took the arena', () => {
    const rand = lcg(3);
    const big = assembleSystem(buildSpace(uniformBox(2, 0.5, 6), 2), [1]).A;
    const small = randomIntegerCsr(50, rand);
    const pSmall = prepareSpmv(small);
    const pBig = prepareSpmv(big); // grows the arena and overwrites small's copy
    const xs = Float64Array.from({ length: 50 }, () => Math.floor(rand() * 21) - 10);
    const ys = new Float64Array(50);
    pSmall(xs, ys);
    expect(Array.from(ys)).toEqual(Array.from(dense(small, xs)));
    const xb = Float64Array.from({ length: big.n }, () => rand());
    const yb = new Float64Array(big.n);
    const yRef = new Float64Array(big.n);
    pBig(xb, yb);
    spmv(big, xb, yRef);
    expect(Array.from(yb)).toEqual(Array.from(yRef));
  });

  it('hands back the memory grown for a big matrix: the arena is dropped and a fresh small one serves the next matrix', () => {
    const rand = lcg(5);
    // a tridiagonal matrix of 200,000 rows: an arena of about 8.8 MB (4(n+1) + 12 nnz + 16 n bytes)
    const n = 200_000;
    const rowPtr = new Uint32Array(n + 1);
    const cols: number[] = [];
    const vals: number[] = [];
    for (let i = 0; i < n; i++) {
      for (const j of [i - 1, i, i + 1]) {
        if (j < 0 || j >= n) continue;
        cols.push(j);
        vals.push(j === i ? 2 : -1);
      }
      rowPtr[i + 1] = cols.length;
    }
    const big: Csr = { n, rowPtr, cols: Uint32Array.from(cols), vals: Float64Array.from(vals) };
    const pBig = prepareSpmv(big);
    const grown = spmvArenaBytes();
    expect(grown).toBeGreaterThan(8_000_000);
    // below the threshold nothing is dropped
    expect(releaseSpmvMemory(grown)).toBe(false);
    expect(spmvArenaBytes()).toBe(grown);
    // above it the instance and its memory go; nothing is instantiated until a product needs it
    expect(releaseSpmvMemory(1 << 20)).toBe(true);
    expect(spmvArenaBytes()).toBe(0);
    const small = randomIntegerCsr(50, rand);
    const pSmall = prepareSpmv(small);
    expect(pSmall.kernel).toBe('wasm-simd');
    expect(spmvArenaBytes()).toBe(65536); // one fresh 64 KiB page: the WebAssembly page size
    const xs = Float64Array.from({ length: 50 }, () => Math.floor(rand() * 21) - 10);
    const ys = new Float64Array(50);
    pSmall(xs, ys);
    expect(Array.from(ys)).toEqual(Array.from(dense(small, xs)));
    // the big matrix prepared before the release still gives the JS spmv's bits (it loads itself again)
    const xb = Float64Array.from({ length: n }, () => rand());
    const yb = new Float64Array(n);
    const yRef = new Float64Array(n);
    pBig(xb, yb);
    spmv(big, xb, yRef);
    expect(yb).toEqual(yRef);
    expect(releaseSpmvMemory(1 << 20)).toBe(true);
  });

  it('PCG with the kernel is deterministic and gives the same bits as PCG on the JS spmv', () => {
    const space = buildSpace(gradedBox(2, 0.5, [0.31, 0.57, 0.44], 0.05, 0.6), 2);
    const { A } = assembleSystem(space, [11.7]);
    // SPD: add the identity (the Neumann stiffness alone is singular)
    const vals = A.vals.slice();
    for (let i = 0; i < A.n; i++) for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) if (A.cols[k] === i) vals[k] += 1;
    const M: Csr = { ...A, vals };
    const rand = lcg(11);
    const b = Float64Array.from({ length: M.n }, () => rand() - 0.5);
    const r1 = pcg(M, b, null, { preconditioner: jacobi(M), tol: 1e-10 });
    const r2 = pcg(M, b, null, { preconditioner: jacobi(M), tol: 1e-10 });
    const rJs = pcg(M, b, null, { preconditioner: jacobi(M), tol: 1e-10, spmvKernel: 'js' });
    expect(r1.converged).toBe(true);
    expect(r1.relResidual).toBeLessThan(1e-9);
    expect(Buffer.from(r1.x.buffer).equals(Buffer.from(r2.x.buffer))).toBe(true);
    expect(r1.iterations).toBe(rJs.iterations);
    expect(Buffer.from(r1.x.buffer).equals(Buffer.from(rJs.x.buffer))).toBe(true);
  });
});
