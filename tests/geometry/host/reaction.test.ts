/**
 * U and V of orbital densities near interfaces, from the image series, against closed forms built
 * from the image (Jackson, Classical Electrodynamics 3rd ed., §4.4 image charge; the Gaussian pair
 * formula erf(R/(2σ))/R for two equal Gaussians, a standard result for Gaussian charge
 * distributions), an independent quadrature for the 1s density, the Sommerfeld reference for a
 * slab, and a Fourier-space reference that includes the density across the interface (the
 * approximation's size).
 */
import { describe, expect, it } from 'vitest';
import type { Orbital, Vec3 } from '../../../geometry/design/types';
import { erf, erfc, gaussLegendre, radialPotential, selfEnergy } from '../../../geometry/density';
import { halfSpaceTail1s } from '../../../geometry/density/outside';
import { imageSeries, layeredEnergy, planarStack, reactionAt } from '../../../geometry/host';
import { leakBeyondInterfaces } from '../../../geometry/host/reaction';
import { homogeneousStack } from '../../../geometry/host/stack';
import type { PlanarStack } from '../../../geometry/host';
import { COULOMB_EV_NM, ELEMENTARY_CHARGE_C, VACUUM_PERMITTIVITY_F_M } from '../../../geometry/units';
import { gaussianReactionReference, hydrogenicProfile, reactionReference } from './fourier-reference';
import { besselJ0, sommerfeldG } from './spectral-reference';

const EPS_SI = 11.7; // common practice, from memory
const EPS_OX = 3.9; // common practice, from memory

function halfSpaces(eps1: number, eps2: number): PlanarStack {
  return planarStack([
    { name: 'silicon', epsilonR: eps1, zMinNm: null, zMaxNm: 0 },
    { name: 'upper', epsilonR: eps2, zMinNm: 0, zMaxNm: null },
  ]).stack!;
}

const gauss = (sigmaNm: number): Orbital => ({ model: 'gaussian', sigmaNm });
const site = (orbital: Orbital, position: Vec3) => ({ orbital, position });

describe('constants', () => {
  it('e²/(4πε₀) from the CODATA 2018 e and ε₀ equals the eV·nm constant', () => {
    // CODATA 2018: e = 1.602176634e-19 C (exact), ε₀ = 8.8541878128e-12 F/m; e/(4πε₀) in V·m → eV·nm × 1e9
    const fromSi = (ELEMENTARY_CHARGE_C / (4 * Math.PI * VACUUM_PERMITTIVITY_F_M)) * 1e9;
    expect(Math.abs(fromSi / COULOMB_EV_NM - 1)).toBeLessThan(1e-9);
  });
});

describe('a Gaussian density at depth d below one interface', () => {
  const sigma = 1.2;

  it('ΔU = (q′/ε₁)·erf(d/σ)/(2d) in eV, for an oxide, vacuum and a grounded metal above (Jackson §4.4, §2.1)', () => {
    for (const [eps2, stack] of [
      [EPS_OX, halfSpaces(EPS_SI, EPS_OX)],
      [1, halfSpaces(EPS_SI, 1)],
      [Infinity, planarStack([{ name: 'Si', epsilonR: EPS_SI, zMinNm: null, zMaxNm: null }], [{ name: 'gate', side: 'above', zNm: 0 }]).stack!],
    ] as [number, PlanarStack][]) {
      const qImage = eps2 === Infinity ? -1 : -(eps2 - EPS_SI) / (eps2 + EPS_SI); // Jackson's q′ for q = 1
      for (const d of [4, 7.5, 20]) {
        const s = site(gauss(sigma), [0.3, -0.1, -d]);
        const r = layeredEnergy(stack, s, s);
        const expected = COULOMB_EV_NM * (qImage / EPS_SI) * (erf(d / sigma) / (2 * d));
        expect(r.reactionEv! / expected - 1).toBeCloseTo(0, 13);
        // U itself = free U in silicon (standard Gaussian self-energy 1/(σ√π)) + the reaction
        expect(r.freeEv! / ((COULOMB_EV_NM / EPS_SI) * (1 / (sigma * Math.sqrt(Math.PI)))) - 1).toBeCloseTo(0, 14);
        expect(r.energyEv! - r.freeEv! - r.reactionEv!).toBeCloseTo(0, 15);
      }
    }
  });

  it('ΔV of a pair = (q′/ε₁)·erf(R*/(2σ))/R*, R* the distance to the partner’s image', () => {
    const stack = halfSpaces(EPS_SI, 1);
    const qImage = -(1 - EPS_SI) / (1 + EPS_SI);
    const a = site(gauss(sigma), [0, 0, -6]);
    const b = site(gauss(sigma), [4.3, 1, -9]);
    const Rstar = Math.hypot(4.3, 1, 6 + 9);
    const R = Math.hypot(4.3, 1, 3);
    const r = layeredEnergy(stack, a, b);
    expect(r.reactionEv! / (COULOMB_EV_NM * (qImage / EPS_SI) * (erf(Rstar / (2 * sigma)) / Rstar)) - 1).toBeCloseTo(0, 13);
    expect(r.freeEv! / ((COULOMB_EV_NM / EPS_SI) * (erf(R / (2 * sigma)) / R)) - 1).toBeCloseTo(0, 13);
    // reciprocity of the pair figure
    expect(layeredEnergy(stack, b, a).energyEv! / r.energyEv! - 1).toBeCloseTo(0, 13);
  });

  it('the point-image approximation errs by less than the leaked share f of the density (Fourier reference incl. the leaked part)', () => {
    // reference: gaussian-reference.ts (own quadrature of the exact one-interface problem)
    let previous = Infinity;
    for (const d of [2, 3, 5]) {
      for (const eps2 of [EPS_OX, 1]) {
        const s = site(gauss(1), [0, 0, -d]);
        const stack = halfSpaces(EPS_SI, eps2);
        const r = layeredEnergy(stack, s, s);
        const exact = COULOMB_EV_NM * gaussianReactionReference(1, -d, EPS_SI, eps2);
        const f = leakBeyondInterfaces(stack, s);
        expect(f).toBeCloseTo(0.5 * erfc(d / Math.SQRT2), 15); // Gaussian tail beyond a plane (exact)
        expect(r.leak).toBe(f);
        const rel = Math.abs(r.reactionEv! / exact - 1);
        expect(rel).toBeLessThan(f);
        if (eps2 === 1) {
          expect(rel).toBeLessThan(previous);
          previous = rel;
        }
      }
    }
    // the approximation is visible (not zero) where the density leaks noticeably
    const near = site(gauss(1), [0, 0, -2]);
    const stack = halfSpaces(EPS_SI, 1);
    expect(Math.abs(layeredEnergy(stack, near, near).reactionEv! / (COULOMB_EV_NM * gaussianReactionReference(1, -2, EPS_SI, 1)) - 1)).toBeGreaterThan(1e-3);
    expect(layeredEnergy(stack, near, near).findings.map((x) => x.code)).toContain('density-leaks');
  });
});

