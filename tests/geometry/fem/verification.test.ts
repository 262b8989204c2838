/**
 * Verification of the Coulomb solver against analytic results (sources beside each check):
 *  - hydrogen-like 1s of radius a: U = (5/8)·e²/(4πε0 εr a) — the classic first-order helium
 *    integral (5/8 Hartree at a = a0; any quantum-chemistry text); e²/4πε0 = 1.439964547 eV·nm
 *    (CODATA 2018);
 *  - observed convergence rates on graded meshes: N^(−2/3) for P1, N^(−4/3) for P2 (energy error
 *    O(h^{2p}), standard a-priori estimates, e.g. Ciarlet 1978);
 *  - the far-field (maximum-principle) bound against the measured boundary error.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { solveCoulomb, energiesOnMesh, type CoulombResult, type SiteEnergy } from '../../../geometry/fem/coulomb';
import { fitLogLog } from '../../../geometry/fem/convergence';
import { farFieldCheck } from '../../../geometry/farfield';
import { meshDesign, refineUniform, toTetMesh } from '../../../geometry/mesh/index';
import { COULOMB_EV_NM } from '../../../geometry/units';
import type { Orbital } from '../../../geometry/design/types';
import { oneSite } from './coulomb-fixtures';

const EPS = 11.7;
const K = COULOMB_EV_NM / EPS;
const a = 2.5;
const ONE_S: Orbital = { model: 'hydrogenic-1s', radiusNm: a };
const U_1S = (5 / 8) * K / a; // 5/8 Hartree scaled by a0/a and 1/εr

describe('hydrogen-like 1s, P2 with adaptive refinement', () => {
  // multipole boundary on a box of half-width 16a: the 1s density is spherical, so its multipole
  // expansion is the exact exterior potential up to the exp(−32) tail (the box bound accounts for it)
  const d = oneSite(ONE_S, { half: 16 * a, order: 2, tol: 1e-4, boundary: { kind: 'multipole', order: 0 }, position: [0.1, -0.2, 0.3] });
  let r: CoulombResult;
  let s: SiteEnergy;
  beforeAll(() => {
    r = solveCoulomb(d, { adaptive: true });
    s = r.sites[0];
  }, 600_000);

  it('reaches a relative error below 1e-4 of (5/8)e²/(4πε0 εr a), and its error bar covers the true error', () => {
    expect(r.meetsTarget).toBe(true);
    expect(Math.abs(s.uEv - U_1S) / U_1S).toBeLessThan(1e-4);
    expect(Math.abs(s.uEv - U_1S)).toBeLessThanOrEqual(s.uErrorEv);
    // the far-field bound is part of the bar
    expect(s.uErrorEv).toBeGreaterThanOrEqual(s.budget.boundaryEv + s.budget.discretisationEv);
    expect(s.budget.boundaryEv).toBeGreaterThan(0);
  });

  it('converges at about N^(-4/3) on the adaptively graded meshes (P2 theory)', () => {
    const lv = r.levels.slice(-4);
    const fit = fitLogLog(lv.map((l) => l.dofs), lv.map((l) => Math.abs(l.uEv[0] - U_1S)))!;
    expect(Math.abs(fit.rate - 4 / 3)).toBeLessThan(0.3);
  });
});

describe('P1 on graded meshes', () => {
  it('converges at about N^(-2/3) under uniform refinement of a graded mesh (P1 theory)', () => {
    // tol 3e-2: with the recalibrated core-size rule this gives the same meshes as 1e-2 did before
    const d = oneSite(ONE_S, { half: 12 * a, order: 1, tol: 3e-2 });
    const bm = meshDesign(d, { h0Factor: 2, keepBisectionMesh: true }).bisectionMesh!;
    const N: number[] = [];
    const err: number[] = [];
    for (let k = 0; k < 3; k++) {
      if (k > 0) refineUniform(bm, 3);
      const e = energiesOnMesh(d, toTetMesh(bm), 1);
      N.push(e.dofs);
      err.push(Math.abs(e.uEv[0] - U_1S));
    }
    const fit = fitLogLog(N, err)!;
    expect(Math.abs(fit.rate - 2 / 3)).toBeLessThan(0.2);
  });
});

describe('far-field bound against the measured boundary error', () => {
  const G: Orbital = { model: 'gaussian', sigmaNm: 1 };

  it('grounded box: the bound is at least the measured error and at most twice it', () => {
    const grounded = oneSite(G, { half: 10, order: 2, tol: 1e-3, boundary: { kind: 'grounded' } });
    const reference = oneSite(G, { half: 20, order: 2, tol: 1e-3, boundary: { kind: 'multipole', order: 2 } });
    const rg = solveCoulomb(grounded).sites[0];
    const rm = solveCoulomb(reference).sites[0];
    const measured = rm.uEv - rg.uEv;
    const slack = rg.budget.discretisationEv + rm.uErrorEv;
    const bound = farFieldCheck(grounded).sites[0].uBoundEv!;
    expect(measured).toBeGreaterThan(5 * slack); // the effect is well resolved
    expect(bound).toBeGreaterThanOrEqual(measured - slack);
    expect(bound).toBeLessThanOrEqual(2 * (measured + slack));
    expect(rg.budget.boundaryEv).toBeCloseTo(bound, 12);
  });

  it('multipole box: the change when the box is doubled stays within the bounds', () => {
    const o: Orbital = { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 };
    const small = oneSite(o, { half: 8, order: 2, tol: 3e-3, boundary: { kind: 'multipole', order: 0 } });
    const big = oneSite(o, { half: 16, order: 2, tol: 3e-3, boundary: { kind: 'multipole', order: 0 } });
    const rs = solveCoulomb(small, { levels: 2 }).sites[0];
    const rb = solveCoulomb(big, { levels: 2 }).sites[0];
    const change = Math.abs(rb.uEv - rs.uEv);
    const bs = farFieldCheck(small).sites[0].uBoundEv!;
    const bb = farFieldCheck(big).sites[0].uBoundEv!;
    expect(bs).toBeGreaterThan(bb);
    expect(change).toBeLessThanOrEqual(bs + bb + rs.budget.discretisationEv + rb.budget.discretisationEv);
  });
});
