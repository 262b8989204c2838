/**
 * The mean-value rule (geometry/fem/mean-value.ts): where ∫ρ_j φ is read as φ(p_j).
 * Sources: the mean-value property of harmonic functions (Gauss; Kellogg, Foundations of Potential
 * Theory, ch. 6 — from memory); the charge of a 1s density beyond r, e^{−t}(1 + t + t²/2) with
 * t = 2r/a, and of a 3D Gaussian, erfc(w) + (2/√π) w e^{−w²} with w = r/(σ√2) (textbook integrals);
 * image charges at a dielectric interface (Jackson, Classical Electrodynamics 3rd ed. §4.4) through
 * geometry/host `layeredEnergy`; the parallel-plate capacitor (Jackson §1.13). All designs invented.
 */
import { describe, expect, it } from 'vitest';
import type { Design, HostLayer, Orbital, Site, Vec3 } from '../../../geometry/design/types';
import { harmonicBallRadius, meanValueSites, pointValueRate, MEAN_VALUE_TAIL_FRACTION } from '../../../geometry/fem/mean-value';
import { solveCoulomb } from '../../../geometry/fem/coulomb';
import { solveLevel, SPLIT_SOLVER_TOL } from '../../../geometry/fem/coulomb-level';
import { activeSites, plan, splitFamily } from '../../../geometry/fem/coulomb-plan';
import { densityLoad } from '../../../geometry/fem/load';
import { leverArmsOnMesh, leverFamily, solveLeverArms } from '../../../geometry/fem/lever';
import { erf } from '../../../geometry/density';
import { layeredEnergy, planarStack } from '../../../geometry/host';
import { locatePoints, valuesAtPoints } from '../../../geometry/fem/locate';
import { COULOMB_EV_NM } from '../../../geometry/units';

const SI = 11.7; // silicon εr (common practice)
const OX = 3.9; // SiO₂ εr (common practice, from memory)
const LAYERS: HostLayer[] = [
  { name: 'silicon', epsilonR: SI, zMinNm: null, zMaxNm: 0 },
  { name: 'oxide', epsilonR: OX, zMinNm: 0, zMaxNm: null },
];

function design(sites: { p: Vec3; o: Orbital }[], opts: { half?: number; layers?: HostLayer[]; electrodes?: Design['electrodes']; tol?: number } = {}): Design {
  const half = opts.half ?? 12;
  return {
    format: 'tetrawell-design',
    version: 2,
    name: 'mean-value cases (invented)',
    host: { material: 'Si', epsilonR: SI, latticeConstantNm: 0.5431, ...(opts.layers ? { layers: opts.layers } : {}) },
    sites: sites.map((s, i): Site => ({ id: `m${i}`, species: 'P', position: s.p, electrons: 1, orbital: s.o })),
    domain: { center: [0, 0, 0], halfExtentsNm: [half, half, half], boundary: { kind: 'multipole', order: 0 } },
    ...(opts.electrodes ? { electrodes: opts.electrodes } : {}),
    refinement: { order: 2, targetRelError: opts.tol ?? 1e-3, maxElements: 2_000_000 },
  };
}

const gauss = (sigmaNm: number): Orbital => ({ model: 'gaussian', sigmaNm });

