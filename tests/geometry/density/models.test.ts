/**
 * The registry of orbital models (geometry/density/models.ts), entry by entry, against references
 * built here without the entry's own formulas: radial and angular quadrature of the density,
 * Gauss's law (shell theorem) for the potential, the Fourier form of the Coulomb energy, the
 * textbook self-energies, and the rule for the length of an orbital.
 */
import { describe, expect, it } from 'vitest';
import type { Orbital } from '../../../geometry/design/types';
import { ORBITAL_MODELS, chargeBeyondPlaneZ, gaussLegendre, orbitalKey, orbitalLengths, orbitalModel, pairEnergy, sameOrbital } from '../../../geometry/density';
import { chargeBeyondRadius } from '../../../geometry/density/models';
import { orbitalLength } from '../../../geometry/mesh';
import { BOHR_RADIUS_NM, COULOMB_EV_NM, HARTREE_EV } from '../../../geometry/units';

/** One case per registry entry; the completeness test fails when an entry has no case. */
const CASES: Record<Orbital['model'], Orbital[]> = {
  'hydrogenic-1s': [
    { model: 'hydrogenic-1s', radiusNm: 2.5 },
    { model: 'hydrogenic-1s', radiusNm: 0.7 },
  ],
  'anisotropic-1s': [
    { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 },
    { model: 'anisotropic-1s', radiusNm: 1.1, radiusZNm: 3.0 },
  ],
  gaussian: [
    { model: 'gaussian', sigmaNm: 1.7 },
    { model: 'gaussian', sigmaNm: 0.45 },
  ],
};
const ALL = Object.values(CASES).flat();
const SPHERICAL = ALL.filter((o) => o.model !== 'anisotropic-1s');

/** ∫₀^R f by Gauss–Legendre (32 nodes) on geometric panels: exact enough for smooth radial integrands with a 1/r scale. */
function radial(f: (r: number) => number, lo: number, hi: number): number {
  const { nodes, weights } = gaussLegendre(32);
  const edges = [lo];
  let e = Math.max(lo, 1e-3 * hi);
  if (e > lo) edges.push(e);
  while (e < hi) {
    e = Math.min(hi, e * 2);
    edges.push(e);
  }
  let sum = 0;
  for (let p = 0; p + 1 < edges.length; p++) {
    const h = (edges[p + 1] - edges[p]) / 2;
    for (let i = 0; i < nodes.length; i++) sum += h * weights[i] * f(edges[p] + h * (nodes[i] + 1));
  }
  return sum;
}

/** far limit of the radial integrals: 80 extents, where every tail is below e^{−80} */
const far = (o: Orbital) => 80 * orbitalLengths(o).extent;

/** ∫ρ g over all space with axial symmetry about z: 2π ∫∫ r² ρ(r sinθ, 0, r cosθ) g dr dμ. */
function axial(o: Orbital, g: (r: number, mu: number) => number = () => 1): number {
  const m = orbitalModel(o);
  const ang = gaussLegendre(48);
  let sum = 0;
  for (let j = 0; j < ang.nodes.length; j++) {
    const mu = ang.nodes[j];
    const st = Math.sqrt(1 - mu * mu);
    sum += ang.weights[j] * radial((r) => r * r * m.density(o, r * st, 0, r * mu) * g(r, mu), 0, far(o));
  }
  return 2 * Math.PI * sum;
}

/** Gauss's law for a spherical density: φ(r) = Q(r)/r + ∫_r^∞ 4πsρ(s) ds (shell theorem; any electrostatics text, e.g. Jackson §1.3). */
function gaussLawPotential(o: Orbital, r: number): number {
  const m = orbitalModel(o);
  const rho = (s: number) => m.density(o, s, 0, 0);
  const inside = radial((s) => 4 * Math.PI * s * s * rho(s), 0, r);
  const outside = radial((s) => 4 * Math.PI * s * rho(s), r, far(o));
  return inside / r + outside;
}

