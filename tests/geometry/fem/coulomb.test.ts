/**
 * U and V against closed forms, the error bars against the true error, refusals, P1/P2
 * consistency and translation invariance.
 */
import { describe, expect, it } from 'vitest';
import { solveCoulomb, solveSitePotentials, CoulombError } from '../../../geometry/fem/coulomb';
import { erf, selfEnergy, potentialAt, chargeOutsideBox } from '../../../geometry/density';
import { meshDesign, MeshError } from '../../../geometry/mesh/index';
import { COULOMB_EV_NM, SI_LATTICE_CONSTANT_NM } from '../../../geometry/units';
import type { Design } from '../../../geometry/design/types';
import { oneSite, withSites } from './coulomb-fixtures';
import { farFieldCheck } from '../../../geometry/farfield';

const EPS = 11.7;
// e²/(4πε0) = 1.439964547 eV·nm (CODATA 2018), held in geometry/units.ts
const K = COULOMB_EV_NM / EPS;

function twoGaussians(R: number, sigma: number, half: number, tol: number): Design {
  const base = oneSite({ model: 'gaussian', sigmaNm: sigma }, { half, order: 2, tol });
  return {
    ...base,
    sites: [
      { id: 'a', species: 'P', position: [-R / 2, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: sigma } },
      { id: 'b', species: 'P', position: [R / 2, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: sigma } },
      { id: 'ion', species: 'P', position: [0, 3, 0], electrons: 0 },
    ],
  };
}