describe('a hydrogenic 1s density near an interface', () => {
  it('ΔU equals q′/ε₁ times ∫ρ φ_image by direct quadrature (textbook 1s potential, no pair formula)', () => {
    const a = 2.5; // our example radius (nm)
    const d = 15;
    const orbital: Orbital = { model: 'hydrogenic-1s', radiusNm: a };
    const stack = halfSpaces(EPS_SI, EPS_OX);
    const s = site(orbital, [0, 0, -d]);
    const r = layeredEnergy(stack, s, s);
    // ∫ ρ(r) φ_1s(|r − c*|) d³r with c* the mirror centre (distance 2d), in spherical coordinates
    // about c: ρ = e^{−2r/a}/(πa³) (textbook), φ from density/radialPotential (textbook 1s potential)
    const gr = gaussLegendre(48);
    const gm = gaussLegendre(48);
    let sum = 0;
    const rmax = 20 * a;
    for (let i = 0; i < gr.nodes.length; i++) {
      const rr = (rmax / 2) * (gr.nodes[i] + 1);
      const wr = (rmax / 2) * gr.weights[i];
      for (let j = 0; j < gm.nodes.length; j++) {
        const mu = gm.nodes[j];
        const dist = Math.sqrt(rr * rr + 4 * d * d - 4 * d * rr * mu);
        sum += wr * gm.weights[j] * 2 * Math.PI * rr * rr * (Math.exp((-2 * rr) / a) / (Math.PI * a ** 3)) * radialPotential(orbital, dist)!;
      }
    }
    const qImage = -(EPS_OX - EPS_SI) / (EPS_OX + EPS_SI);
    expect(r.reactionEv! / (COULOMB_EV_NM * (qImage / EPS_SI) * sum) - 1).toBeCloseTo(0, 8);
    // and the free U is (5/8)(e²/4πε₀)/(εr a) (first-order helium integral)
    expect(r.freeEv! / ((COULOMB_EV_NM * 5) / (8 * EPS_SI * a)) - 1).toBeCloseTo(0, 14);
    expect(selfEnergy(orbital)).toBeCloseTo(5 / (8 * a), 15);
  });
});