describe('the registry', () => {
  it('has one entry per model of the design document, each under its own name, and every entry has a case here', () => {
    expect(Object.keys(ORBITAL_MODELS).sort()).toEqual(Object.keys(CASES).sort());
    for (const [name, entry] of Object.entries(ORBITAL_MODELS)) expect(entry.model).toBe(name);
  });
  it('keys and sameOrbital tell two densities apart exactly when a size differs', () => {
    for (const o of ALL) {
      expect(sameOrbital(o, structuredClone(o))).toBe(true);
      expect(orbitalKey(o)).toBe(orbitalKey(structuredClone(o)));
    }
    const keys = new Set(ALL.map(orbitalKey));
    expect(keys.size).toBe(ALL.length);
    expect(sameOrbital(CASES['hydrogenic-1s'][0], { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 2.5 })).toBe(false);
    expect(sameOrbital(CASES.gaussian[0], { model: 'gaussian', sigmaNm: 1.7000000001 })).toBe(false);
  });
});

describe.each(ALL.map((o) => [orbitalKey(o), o] as const))('entry %s', (_key, o) => {
  const m = orbitalModel(o);
  it('is normalised: ∫ρ = 1 (Gauss–Legendre quadrature in r and cos θ)', () => {
    expect(Math.abs(axial(o) - 1)).toBeLessThan(1e-10);
  });
  it('peak is ρ at the centre', () => {
    expect(Math.abs(m.peak(o) / m.density(o, 0, 0, 0) - 1)).toBeLessThan(1e-14);
  });
  it('densityBeyond bounds ρ at every sampled point at least that far out', () => {
    for (const d of [0, 0.3, 1, 3, 10].map((t) => t * orbitalLengths(o).extent)) {
      const bound = m.densityBeyond(o, d);
      for (let k = 0; k <= 16; k++) {
        const mu = Math.cos((Math.PI * k) / 16);
        const st = Math.sqrt(1 - mu * mu);
        for (const r of [d, 1.3 * d + 1e-3, 2 * d + 0.1]) expect(m.density(o, r * st, 0, r * mu)).toBeLessThanOrEqual(bound * (1 + 1e-12));
      }
    }
  });
  it('the length rule: ρ has fallen to e⁻² of its peak at the e⁻² length along each axis', () => {
    const l = m.lengthsAlongAxes(o);
    const unit = [
      [1, 0, 0],
      [0, 1, 0],
      [0, 0, 1],
    ];
    for (let k = 0; k < 3; k++) {
      const v = m.density(o, l[k] * unit[k][0], l[k] * unit[k][1], l[k] * unit[k][2]);
      expect(Math.abs(v / m.peak(o) - Math.exp(-2))).toBeLessThan(1e-14);
    }
    const L = orbitalLengths(o);
    expect(L.core).toBe(Math.min(...l));
    expect(L.extent).toBe(Math.max(...l));
    expect(L.decayMin).toBe(L.core / 2);
  });
  it('axial moments: q₀ = 1, q₂ = ⟨z²⟩ − ⟨x²⟩ by quadrature (P₂ = (3μ² − 1)/2), odd moments vanish', () => {
    expect(m.axialMoment(o, 0)).toBe(1);
    const q2 = axial(o, (r, mu) => (r * r * (3 * mu * mu - 1)) / 2);
    expect(Math.abs(m.axialMoment(o, 2) - q2)).toBeLessThan(1e-9 * orbitalLengths(o).extent ** 2);
    expect(m.axialMoment(o, 3)).toBe(0);
  });
  it('profile tail: the share beyond the stretched radius R equals 1 − quadrature of the inside', () => {
    const A = m.axes(o);
    for (const R of [0.5, 1, 2.5, 6]) {
      // inside the ellipsoid |A⁻¹x| ≤ R: along direction μ it ends at r = R / √((1−μ²)/a² + μ²/b²)
      const ang = gaussLegendre(48);
      let inside = 0;
      for (let j = 0; j < ang.nodes.length; j++) {
        const mu = ang.nodes[j];
        const st = Math.sqrt(1 - mu * mu);
        const rEnd = R / Math.sqrt((st * st) / (A[0] * A[0]) + (mu * mu) / (A[2] * A[2]));
        inside += ang.weights[j] * radial((r) => r * r * m.density(o, r * st, 0, r * mu), 0, rEnd);
      }
      expect(Math.abs(m.profileTail(R) - (1 - 2 * Math.PI * inside))).toBeLessThan(1e-11);
    }
  });
  it('charge outside a ball of radius r: exact for spherical models, an upper bound within the stretch otherwise (quadrature)', () => {
    for (const t of [0.3, 1, 3]) {
      const r = t * orbitalLengths(o).extent;
      const ang = gaussLegendre(48);
      let inside = 0;
      for (let j = 0; j < ang.nodes.length; j++) {
        const mu = ang.nodes[j];
        const st = Math.sqrt(1 - mu * mu);
        inside += ang.weights[j] * radial((s) => s * s * m.density(o, s * st, 0, s * mu), 0, r);
      }
      const exact = 1 - 2 * Math.PI * inside;
      if (m.spherical) expect(Math.abs(chargeBeyondRadius(o, r) - exact)).toBeLessThan(1e-11);
      else expect(chargeBeyondRadius(o, r)).toBeGreaterThanOrEqual(exact - 1e-12);
    }
  });
  it('share beyond a plane normal to z: quadrature of the density beyond it', () => {
    for (const t of [0.2, 1, 3]) {
      const d = t * m.axes(o)[2];
      // ∫_{z > d} ρ = ∫_d^∞ dz ∫ 2πs ρ(s, z) ds
      const beyond = radial((z) => radial((s) => 2 * Math.PI * s * m.density(o, s, 0, z), 0, far(o)), d, d + far(o));
      expect(Math.abs(chargeBeyondPlaneZ(o, d) / beyond - 1)).toBeLessThan(1e-9);
    }
  });
  it('self-energy equals the Fourier form (1/2π²)∫|ρ̂(k)|²/k² d³k (Parseval; Jackson, Classical Electrodynamics, ch. 1)', () => {
    // ρ̂ of the unit profile: e^{−2|u|}/π → 1/(1 + |κ|²/4)², Gaussian → e^{−|κ|²/2} (standard transforms),
    // with κ = A k. In direction μ the stretch is s(μ) = √(a²(1−μ²) + b²μ²), and the energy is
    // (1/π) ∫₋₁¹ dμ ∫₀^∞ ρ̂(k s(μ))² dk.
    const A = m.axes(o);
    const prof = m.profile === 'exp' ? (k: number) => 1 / (1 + (k * k) / 4) ** 2 : (k: number) => Math.exp(-(k * k) / 2);
    const ang = gaussLegendre(48);
    let u = 0;
    for (let j = 0; j < ang.nodes.length; j++) {
      const mu = ang.nodes[j];
      const s = Math.sqrt(A[0] * A[0] * (1 - mu * mu) + A[2] * A[2] * mu * mu);
      u += ang.weights[j] * radial((k) => prof(k * s) ** 2, 0, 4000 / s);
    }
    expect(Math.abs(m.selfEnergy(o) / (u / Math.PI) - 1)).toBeLessThan(1e-9);
  });
});