describe('harmonic ball and tail', () => {
  it('the radius is the distance to the nearest wall, interface inside the domain or electrode box (hand-computed)', () => {
    const d = design([{ p: [1, 2, -3], o: gauss(0.5) }], {
      layers: LAYERS,
      electrodes: [{ name: 'lead', minNm: [4, -12, -5], maxNm: [12, 12, -1], voltageV: 0 }],
    });
    // walls: 11, 10, 9; interface z = 0: 3; electrode x-gap 3 (y, z inside its range): 3 → 3
    expect(harmonicBallRadius(d, [1, 2, -3])).toBeCloseTo(3, 12);
    // without the layers and the electrode only the walls count: 12 − |z| = 9
    expect(harmonicBallRadius(design([{ p: [1, 2, -3], o: gauss(0.5) }]), [1, 2, -3])).toBeCloseTo(9, 12);
    // a corner distance to the electrode: from (1, 2, 1) in a box design with the lead alone
    const e = design([{ p: [1, 2, 1], o: gauss(0.5) }], { electrodes: [{ name: 'lead', minNm: [4, -12, -5], maxNm: [12, 12, -1], voltageV: 0 }] });
    expect(harmonicBallRadius(e, [1, 2, 1])).toBeCloseTo(Math.hypot(3, 2), 12);
  });

  it('tails are the closed forms, and the rule takes exactly the sites whose tail is within the tolerance', () => {
    const a = 2.5, s = 1;
    const d = design([{ p: [0, 0, -4], o: { model: 'hydrogenic-1s', radiusNm: a } }, { p: [0, 0, -4], o: gauss(s) }, { p: [0, 0, -9], o: gauss(0.5) }], { layers: LAYERS });
    const mv = meanValueSites(d, activeSites(d));
    const t = (2 * 4) / a;
    expect(mv.tail[0]).toBeCloseTo(Math.exp(-t) * (1 + t + t * t / 2), 12);
    const w = 4 / (s * Math.SQRT2);
    expect(mv.tail[1]).toBeCloseTo(1 - erf(w) + (2 / Math.sqrt(Math.PI)) * w * Math.exp(-w * w), 12);
    const tol = MEAN_VALUE_TAIL_FRACTION * 1e-3;
    expect(Array.from(mv.ok)).toEqual(Array.from(mv.tail, (x) => (x <= tol ? 1 : 0)));
    // the 1s at 4 nm keeps a large tail (0.38) and a σ = 0.5 Gaussian 3 nm from the wall a tiny one: both kinds occur
    expect(mv.ok[0]).toBe(0);
    expect(mv.ok[2]).toBe(1);
    // a model without a closed form never qualifies
    const an = design([{ p: [0, 0, -4], o: { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 } }]);
    expect(meanValueSites(an, activeSites(an)).ok[0]).toBe(0);
    expect(pointValueRate(1)).toBe(2);
    expect(pointValueRate(2)).toBe(3);
  });
});

