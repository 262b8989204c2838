/**
 * Compressed sparse row matrices with a symmetric structure.
 *
 * Row i holds its column indices sorted ascending and unique in cols[rowPtr[i] .. rowPtr[i+1]).
 * Column indices are Uint32 and values Float64: the matrix-vector product streams 12 bytes per
 * nonzero, which is what bounds its speed (see the bandwidth benchmark).
 */
export interface Csr {
  n: number;
  rowPtr: Uint32Array;
  cols: Uint32Array;
  vals: Float64Array;
}

/**
 * Sparsity pattern of a finite-element matrix: (i, j) is present when dofs i and j share an
 * element. Built once per space: dof → elements incidence, then per row a marker pass collects
 * the unique neighbours, which are sorted. Two passes (count, then fill) keep memory at the
 * final size. Deterministic: rows and columns come out sorted.
 */
export function sparsityPattern(elemDofs: Uint32Array, perElem: number, nDofs: number): Csr {
  const m = elemDofs.length / perElem;
  const inc = new Uint32Array(nDofs + 1);
  for (let k = 0; k < elemDofs.length; k++) inc[elemDofs[k] + 1]++;
  for (let i = 0; i < nDofs; i++) inc[i + 1] += inc[i];
  const fill = inc.slice(0, nDofs);
  const elems = new Uint32Array(elemDofs.length);
  for (let t = 0; t < m; t++) for (let a = 0; a < perElem; a++) elems[fill[elemDofs[t * perElem + a]]++] = t;

  const marker = new Int32Array(nDofs).fill(-1);
  const rowPtr = new Uint32Array(nDofs + 1);
  for (let i = 0; i < nDofs; i++) {
    let count = 0;
    for (let k = inc[i]; k < inc[i + 1]; k++) {
      const base = elems[k] * perElem;
      for (let a = 0; a < perElem; a++) {
        const j = elemDofs[base + a];
        if (marker[j] !== i) { marker[j] = i; count++; }
      }
    }
    rowPtr[i + 1] = rowPtr[i] + count;
  }
  const cols = new Uint32Array(rowPtr[nDofs]);
  marker.fill(-1);
  for (let i = 0; i < nDofs; i++) {
    let p = rowPtr[i];
    for (let k = inc[i]; k < inc[i + 1]; k++) {
      const base = elems[k] * perElem;
      for (let a = 0; a < perElem; a++) {
        const j = elemDofs[base + a];
        if (marker[j] !== i) { marker[j] = i; cols[p++] = j; }
      }
    }
    cols.subarray(rowPtr[i], rowPtr[i + 1]).sort();
  }
  return { n: nDofs, rowPtr, cols, vals: new Float64Array(cols.length) };
}

/** Position of column j in row i (the pattern must contain it). Binary search on sorted columns. */
export function findEntry(A: Csr, i: number, j: number): number {
  let lo = A.rowPtr[i], hi = A.rowPtr[i + 1] - 1;
  const cols = A.cols;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (cols[mid] < j) lo = mid + 1;
    else hi = mid;
  }
  if (cols[lo] !== j) throw new Error(`sparsity pattern has no entry (${i}, ${j})`);
  return lo;
}

/**
 * y = A x. The tight loop: one pass over rowPtr, cols and vals. Two accumulators per row break
 * the floating-point add dependency chain (a row of a P2 matrix has ~30–60 entries).
 */
export function spmv(A: Csr, x: Float64Array, y: Float64Array): void {
  const { n, rowPtr, cols, vals } = A;
  let k = rowPtr[0];
  for (let i = 0; i < n; i++) {
    const end = rowPtr[i + 1];
    let s0 = 0;
    let s1 = 0;
    for (; k + 1 < end; k += 2) {
      s0 += vals[k] * x[cols[k]];
      s1 += vals[k + 1] * x[cols[k + 1]];
    }
    if (k < end) {
      s0 += vals[k] * x[cols[k]];
      k++;
    }
    y[i] = s0 + s1;
  }
}

/** Diagonal of A (zero where the pattern has no diagonal entry). */
export function diagonal(A: Csr): Float64Array {
  const d = new Float64Array(A.n);
  for (let i = 0; i < A.n; i++) {
    for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) if (A.cols[k] === i) d[i] = A.vals[k];
  }
  return d;
}

/** A copy sharing the (immutable) structure, with its own values. */
export function withValues(A: Csr, vals: Float64Array = A.vals.slice()): Csr {
  return { n: A.n, rowPtr: A.rowPtr, cols: A.cols, vals };
}

/** Largest |A_ij − A_ji| (structure is symmetric, so A_ji is found by search). For tests and checks. */
export function asymmetry(A: Csr): number {
  let worst = 0;
  for (let i = 0; i < A.n; i++) {
    for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) {
      const j = A.cols[k];
      worst = Math.max(worst, Math.abs(A.vals[k] - A.vals[findEntry(A, j, i)]));
    }
  }
  return worst;
}