describe.each(SPHERICAL.map((o) => [orbitalKey(o), o] as const))('spherical entry %s', (_key, o) => {
  const m = orbitalModel(o);
  const ell = orbitalLengths(o).extent;
  it('closed-form potential matches Gauss’s law (shell theorem) from the density alone', () => {
    for (const t of [1e-3, 0.1, 0.5, 1, 2, 5, 20]) {
      const r = t * ell;
      expect(Math.abs((m.radialPotential(o, r) as number) / gaussLawPotential(o, r) - 1)).toBeLessThan(1e-10);
      const [x, z] = [0.6 * r, -0.8 * r];
      expect(m.potential(o, x, 0, z)).toBe(m.radialPotential(o, Math.sqrt(x * x + z * z)));
    }
  });
  it('penetrating potential is 1/r − φ(r): the part no multipole expansion about the centre carries', () => {
    for (const t of [0.2, 1, 3, 8]) {
      const r = t * ell;
      const direct = 1 / r - gaussLawPotential(o, r);
      expect(Math.abs((m.penetratingPotential(o, r) as number) - direct)).toBeLessThan(1e-10 / r);
    }
  });
  it('enclosed charge Q(r) is the radial quadrature ∫₀^r 4πs²ρ(s) ds of the density (Gauss’s law: the split’s field −Q(r)/r²)', () => {
    for (const t of [1e-2, 0.1, 0.5, 1, 2, 5, 20]) {
      const r = t * ell;
      const q = radial((s) => 4 * Math.PI * s * s * m.density(o, s, 0, 0), 0, r);
      expect(Math.abs((m.enclosedCharge(o, r) as number) - q)).toBeLessThan(1e-12);
    }
  });
  it('self-energy is ∫ρφ with the Gauss’s-law potential (radial quadrature)', () => {
    const u = radial((r) => 4 * Math.PI * r * r * m.density(o, r, 0, 0) * gaussLawPotential(o, r), 0, far(o) / 4);
    expect(Math.abs(m.selfEnergy(o) / u - 1)).toBeLessThan(1e-8);
  });
});