describe('the split in a layered host: centre values and density loads', () => {
  // σ = 0.5 at 4 nm under the interface: tail 8σ, far below the tolerance (centre values)
  const d = design([{ p: [-1.5, 0, -4], o: gauss(0.5) }, { p: [1.5, 0, -4], o: gauss(0.5) }], { layers: LAYERS });
  const stack = planarStack(LAYERS).stack!;

  it('on one mesh, the remainder read at each centre equals ∫ρ_j φ_r,i through the density load (mean-value property) to within the bar', () => {
    const pl = plan(d, {});
    const meshes = splitFamily(d, pl.sites, 2, 3, {});
    const sol = solveLevel(d, meshes[meshes.length - 1], 2, pl.sites, pl.pairIdx, {}, () => {}, 'split');
    expect(Array.from(sol.pointSelf)).toEqual([1, 1]);
    expect(Array.from(sol.pointPair)).toEqual([1]);
    const r = solveCoulomb(d, { method: 'split' });
    const pts = Float64Array.from([...pl.sites[0].position, ...pl.sites[1].position]);
    const loc = locatePoints(sol.space.mesh, pts);
    for (let j = 0; j < 2; j++) {
      const L = densityLoad(sol.space, pl.sites[j].orbital, pl.sites[j].position).load;
      for (let i = 0; i < 2; i++) {
        let viaLoad = 0;
        for (let k = 0; k < L.length; k++) viaLoad += L[k] * sol.phis[i][k];
        const atCentre = valuesAtPoints(sol.space, loc, sol.phis[i])[j];
        // the remainder is not negligible (the interface's image), so the check has teeth
        expect(Math.abs(atCentre) * COULOMB_EV_NM).toBeGreaterThan(10 * r.sites[0].uErrorEv);
        // the two readings differ by discretisation only: within the bar of U (nm⁻¹ → eV)
        expect(Math.abs(viaLoad - atCentre) * COULOMB_EV_NM).toBeLessThanOrEqual(r.sites[0].uErrorEv);
      }
    }
  });

  it('U and V from centre values cover the image closed form, with the point-value rate (≤ p + 1) in their budgets', () => {
    const r = solveCoulomb(d, { method: 'split' });
    const a = { position: d.sites[0].position, orbital: gauss(0.5) };
    const b = { position: d.sites[1].position, orbital: gauss(0.5) };
    const U = layeredEnergy(stack, a, a), V = layeredEnergy(stack, a, b);
    expect(Math.abs(r.sites[0].uEv - U.energyEv!)).toBeLessThanOrEqual(r.sites[0].uErrorEv + U.leak * Math.abs(U.reactionEv!));
    expect(Math.abs(r.pairs[0].vEv - V.energyEv!)).toBeLessThanOrEqual(r.pairs[0].vErrorEv + V.leak * Math.abs(V.reactionEv!));
    expect(r.sites[0].budget.rate).toBeLessThanOrEqual(pointValueRate(2));
    expect(r.pairs[0].budget.rate).toBeLessThanOrEqual(pointValueRate(2));
    // the interface matters: U is off the homogeneous value by far more than the bar
    expect(Math.abs(r.sites[0].uEv - U.freeEv!)).toBeGreaterThan(10 * r.sites[0].uErrorEv);
  });

  it('a pair across the interface (different εr): the selves read centres, the cross terms use the loads', () => {
    const m = design([{ p: [-1.5, 0, -4], o: gauss(0.6) }, { p: [1.5, 0, 4], o: gauss(0.6) }], { layers: LAYERS, half: 8 });
    const pl = plan(m, { pairs: 'all' });
    expect(pl.pairIdx.length).toBe(2);
    const meshes = splitFamily(m, pl.sites, 2, 2, {});
    const sol = solveLevel(m, meshes[0], 2, pl.sites, pl.pairIdx, {}, () => {}, 'split');
    expect(Array.from(sol.pointSelf)).toEqual([1, 1]);
    expect(Array.from(sol.pointPair)).toEqual([0]);
    // the loads were formed (the cross terms need them), and hold the unit charge
    expect(Math.abs(sol.charges[0] - 1)).toBeLessThan(1e-6);
    expect(sol.loads[1].length).toBe(sol.space.nDofs);
  });
});


