/**
 * Adaptive refinement: Dörfler marking, the residual indicator, and the loop's two exits
 * (target met; budget spent — then no number is presented as converged).
 */
import { describe, expect, it } from 'vitest';
import { dorflerMark, residualIndicator } from '../../../geometry/fem/adaptive';
import { buildSpace } from '../../../geometry/fem/space';
import { interpolate } from '../../../geometry/fem/assemble';
import { kuhnBox, refineUniform, toTetMesh } from '../../../geometry/mesh/index';
import { solveCoulomb } from '../../../geometry/fem/coulomb';
import { oneSite } from './coulomb-fixtures';

describe('dorflerMark', () => {
  it('marks the smallest set of largest indicators reaching θ of the total (Dörfler 1996)', () => {
    const eta = new Float64Array([1, 5, 3, 0.5, 4, 2]); // total 15.5
    const m = dorflerMark(eta, 0.5); // need ≥ 7.75: 5 + 4 = 9 (5 alone is short)
    expect(Array.from(m)).toEqual([0, 1, 0, 0, 1, 0]);
    const all = dorflerMark(eta, 1);
    expect(all.every((v) => v === 1)).toBe(true);
  });

  it('breaks ties by element index, deterministically', () => {
    const eta = new Float64Array([2, 2, 2, 2]);
    expect(Array.from(dorflerMark(eta, 0.5))).toEqual([1, 1, 0, 0]);
    expect(Array.from(dorflerMark(eta, 0.3))).toEqual([1, 1, 0, 0]); // 0.3·8 = 2.4 needs two
  });

  it('rejects θ outside (0, 1]', () => {
    expect(() => dorflerMark(new Float64Array([1]), 0)).toThrow(/θ/);
    expect(() => dorflerMark(new Float64Array([1]), 1.5)).toThrow(/θ/);
  });
});

describe('residualIndicator', () => {
  const mesh = toTetMesh(refineUniform(kuhnBox({ center: [0, 0, 0], halfExtents: [1, 1, 1], cells: [2, 2, 2] }), 3));
  const eps = new Float64Array(256).fill(2);

  it('vanishes when P2 reproduces the solution exactly (u = x²+y²+z², −∇·(ε∇u) = −6ε: polynomial exactness of P2)', () => {
    const space = buildSpace(mesh, 2);
    const u = interpolate(space, (x, y, z) => x * x + y * y + z * z);
    const eta = residualIndicator(space, u, () => -6 * 2, eps);
    let max = 0;
    for (const v of eta) max = Math.max(max, v);
    expect(max).toBeLessThan(1e-20);
  });

  it('is positive for a P1 field that cannot represent the same solution', () => {
    const space = buildSpace(mesh, 1);
    const u = interpolate(space, (x, y, z) => x * x + y * y + z * z);
    const eta = residualIndicator(space, u, () => -6 * 2, eps);
    let sum = 0;
    for (const v of eta) sum += v;
    expect(sum).toBeGreaterThan(1e-3);
  });
});

describe('adaptive loop', () => {
  it('stops at the element budget with a clear message and meetsTarget = false', () => {
    const d = oneSite({ model: 'gaussian', sigmaNm: 1 }, { half: 12, order: 1, tol: 1e-5, maxElements: 60_000 });
    const r = solveCoulomb(d, { adaptive: true });
    expect(r.meetsTarget).toBe(false);
    expect(r.elements).toBeLessThanOrEqual(60_000);
    expect(r.notes.join(' ')).toMatch(/budget .* spent|NOT converged/);
  });

  it('meets a loose target and says so', () => {
    // Gaussian self-energy 1/(σ√π) (standard result for Gaussian charge distributions)
    const d = oneSite({ model: 'gaussian', sigmaNm: 1 }, { half: 12, order: 2, tol: 3e-3 });
    const r = solveCoulomb(d, { adaptive: true });
    expect(r.meetsTarget).toBe(true);
    expect(r.estimatedRelError).toBeLessThanOrEqual(3e-3);
    const exact = (1.439964547 / 11.7) / Math.sqrt(Math.PI); // e²/4πε0 from CODATA 2018
    expect(Math.abs(r.sites[0].uEv - exact)).toBeLessThanOrEqual(r.sites[0].uErrorEv);
    expect(r.levels.length).toBeGreaterThanOrEqual(2);
  });
});