describe('published closed forms', () => {
  it('hydrogenic 1s Hartree self-energy 5/8·e²/(4πε a): 5/8 Hartree = 17.007 eV at a = a₀ (Griffiths, Introduction to QM, helium ground state; CODATA 2018)', () => {
    const o: Orbital = { model: 'hydrogenic-1s', radiusNm: BOHR_RADIUS_NM };
    const ev = COULOMB_EV_NM * orbitalModel(o).selfEnergy(o);
    expect(Math.abs(ev - (5 / 8) * HARTREE_EV)).toBeLessThan(1e-6);
    expect(Math.abs(ev - 17.007)).toBeLessThan(1e-3);
    // in silicon (εr = 11.7, common practice) with a = 2.5 nm: (5/8)·1.44/(11.7·2.5) ≈ 30.8 meV
    const si = (COULOMB_EV_NM * orbitalModel(CASES['hydrogenic-1s'][0]).selfEnergy(CASES['hydrogenic-1s'][0])) / 11.7;
    expect(Math.abs(si - (0.625 * COULOMB_EV_NM) / (11.7 * 2.5))).toBeLessThan(1e-15);
  });
  it('Gaussian: self-energy 1/(√π σ)·e²/(4πε), pair erf(R/2σ)/R for equal σ (two s-type Gaussian charges; Szabo & Ostlund, Modern Quantum Chemistry, App. A; from memory)', () => {
    const o = CASES.gaussian[0] as Extract<Orbital, { model: 'gaussian' }>;
    const m = orbitalModel(o);
    expect(Math.abs(m.selfEnergy(o) - 1 / (Math.sqrt(Math.PI) * o.sigmaNm))).toBeLessThan(1e-15);
    for (const R of [0.5, 2, 7]) {
      // erf by its defining integral, not the library's erf
      const { nodes, weights } = gaussLegendre(40);
      const x = R / (2 * o.sigmaNm);
      let erfx = 0;
      for (let i = 0; i < nodes.length; i++) erfx += (x / 2) * weights[i] * (2 / Math.sqrt(Math.PI)) * Math.exp(-(((x / 2) * (nodes[i] + 1)) ** 2));
      expect(Math.abs((pairEnergy(o, o, R) as number) - erfx / R)).toBeLessThan(1e-14);
    }
  });
  it('pair energies with no closed form are null (callers fall back on 1/R), and the closed ones are symmetric', () => {
    const [h, h2] = CASES['hydrogenic-1s'];
    const [a] = CASES['anisotropic-1s'];
    const [g] = CASES.gaussian;
    expect(pairEnergy(h, h2, 3)).toBeNull();
    expect(pairEnergy(h, g, 3)).toBeNull();
    expect(pairEnergy(g, a, 3)).toBeNull();
    expect(pairEnergy(a, a, 3)).toBeNull();
    expect(pairEnergy(g, CASES.gaussian[1], 2.2)).toBe(pairEnergy(CASES.gaussian[1], g, 2.2));
  });
  it('the anisotropic entry has no closed radial potential; with a = b it is the hydrogenic entry', () => {
    const [a] = CASES['anisotropic-1s'];
    expect(orbitalModel(a).radialPotential(a, 1)).toBeNull();
    expect(orbitalModel(a).penetratingPotential(a, 1)).toBeNull();
    expect(orbitalModel(a).enclosedCharge(a, 1)).toBeNull();
    const iso: Orbital = { model: 'anisotropic-1s', radiusNm: 1.3, radiusZNm: 1.3 };
    const h: Orbital = { model: 'hydrogenic-1s', radiusNm: 1.3 };
    expect(Math.abs(orbitalModel(iso).selfEnergy(iso) / orbitalModel(h).selfEnergy(h) - 1)).toBeLessThan(1e-8);
  });
});

describe('the size field keeps its numbers (one length rule)', () => {
  it('the mesh core length is the rule’s core length: a, min(a, b), 2σ (the values the size-field constants were measured with)', () => {
    expect(orbitalLength({ model: 'hydrogenic-1s', radiusNm: 2.5 })).toBe(2.5);
    expect(orbitalLength({ model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 })).toBe(1.4);
    expect(orbitalLength({ model: 'gaussian', sigmaNm: 1.7 })).toBe(3.4);
    for (const o of ALL) expect(orbitalLength(o)).toBe(orbitalLengths(o).core);
  });
});