describe('lever arms: centre values and density loads', () => {
  /** plates at z = ±8 (faces), zero-normal-field walls: the potential is linear (Jackson §1.13) */
  function plates(sites: Site[]): Design {
    return {
      format: 'tetrawell-design',
      version: 2,
      name: 'two plates (invented)',
      host: { material: 'Si', epsilonR: SI, latticeConstantNm: 0.5431 },
      sites,
      domain: { center: [0, 0, 0], halfExtentsNm: [6, 6, 10], boundary: { kind: 'grounded' }, electrodeWalls: 'zero-normal-field' },
      electrodes: [
        { name: 'top', minNm: [-6, -6, 8], maxNm: [6, 6, 10], voltageV: 0.2 },
        { name: 'back', minNm: [-6, -6, -10], maxNm: [6, 6, -8], voltageV: 0 },
      ],
      refinement: { order: 2, targetRelError: 1e-2, maxElements: 2_000_000 },
    };
  }
  it('a site far from the metal reads its centre, one 4σ from a plate (tail 1.1e-3 > 1e-3) integrates its load; both exact for the linear potential', () => {
    const d = plates([
      { id: 'far', species: 'P', position: [0.3, -0.2, -1], electrons: 1, orbital: gauss(0.5) },
      { id: 'near', species: 'P', position: [0.1, 0.4, 6.2], electrons: 1, orbital: gauss(0.45) },
    ]);
    const mesh = leverFamily(d, 2, 2, { h0Nm: 2 })[0];
    const on = leverArmsOnMesh(d, mesh, 2);
    expect(Array.from(on.pointValue)).toEqual([1, 0]);
    const r = solveLeverArms(d, { levels: 2, mesh: { h0Nm: 2 } });
    // −1000 (z + 8)/16 meV/V on the top plate for an electron (parallel plates); 1e-3 meV/V is the
    // load's charge tolerance (1e-6, load.ts) times 1000 meV/V; the near density's share inside the
    // metal (½ erfc(4/√2) = 3e-5, seeing 1 V instead of the line's ≈ 1.01) costs < 5e-4 meV/V
    [-1, 6.2].forEach((z, i) => {
      expect(Math.abs(r.leverArms[2 * i].meVPerV - -1000 * ((z + 8) / 16))).toBeLessThanOrEqual(1e-3);
      expect(Math.abs(r.leverArms[2 * i + 1].meVPerV - -1000 * ((8 - z) / 16))).toBeLessThanOrEqual(1e-3);
    });
  });

  it('on a finite gate the centre value and the load agree within the bar, and the bar adds the tail bound', () => {
    const d: Design = {
      ...plates([{ id: 'd1', species: 'P', position: [0.3, 0.2, -3], electrons: 1, orbital: gauss(0.6) }]),
      host: { material: 'Si', epsilonR: SI, latticeConstantNm: 0.5431, layers: [{ name: 'silicon', epsilonR: SI, zMinNm: null, zMaxNm: 0 }, { name: 'oxide', epsilonR: OX, zMinNm: 0, zMaxNm: null }] },
      domain: { center: [0, 0, -1], halfExtentsNm: [6, 6, 5], boundary: { kind: 'grounded' }, electrodeWalls: 'grounded' },
      electrodes: [{ name: 'gate', minNm: [-2, -2, 1], maxNm: [2, 2, 2], voltageV: 0.4 }],
      refinement: { order: 1, targetRelError: 5e-2, maxElements: 2_000_000 },
    };
    const r = solveLeverArms(d, { levels: 3, mesh: { hmaxNm: 4 } });
    const finest = leverFamily(d, 1, 3, { hmaxNm: 4 })[2];
    const on = leverArmsOnMesh(d, finest, 1);
    expect(on.pointValue[0]).toBe(1);
    expect(on.meVPerV[0]).toBeCloseTo(r.leverArms[0].meVPerV, 10);
    const L = densityLoad(on.space, gauss(0.6), [0.3, 0.2, -3]).load;
    let viaLoad = 0;
    for (let k = 0; k < L.length; k++) viaLoad += L[k] * on.potentials[0][k];
    expect(Math.abs(-1000 * viaLoad - r.leverArms[0].meVPerV)).toBeLessThanOrEqual(r.leverArms[0].errorMeVPerV);
    expect(r.leverArms[0].errorMeVPerV).toBeGreaterThanOrEqual(1000 * on.tail[0]);
  });
});

describe('the split\'s solver tolerance', () => {
  it('the default (SPLIT_SOLVER_TOL) moves U and V by less than 1e-4 of their bars against PCG to 1e-10 (the algebraic error stays far below the discretisation error)', () => {
    const d = design([{ p: [-1.5, 0, -4], o: gauss(0.5) }, { p: [1.5, 0, -4], o: gauss(0.5) }], { layers: LAYERS });
    expect(SPLIT_SOLVER_TOL).toBeGreaterThan(1e-10);
    const a = solveCoulomb(d, { method: 'split' });
    const b = solveCoulomb(d, { method: 'split', solverTol: 1e-10 });
    expect(Math.abs(a.sites[0].uEv - b.sites[0].uEv)).toBeLessThanOrEqual(1e-4 * b.sites[0].uErrorEv);
    expect(Math.abs(a.pairs[0].vEv - b.pairs[0].vEv)).toBeLessThanOrEqual(1e-4 * b.pairs[0].vErrorEv);
  });
});
