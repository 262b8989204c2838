/**
 * The numerical core's one error type (geometry/errors.ts): every refusal is a CoreError with a
 * stable code and details, and every cancel is the one CoreAbortError (code 'aborted', name
 * 'AbortError' like the platform's DOMException; WHATWG DOM standard, "AbortError").
 */
import { describe, expect, it } from 'vitest';
import { CoreAbortError, CoreError } from '../../geometry/errors';
import { MeshError, meshDesign } from '../../geometry/mesh/index';
import { decodeMeshBinary } from '../../geometry/mesh/export/index';
import { solveCoulomb, CoulombError } from '../../geometry/fem/coulomb';
import { runConvergence } from '../../geometry/fem/convergence';
import { pcg } from '../../geometry/fem/pcg';
import type { Csr } from '../../geometry/fem/csr';
import { oneSite, withSites } from './fem/coulomb-fixtures';

const gaussian = (sigmaNm: number) => ({ model: 'gaussian' as const, sigmaNm });

/** 1D Laplacian, tridiagonal (2, −1): symmetric positive definite (common practice) */
function laplace1d(n: number): Csr {
  const rowPtr = new Uint32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  for (let i = 0; i < n; i++) {
    for (const [j, v] of [[i - 1, -1], [i, 2], [i + 1, -1]] as const) {
      if (j < 0 || j >= n) continue;
      cols.push(j);
      vals.push(v);
    }
    rowPtr[i + 1] = cols.length;
  }
  return { n, rowPtr, cols: Uint32Array.from(cols), vals: Float64Array.from(vals) };
}

function thrown(f: () => unknown): unknown {
  try {
    f();
  } catch (e) {
    return e;
  }
  throw new Error('expected a throw');
}

describe('CoreError', () => {
  it('a mesher refusal is a CoreError with its code and figures', () => {
    const d = oneSite(gaussian(0.5), { maxElements: 1000, tol: 1e-4 });
    const e = thrown(() => meshDesign(d));
    expect(e).toBeInstanceOf(MeshError);
    expect(e).toBeInstanceOf(CoreError);
    expect((e as CoreError).code).toBe('too-many-elements');
    expect(typeof (e as CoreError).details.limit === 'number' || typeof (e as CoreError).details.estimate === 'number').toBe(true);
  });

  it('a Coulomb refusal is a CoreError with its code', () => {
    const base = oneSite(gaussian(1));
    const d = withSites(base, [{ ...base.sites[0], electrons: 0 }]);
    const e = thrown(() => solveCoulomb(d));
    expect(e).toBeInstanceOf(CoulombError);
    expect(e).toBeInstanceOf(CoreError);
    expect((e as CoreError).code).toBe('no-sites');
    // a named site without electrons: the code and the site in the details, for the caller's words
    const named = thrown(() => solveCoulomb(withSites(base, [{ ...base.sites[0], electrons: 0 }, { ...base.sites[0], id: 'd2', position: [1, 0, 0] }]), { siteIds: ['d1'] }));
    expect(named).toMatchObject({ code: 'no-electrons', details: { siteId: 'd1' } });
    expect(thrown(() => solveCoulomb(base, { siteIds: ['nowhere'] }))).toMatchObject({ code: 'unknown-site', details: { siteId: 'nowhere' } });
  });

  it('unreadable mesh bytes are a CoreError', () => {
    const e = thrown(() => decodeMeshBinary(new Uint8Array(10)));
    expect(e).toBeInstanceOf(CoreError);
    expect((e as CoreError).code).toBe('bad-mesh-bytes');
  });
});

describe('one abort error for every cancel', () => {
  const aborted = { aborted: true };

  it('PCG, the graded solve, the adaptive solve and a sweep all throw CoreAbortError', () => {
    const d = oneSite(gaussian(1), { half: 12, order: 1, tol: 5e-2 });
    const cases: (() => unknown)[] = [
      () => pcg(laplace1d(50), new Float64Array(50).fill(1), null, { signal: aborted }),
      () => solveCoulomb(d, { signal: aborted, levels: 2 }),
      () => solveCoulomb(d, { signal: aborted, adaptive: true }),
      () => runConvergence(d, { kind: 'box', factors: [1], signal: aborted }),
    ];
    for (const f of cases) {
      const e = thrown(f);
      expect(e).toBeInstanceOf(CoreAbortError);
      expect((e as CoreError).code).toBe('aborted');
      expect((e as Error).name).toBe('AbortError');
    }
  });
});
