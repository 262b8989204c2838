import { describe, expect, it } from 'vitest';
import { sparsityPattern, spmv, findEntry, diagonal, asymmetry } from '../../../geometry/fem/csr';
import { uniformBox } from './multigrid-fixture';
import { buildSpace } from '../../../geometry/fem/space';
import { assembleStiffness, spacePattern } from '../../../geometry/fem/assemble';

describe('CSR sparsity pattern', () => {
  it('holds exactly the pairs of dofs that share an element, sorted and unique per row', () => {
    // two triangles-worth of "elements" with 3 dofs each, sharing dofs 1 and 2
    const elems = new Uint32Array([0, 1, 2, 2, 1, 3]);
    const A = sparsityPattern(elems, 3, 4);
    const rows = Array.from({ length: 4 }, (_, i) => Array.from(A.cols.subarray(A.rowPtr[i], A.rowPtr[i + 1])));
    expect(rows).toEqual([[0, 1, 2], [0, 1, 2, 3], [0, 1, 2, 3], [1, 2, 3]]);
    expect(() => findEntry(A, 0, 3)).toThrow(/no entry/);
  });

  it('P2 pattern is symmetric and each row lists its own dof', () => {
    const space = buildSpace(uniformBox(1, 1, 3), 2);
    const A = spacePattern(space);
    for (let i = 0; i < A.n; i++) {
      const row = A.cols.subarray(A.rowPtr[i], A.rowPtr[i + 1]);
      for (let k = 1; k < row.length; k++) expect(row[k]).toBeGreaterThan(row[k - 1]);
      expect(findEntry(A, i, i)).toBeGreaterThanOrEqual(0);
      for (const j of row) expect(findEntry(A, j, i)).toBeGreaterThanOrEqual(0);
    }
  });

  it('spmv equals the dense product, and the pattern is built once per space', () => {
    const space = buildSpace(uniformBox(1, 1, 2), 1);
    const A = assembleStiffness(space, [1]);
    expect(A.cols).toBe(assembleStiffness(space, [2]).cols); // shared structure
    const n = A.n;
    const dense = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) dense[i * n + A.cols[k]] = A.vals[k];
    const x = Float64Array.from({ length: n }, (_, i) => Math.sin(i + 1));
    const y = new Float64Array(n);
    spmv(A, x, y);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = 0; j < n; j++) s += dense[i * n + j] * x[j];
      expect(y[i]).toBeCloseTo(s, 13);
    }
    expect(diagonal(A)[0]).toBe(dense[0]);
    expect(asymmetry(A)).toBeLessThan(1e-15);
  });
});