describe('the point-image approximation for a 1s density (Fourier reference incl. the leaked part)', () => {
  const a = 2.5;
  const profile = hydrogenicProfile(a);

  it('the transverse transform of the 1s density in the reference is right (normalisation and a direct Hankel transform)', () => {
    // ∫ρ̃(0, u) du = 1 (unit charge)
    const g = gaussLegendre(48);
    let total = 0;
    for (let i = 0; i < g.nodes.length; i++) {
      const u = 15 * a * (g.nodes[i] + 1); // [0, 30a], both signs by symmetry
      total += 2 * 15 * a * g.weights[i] * profile(0, u);
    }
    expect(total).toBeCloseTo(1, 10);
    // 2π ∫ ρ(s, u) J₀(ks) s ds by quadrature, ρ = e^{−2r/a}/(πa³) (textbook 1s density)
    for (const [k, u] of [
      [0.3, 0.7],
      [1.1, 2.0],
    ]) {
      let direct = 0;
      for (let p = 0; p < 8; p++) {
        for (let i = 0; i < g.nodes.length; i++) {
          const s = 2 * a * (p + (g.nodes[i] + 1) / 2);
          const rr = Math.hypot(s, u);
          direct += a * g.weights[i] * 2 * Math.PI * s * besselJ0(k * s) * (Math.exp((-2 * rr) / a) / (Math.PI * a ** 3));
        }
      }
      expect(profile(k, u) / direct - 1).toBeCloseTo(0, 8);
    }
  });

  it('errs by less than the leaked share f at 3a and 4a below an oxide and vacuum', () => {
    for (const depth of [3, 4]) {
      for (const eps2 of [EPS_OX, 1]) {
        const s = site({ model: 'hydrogenic-1s', radiusNm: a }, [0, 0, -depth * a]);
        const stack = halfSpaces(EPS_SI, eps2);
        const r = layeredEnergy(stack, s, s);
        const exact = COULOMB_EV_NM * reactionReference(profile, -depth * a, EPS_SI, eps2, a, 10 * a, 30 / a);
        const f = halfSpaceTail1s(depth); // ½(1 + d/a)e^{−2d/a}: the 1s marginal's tail beyond a plane
        expect(r.leak).toBe(f);
        const rel = Math.abs(r.reactionEv! / exact - 1);
        expect(rel).toBeLessThan(f);
        expect(rel).toBeGreaterThan(f / 10); // the approximation is visible at this size, not hidden by the reference
      }
    }
  });
});

describe('a Gaussian under a 5 nm oxide and vacuum (three regions)', () => {
  it('its ΔU matches the Sommerfeld reaction at the centre when the density is well inside silicon', () => {
    const stack = planarStack([
      { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
      { name: 'oxide', epsilonR: EPS_OX, zMinNm: 0, zMaxNm: 5 },
      { name: 'vacuum', epsilonR: 1, zMinNm: 5, zMaxNm: null },
    ]).stack!;
    const d = 12;
    const sigma = 1.5; // d = 8σ: the Gaussian images differ from point images by erfc(d/σ) ≈ 1e-29
    const s = site(gauss(sigma), [0, 0, -d]);
    const r = layeredEnergy(stack, s, s);
    const point = sommerfeldG({ interfaces: [0, 5], epsilon: [EPS_SI, EPS_OX, 1] }, 0, -d, -d, 20, 0.125, true);
    expect(Math.abs(r.reactionEv! / (COULOMB_EV_NM * point) - 1)).toBeLessThan(1e-9);
    // and the series' own point reaction agrees too
    expect(Math.abs(reactionAt(imageSeries(stack, -d, -d).series!, 0) / point - 1)).toBeLessThan(1e-9);
    // oxide and vacuum have lower εr than silicon, so the image has the charge's own sign and raises U (Jackson §4.4)
    expect(r.reactionEv!).toBeGreaterThan(0);
  });

  it('gives the same figures through a series cache, and the same U for equal sites passed as two objects', () => {
    const stack = planarStack([
      { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
      { name: 'oxide', epsilonR: EPS_OX, zMinNm: 0, zMaxNm: 5 },
      { name: 'vacuum', epsilonR: 1, zMinNm: 5, zMaxNm: null },
    ]).stack!;
    const cache = new Map();
    const a = site({ model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 }, [0, 0, -10]);
    const b = site({ model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 }, [4.3, 0, -10]);
    const twin = site({ model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 }, [0, 0, -10]);
    const plain = layeredEnergy(stack, a, b);
    expect(layeredEnergy(stack, a, b, {}, cache)).toEqual(plain);
    expect(layeredEnergy(stack, b, a, {}, cache).energyEv! / plain.energyEv! - 1).toBeCloseTo(0, 13);
    expect(cache.size).toBe(1);
    const u = layeredEnergy(stack, a, a);
    expect(layeredEnergy(stack, a, twin).energyEv).toBe(u.energyEv);
    expect(Number.isFinite(u.energyEv)).toBe(true);
    // the anisotropic model has no closed-form pair interaction: its images use 1/R and say so
    expect(plain.findings.map((f) => f.code)).toContain('point-image');
  });

  it('a homogeneous host has no reaction', () => {
    const s = site(gauss(1), [1, 2, 3]);
    const r = layeredEnergy(homogeneousStack(EPS_SI), s, s);
    expect(r.reactionEv).toBe(0);
    expect(r.energyEv! / ((COULOMB_EV_NM / EPS_SI) * selfEnergy(gauss(1))) - 1).toBeCloseTo(0, 15);
  });
});