describe('solveCoulomb', () => {
  it.each(['full', 'split'] as const)('%s: Gaussian self-energy e²/(4πε0 εr)/(σ√π) and pair energy e²/(4πε0 εr)·erf(R/2σ)/R within the error bars (standard Gaussian results)', (method) => {
    const sigma = 1, R = 3;
    const r = solveCoulomb(twoGaussians(R, sigma, 16, 1e-3), { method });
    expect(r.method).toBe(method);
    const uExact = K / (sigma * Math.sqrt(Math.PI));
    const vExact = (K * erf(R / (2 * sigma))) / R;
    expect(r.sites.map((s) => s.id)).toEqual(['a', 'b']); // the ionised site has no density
    expect(r.notes.join(' ')).toMatch(/ion/);
    for (const s of r.sites) {
      expect(Math.abs(s.uEv - uExact)).toBeLessThanOrEqual(s.uErrorEv);
      expect(s.uErrorEv / uExact).toBeLessThan(1e-2); // honest, and still useful
      expect(Math.abs(s.charge - 1)).toBeLessThan(1e-6);
    }
    expect(r.pairs).toHaveLength(1);
    const p = r.pairs[0];
    expect(p.distanceNm).toBeCloseTo(R, 12);
    expect(Math.abs(p.vEv - vExact)).toBeLessThanOrEqual(p.vErrorEv);
    expect(p.vErrorEv / vExact).toBeLessThan(1e-2);
  });

  it('asked for U of a site without electrons: a clear error, no number', () => {
    const d = twoGaussians(3, 1, 16, 1e-2);
    expect(() => solveCoulomb(d, { siteIds: ['ion'] })).toThrow(CoulombError);
    expect(() => solveCoulomb(d, { siteIds: ['ion'] })).toThrow(/no electrons/);
    expect(() => solveCoulomb(d, { siteIds: ['nope'] })).toThrow(/no site "nope"/);
  });

  it('two sites at one position: refused with their ids, no table silently missing the pair', () => {
    const d = twoGaussians(3, 1, 16, 1e-2);
    d.sites[1] = { ...d.sites[1], position: [...d.sites[0].position], electrons: 1 };
    let err: unknown;
    try {
      solveCoulomb(d);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(CoulombError);
    expect((err as CoulombError).code).toBe('sites-coincide');
    expect((err as Error).message).toContain(`"${d.sites[0].id}"`);
    expect((err as Error).message).toContain(`"${d.sites[1].id}"`);
  });

  it('an orbital far narrower than the budget can resolve: refused before meshing, with the numbers', () => {
    // a 0.01 nm orbital in a 40 nm box: the graded mesh needs ~5e3 tetrahedra, the budget allows 3e3
    const d = oneSite({ model: 'hydrogenic-1s', radiusNm: 0.01 }, { half: 40, tol: 1e-4, maxElements: 3000 });
    let err: unknown = null;
    try {
      solveCoulomb(d, { method: 'full' });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(MeshError);
    expect((err as MeshError).code).toBe('too-many-elements');
    expect((err as Error).message).toMatch(/tetrahedra, more than the design's maxElements \(3000\)/);
  });

  it('adaptive mode refuses at once a target below the boundary bound plus the density cut, for sites and for pairs', () => {
    const g = { model: 'gaussian', sigmaNm: 1 } as const;
    // one Gaussian in a multipole box of half-width 3.5σ: the boundary bound alone is below the
    // target, but the density cut by the box (first-order effect 2c·U, common practice) is not
    const tight = oneSite(g, { half: 3.5, order: 2, tol: 1e-3 });
    const f = farFieldCheck(tight).sites[0];
    expect(f.uRelBound!).toBeLessThan(1e-3);
    expect(f.uRelBound! + 2 * f.chargeOutside).toBeGreaterThan(1e-3);
    const events: unknown[] = [];
    expect(() => solveCoulomb(tight, { adaptive: true, onProgress: (p) => events.push(p) })).toThrow(/U of d1: .*boundary error bound plus the density cut/);
    expect(events).toHaveLength(0); // refused before any mesh or solve
    // two Gaussians 6 nm apart in a grounded box: U's bound is below 0.3, V's relative bound is not
    const base = oneSite(g, { half: 12, order: 2, tol: 0.3, boundary: { kind: 'grounded' } });
    const pair = withSites(base, [
      { id: 'a', species: 'P', position: [-3, 0, 0], electrons: 1, orbital: g },
      { id: 'b', species: 'P', position: [3, 0, 0], electrons: 1, orbital: g },
    ]);
    const fp = farFieldCheck(pair);
    for (const s of fp.sites) expect(s.uRelBound! + 2 * s.chargeOutside).toBeLessThan(0.3);
    expect(fp.pairs[0].vRelBound!).toBeGreaterThan(0.3);
    let err: unknown = null;
    try {
      solveCoulomb(pair, { adaptive: true });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(CoulombError);
    expect((err as CoulombError).code).toBe('not-converged');
    expect((err as Error).message).toMatch(/V of a–b/);
  });

  it('says so in a note when the discrete charge misses the charge inside the box by more than 1e-6', () => {
    const orbital = { model: 'hydrogenic-1s', radiusNm: 2.5 } as const;
    const d = oneSite(orbital, { half: 30, order: 1, tol: 5e-2 });
    // the charge inside the box: 1 minus the analytic tail outside it (geometry/density)
    const inside = 1 - chargeOutsideBox(orbital, [0, 0, 0], [0, 0, 0], [30, 30, 30]);
    const good = solveCoulomb(d, { levels: 2, method: 'full' });
    expect(Math.abs(good.sites[0].charge - inside)).toBeLessThan(1e-6);
    expect(good.notes.join(' ')).not.toMatch(/discrete charge/);
    // a crude one-point-like rule without subdivision: the cusp is missed
    const crude = solveCoulomb(d, { levels: 2, load: { degree: 1, pieceTolerance: Infinity }, method: 'full' });
    expect(Math.abs(crude.sites[0].charge - inside)).toBeGreaterThan(1e-6);
    expect(crude.notes.join(' ')).toMatch(/Site d1: the discrete charge .* differs from the charge inside the box/);
  });

  it('lifts the matrix once: a later site (right-hand side only) gets the potential it gets when solved alone', () => {
    const g = { model: 'gaussian', sigmaNm: 1 } as const;
    const base = oneSite(g, { half: 10, order: 2, tol: 1e-2 });
    const d = withSites(base, [
      { id: 'a', species: 'P', position: [-1.5, 0, 0], electrons: 1, orbital: g },
      { id: 'b', species: 'P', position: [1.5, 0.5, 0], electrons: 1, orbital: g },
    ]);
    const { mesh } = meshDesign(d);
    const both = solveSitePotentials(d, mesh, 2);
    const alone = solveSitePotentials(d, mesh, 2, { siteIds: ['b'] });
    // b is the second right-hand side in `both` and the first (full lifting) in `alone`; the
    // multipole boundary values make the lifting of the right-hand side non-trivial
    const pb = both.nodal[1], qb = alone.nodal[0];
    let diff = 0, scale = 0;
    for (let k = 0; k < pb.length; k++) {
      diff = Math.max(diff, Math.abs(pb[k] - qb[k]));
      scale = Math.max(scale, Math.abs(qb[k]));
    }
    expect(scale).toBeGreaterThan(0);
    expect(diff).toBeLessThanOrEqual(1e-12 * scale); // same matrix, same right-hand side (common practice: round-off only)
  });

  it('P1 and P2 on the same meshes agree to their error estimates', () => {
    const d = oneSite({ model: 'hydrogenic-1s', radiusNm: 2.5 }, { half: 30, tol: 3e-3, order: 2 });
    const r2 = solveCoulomb(d, { order: 2, method: 'full' });
    const r1 = solveCoulomb(d, { order: 1, mesh: { order: 2 }, method: 'full' });
    expect(r1.elements).toBe(r2.elements);
    const a = r1.sites[0], b = r2.sites[0];
    expect(Math.abs(a.uEv - b.uEv)).toBeLessThanOrEqual(a.uErrorEv + b.uErrorEv);
    // and P1 is the less accurate one on the same mesh
    expect(a.uErrorEv).toBeGreaterThan(b.uErrorEv);
  });

  it('is invariant under translating the whole design by one lattice vector (a/2)(1,1,0), to solver tolerance', () => {
    const d = oneSite({ model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 }, { half: 20, tol: 1e-2, order: 2, boundary: { kind: 'multipole', order: 2 } });
    const t = SI_LATTICE_CONSTANT_NM / 2; // FCC primitive vector of the diamond lattice
    const shifted: Design = {
      ...d,
      sites: d.sites.map((s) => ({ ...s, position: [s.position[0] + t, s.position[1] + t, s.position[2]] })),
      domain: { ...d.domain, center: [t, t, 0] },
    };
    const a = solveCoulomb(d, { levels: 2, method: 'full' });
    const b = solveCoulomb(shifted, { levels: 2, method: 'full' });
    expect(b.elements).toBe(a.elements);
    expect(Math.abs(a.sites[0].uEv - b.sites[0].uEv) / a.sites[0].uEv).toBeLessThan(1e-8);
  });

  it('anisotropic 1s: U matches the stretched-sphere closed form of geometry/density within the error bar', () => {
    // U = (5/8)·G(a/b)/b · e²/(4πε0 εr): the hydrogenic 5/8 result stretched along z (Fourier form
    // of the Coulomb energy; derivation in geometry/density selfEnergy)
    const o = { model: 'anisotropic-1s' as const, radiusNm: 2.5, radiusZNm: 1.4 };
    const d = oneSite(o, { half: 30, tol: 1e-3, order: 2, boundary: { kind: 'multipole', order: 4 } });
    const r = solveCoulomb(d);
    const exact = K * selfEnergy(o);
    expect(Math.abs(r.sites[0].uEv - exact)).toBeLessThanOrEqual(r.sites[0].uErrorEv);
    expect(r.sites[0].uErrorEv / exact).toBeLessThan(5e-3);
  });

  it('solveSitePotentials: nodal potentials per site at the mesh vertices, approaching the exact potential', () => {
    const o = { model: 'gaussian' as const, sigmaNm: 1 };
    const d = oneSite(o, { half: 10, tol: 1e-3, order: 2 });
    const { mesh } = meshDesign(d);
    const res = solveSitePotentials(d, mesh, 2);
    const nV = mesh.coords.length / 3;
    expect(res.siteIds).toEqual(['d1']);
    expect(res.potentials[0]).toHaveLength(nV);
    // the exact potential erf(r/(σ√2))/(εr r) (standard Gaussian result), compared at every vertex
    let maxRel = 0;
    for (let v = 0; v < nV; v++) {
      const exact = potentialAt(o, [0, 0, 0], mesh.coords[3 * v], mesh.coords[3 * v + 1], mesh.coords[3 * v + 2]) / EPS;
      maxRel = Math.max(maxRel, Math.abs(res.potentials[0][v] - exact) / exact);
    }
    expect(maxRel).toBeLessThan(1e-2);
  });

  it('pairs: all pairs by default for small arrays, nearest-neighbour bonds on request', () => {
    const base = oneSite({ model: 'gaussian', sigmaNm: 1 }, { half: 14, tol: 3e-2, order: 1 });
    const chain: Design = {
      ...base,
      sites: [0, 1, 2].map((k) => ({ id: `c${k}`, species: 'P' as const, position: [(k - 1) * 4, 0, 0] as [number, number, number], electrons: 1, orbital: { model: 'gaussian' as const, sigmaNm: 1 } })),
    };
    const all = solveCoulomb(chain, { levels: 2 });
    expect(all.pairs.map((p) => `${p.a}-${p.b}`)).toEqual(['c0-c1', 'c0-c2', 'c1-c2']);
    const bonds = solveCoulomb(chain, { levels: 2, pairs: 'bond-graph' });
    expect(bonds.pairs.map((p) => `${p.a}-${p.b}`)).toEqual(['c0-c1', 'c1-c2']);
    const none = solveCoulomb(chain, { levels: 2, pairs: 'none' });
    expect(none.pairs).toHaveLength(0);
  });
});
