/**
 * The far-field check in a layered host and with electrodes (geometry/farfield/layered.ts).
 *
 * The bound is checked against the true boundary error of a box, computed here from outside
 * closed forms: for a grounded box the error at a wall is the whole potential of the site there,
 * for a multipole box (order-0 boundary values of the stack) the potential minus that of the
 * site's point charge in the stack. The exact potentials are Jackson's images of a planar
 * interface (Classical Electrodynamics, 3rd ed., §4.4) and of a grounded plane (§2.1), written out
 * in this file from the textbook formulas (not from geometry/host), and, for a slab, the
 * Sommerfeld-integral reference of tests/geometry/host (our own quadrature, no image algebra).
 * Sampling the walls finds a lower estimate of the true maximum, so a bound below it is wrong;
 * the bound must also stay within a stated factor of it, so a uselessly loose bound fails too.
 */
import { describe, expect, it } from 'vitest';
import type { Design, Electrode, HostLayer, Orbital, Site, Vec3 } from '../../../geometry/design/types';
import { farFieldCheck } from '../../../geometry/farfield';
import { layeredContext, layeredSiteBound, siteProfile, siteImage, electrodeFindings } from '../../../geometry/farfield/layered';
import { neglectedEnvelope } from '../../../geometry/farfield/envelope';
import { imageChargeEffect } from '../../../geometry/host';
import { radialPotential } from '../../../geometry/density';
import { COULOMB_EV_NM } from '../../../geometry/units';
import { siliconDesign } from '../design-fixtures';
import { sommerfeldG } from '../host/spectral-reference';

const EPS_SI = 11.7; // silicon, common practice (room temperature, from memory)
const EPS_OX = 3.9; // thermal SiO₂, common practice (from memory)

const gaussian = (sigmaNm: number): Orbital => ({ model: 'gaussian', sigmaNm });
const hydrogenic = (radiusNm: number): Orbital => ({ model: 'hydrogenic-1s', radiusNm });

/** Points on the six walls of the box: an n × n grid per face, plus each face's point nearest the site. */
function wallPoints(center: Vec3, half: Vec3, site: Vec3, n: number, line = 40): Vec3[] {
  const pts: Vec3[] = [];
  for (let axis = 0; axis < 3; axis++)
    for (const sgn of [-1, 1]) {
      const u = (axis + 1) % 3;
      const v = (axis + 2) % 3;
      const at = (a: number, b: number): Vec3 => {
        const p: Vec3 = [0, 0, 0];
        p[axis] = center[axis] + sgn * half[axis];
        p[u] = a;
        p[v] = b;
        return p;
      };
      for (let i = 0; i <= n; i++)
        for (let j = 0; j <= n; j++) pts.push(at(center[u] - half[u] + (2 * half[u] * i) / n, center[v] - half[v] + (2 * half[v] * j) / n));
      const clamp = (k: number) => Math.min(center[k] + half[k], Math.max(center[k] - half[k], site[k]));
      pts.push(at(clamp(u), clamp(v)));
      // a fine line through the nearest point along each in-face axis (the maximum lies near it)
      for (let t = -line; t <= line; t++) {
        pts.push(at(Math.min(center[u] + half[u], Math.max(center[u] - half[u], clamp(u) + (t * 10) / line)), clamp(v)));
        pts.push(at(clamp(u), Math.min(center[v] + half[v], Math.max(center[v] - half[v], clamp(v) + (t * 10) / line))));
      }
    }
  return pts;
}

/**
 * Jackson §4.4: a charge q in ε₁ (z < 0 here) facing ε₂ (z > 0). In medium 1 the potential is
 * (1/ε₁)[q/R + q′/R′] with q′ = −q(ε₂ − ε₁)/(ε₂ + ε₁) at the mirror point; in medium 2 it is
 * q″/(ε₂ R), q″ = 2ε₂q/(ε₂ + ε₁). A spherical density wholly in medium 1 gives the same with 1/R
 * replaced by its own potential ψ(R) (its images are copies of it). ε₂ = ∞ is a grounded metal
 * (Jackson §2.1: image −q, no field beyond). Returns the potential (nm⁻¹) of a unit charge.
 */
function twoHalfSpaces(eps1: number, eps2: number, src: Vec3, psi: (r: number) => number) {
  return (p: Vec3): number => {
    const R = Math.hypot(p[0] - src[0], p[1] - src[1], p[2] - src[2]);
    const Rm = Math.hypot(p[0] - src[0], p[1] - src[1], p[2] + src[2]);
    if (p[2] <= 0) {
      const qImage = eps2 === Infinity ? -1 : -(eps2 - eps1) / (eps2 + eps1);
      return (psi(R) + qImage * psi(Rm)) / eps1;
    }
    if (eps2 === Infinity) return 0;
    return (2 / (eps2 + eps1)) * psi(R);
  };
}

function design(parts: { layers?: HostLayer[]; electrodes?: Electrode[]; sites: Site[]; half: Vec3; center?: Vec3; boundary?: Design['domain']['boundary'] }): Design {
  const d = siliconDesign({
    name: 'Invented layered test device',
    host: { epsilonR: EPS_SI },
    sites: parts.sites,
    domain: { center: parts.center ?? [0, 0, 0], halfExtentsNm: parts.half, boundary: parts.boundary ?? { kind: 'grounded' } },
    refinement: { order: 2, targetRelError: 1e-3, maxElements: 1_000_000 },
  });
  if (parts.layers) d.host.layers = parts.layers;
  if (parts.electrodes) d.electrodes = parts.electrodes;
  return d;
}

const site = (id: string, position: Vec3, orbital: Orbital): Site => ({ id, species: 'P', position, electrons: 1, orbital });

/** The bound of one site (nm⁻¹, 1/ε included) as the check computes it. */
function boundOf(d: Design, i: number) {
  const ctx = layeredContext({ epsilonR: d.host.epsilonR, layers: d.host.layers, electrodes: d.electrodes, domain: d.domain }, d.sites.map((s) => s.position[2]));
  const s = d.sites[i];
  const o = s.orbital!;
  const img = siteImage(ctx, { position: s.position, orbital: o });
  return layeredSiteBound(ctx, s.position, siteProfile(o, d.domain.boundary), neglectedEnvelope(o, d.domain.boundary), d.domain.boundary, img.leak);
}

function maxOnWalls(d: Design, i: number, phi: (p: Vec3) => number, n = 24, line = 40): number {
  let m = 0;
  for (const p of wallPoints(d.domain.center, d.domain.halfExtentsNm, d.sites[i].position, n, line)) m = Math.max(m, Math.abs(phi(p)));
  return m;
}

describe('layered far-field bound ≥ the true boundary error (Jackson §4.4 images)', () => {
  const cases: { name: string; eps2: number; z0: number; orbital: Orbital; center: Vec3; loose: number }[] = [
    // silicon under vacuum: positive image (ε₂ < ε₁), the wall in vacuum sees the transmitted charge
    { name: 'Gaussian in Si 6 nm under vacuum', eps2: 1, z0: -6, orbital: gaussian(1.2), center: [3, -2, 0], loose: 1.6 },
    // oxide under silicon: negative image (ε₂ > ε₁)
    { name: '1s in SiO₂ 8 nm under Si', eps2: EPS_SI, z0: -8, orbital: hydrogenic(1.0), center: [0, 0, 5], loose: 1.6 },
    // grounded metal plane above silicon: image −q (Jackson §2.1)
    { name: 'Gaussian in Si 5 nm under a grounded plane', eps2: Infinity, z0: -5, orbital: gaussian(1.0), center: [0, 0, 0], loose: 1.6 },
  ];
  for (const c of cases)
    it(`grounded box, ${c.name}`, () => {
      const eps1 = c.eps2 === EPS_SI ? EPS_OX : EPS_SI;
      const layers: HostLayer[] | undefined =
        c.eps2 === Infinity
          ? undefined
          : [
              { name: 'lower', epsilonR: eps1, zMinNm: null, zMaxNm: 0 },
              { name: 'upper', epsilonR: c.eps2, zMinNm: 0, zMaxNm: null },
            ];
      const electrodes: Electrode[] | undefined = c.eps2 === Infinity ? [{ name: 'top plane', minNm: [-100, -100, 0], maxNm: [100, 100, 30], voltageV: 0 }] : undefined;
      const src: Vec3 = [0.7, -0.4, c.z0];
      const d = design({ layers, electrodes, sites: [site('s', src, c.orbital)], half: [18, 15, 16], center: c.center });
      if (c.eps2 === Infinity) d.host.epsilonR = eps1;
      const b = boundOf(d, 0);
      const psi = (r: number) => radialPotential(c.orbital, r) as number;
      const exact = maxOnWalls(d, 0, twoHalfSpaces(eps1, c.eps2, src, psi));
      expect(b.kind).toBe('rigorous');
      expect(b.reason).toBe('image-series');
      expect(b.delta).toBeGreaterThanOrEqual(exact);
      expect(b.delta).toBeLessThan(c.loose * exact);
    });

  it('multipole box (order-0 stack boundary values): bound ≥ max |φ_density − φ_point charge| on the walls', () => {
    // The neglected part is the penetrating tail of each image, (1/ε₁)[(ψ − 1/R) + q′(ψ′ − 1/R′)]:
    // walls 3 nm from a Gaussian of σ = 0.8 nm make it visible (erfc(3/(0.8√2)) ≈ 2e-4).
    const eps1 = EPS_SI, eps2 = 1;
    const o = gaussian(0.8);
    const src: Vec3 = [0, 0, -4];
    const d = design({
      layers: [
        { name: 'silicon', epsilonR: eps1, zMinNm: null, zMaxNm: 0 },
        { name: 'vacuum', epsilonR: eps2, zMinNm: 0, zMaxNm: null },
      ],
      sites: [site('s', src, o)],
      half: [3, 3.5, 7],
      center: [0, 0, 0],
      boundary: { kind: 'multipole', order: 2 },
    });
    const psi = (r: number) => radialPotential(o, r) as number;
    const full = twoHalfSpaces(eps1, eps2, src, psi);
    const point = twoHalfSpaces(eps1, eps2, src, (r) => 1 / r);
    const exact = maxOnWalls(d, 0, (p) => full(p) - point(p), 32);
    const b = boundOf(d, 0);
    expect(exact).toBeGreaterThan(1e-6); // the case is not trivial
    expect(b).toMatchObject({ kind: 'rigorous', reason: 'image-series' });
    expect(b.delta).toBeGreaterThanOrEqual(exact);
    expect(b.delta).toBeLessThan(2 * exact);
  });

  it('a density reaching across the interface makes the bound estimated (density-leaks)', () => {
    // ½ erfc(2.5/(1.5√2)) ≈ 4.8 % of this Gaussian lies in the vacuum (the Gaussian's tail, exact for one plane)
    const d = design({
      layers: [
        { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
        { name: 'vacuum', epsilonR: 1, zMinNm: 0, zMaxNm: null },
      ],
      sites: [site('s', [0, 0, -2.5], gaussian(1.5))],
      half: [20, 20, 20],
    });
    expect(boundOf(d, 0)).toMatchObject({ kind: 'estimated', reason: 'density-leaks' });
  });

  it('slab: Si under 5 nm of SiO₂ under vacuum, grounded box, against the Sommerfeld-integral reference', () => {
    const o = gaussian(0.8);
    const src: Vec3 = [1.1, 0.3, -12];
    const d = design({
      layers: [
        { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
        { name: 'oxide', epsilonR: EPS_OX, zMinNm: 0, zMaxNm: 5 },
        { name: 'vacuum', epsilonR: 1, zMinNm: 5, zMaxNm: null },
      ],
      sites: [site('s', src, o)],
      half: [20, 20, 20],
      center: [0, 0, 0],
    });
    // every wall point is ≥ 8 nm from the site and its images: the Gaussian's potential is that of a
    // point charge there to erfc(8/(0.8√2)) ≈ 1e-23 (a spherical density acts as a point outside itself)
    const ref = { interfaces: [0, 5], epsilon: [EPS_SI, EPS_OX, 1] };
    // kMax = 8 nm⁻¹: the integrand falls like e^{−k·8 nm} or faster at these walls
    const g = (p: Vec3) => sommerfeldG(ref, Math.hypot(p[0] - src[0], p[1] - src[1]), p[2], src[2], 8, 0.25);
    const exact = maxOnWalls(d, 0, g, 6, 10);
    const b = boundOf(d, 0);
    expect(b.kind).toBe('rigorous');
    expect(b.delta).toBeGreaterThanOrEqual(exact);
    expect(b.delta).toBeLessThan(1.6 * exact);
  });

  it('a stack of equal εr is the homogeneous host: the bound is ψ(d)/εr at the nearest wall (shell theorem, Newton)', () => {
    const o = hydrogenic(2.5);
    const src: Vec3 = [1, 2, -3];
    const d = design({
      layers: [
        { name: 'a', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
        { name: 'b', epsilonR: EPS_SI, zMinNm: 0, zMaxNm: null },
      ],
      sites: [site('s', src, o)],
      half: [20, 20, 20],
    });
    const b = boundOf(d, 0);
    const dWall = 20 - 3; // nearest face z = −20, 17 nm away
    expect(Math.abs(b.delta / ((radialPotential(o, dWall) as number) / EPS_SI) - 1)).toBeLessThan(1e-12);
  });
});

describe('bound kinds and reasons', () => {
  const stack3: HostLayer[] = [
    { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
    { name: 'oxide', epsilonR: EPS_OX, zMinNm: 0, zMaxNm: 5 },
    { name: 'vacuum', epsilonR: 1, zMinNm: 5, zMaxNm: null },
  ];
  it('a finite gate keeps a grounded bound rigorous (domain monotonicity) but makes a multipole bound estimated', () => {
    const gate: Electrode = { name: 'gate', minNm: [-5, -5, 5], maxNm: [5, 5, 8], voltageV: 0.3 };
    const d = design({ layers: stack3, electrodes: [gate], sites: [site('s', [0, 0, -10], hydrogenic(2.5))], half: [30, 30, 30] });
    expect(boundOf(d, 0)).toMatchObject({ kind: 'rigorous', reason: 'image-series' });
    d.domain.boundary = { kind: 'multipole', order: 2 };
    expect(boundOf(d, 0)).toMatchObject({ kind: 'estimated', reason: 'electrode-not-plane' });
  });
  it('more than two interfaces between metals: estimated with the homogeneous bound at the smallest εr', () => {
    const layers: HostLayer[] = [
      { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
      { name: 'oxide', epsilonR: EPS_OX, zMinNm: 0, zMaxNm: 5 },
      { name: 'nitride', epsilonR: 7.5, zMinNm: 5, zMaxNm: 10 },
      { name: 'vacuum', epsilonR: 1, zMinNm: 10, zMaxNm: null },
    ];
    const o = hydrogenic(2.5);
    const d = design({ layers, sites: [site('s', [0, 0, -10], o)], half: [30, 30, 30] });
    const b = boundOf(d, 0);
    expect(b).toMatchObject({ kind: 'estimated', reason: 'too-many-interfaces' });
    // nearest wall 20 nm away (z = −30), εr_min = 1 (vacuum): ψ(20)/1
    expect(Math.abs(b.delta / (radialPotential(o, 20) as number) - 1)).toBeLessThan(1e-12);
  });
});

describe('farFieldCheck with layers and electrodes', () => {
  const stack: HostLayer[] = [
    { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
    { name: 'oxide', epsilonR: EPS_OX, zMinNm: 0, zMaxNm: 5 },
    { name: 'vacuum', epsilonR: 1, zMinNm: 5, zMaxNm: null },
  ];
  const sites = [site('a', [-2.2, 0, -10], hydrogenic(2.5)), site('b', [2.2, 0, -10], hydrogenic(2.5)), site('c', [0, 3, -14], gaussian(1.5))];

  it('imageEffect is geometry/host imageChargeEffect over the same pairs (worst ΔU/U, ΔV/V)', () => {
    const d = design({ layers: stack, sites, half: [30, 30, 30] });
    const r = farFieldCheck(d);
    const e = imageChargeEffect({ epsilonR: EPS_SI, layers: stack, domain: d.domain, sites: sites.map((s) => ({ position: s.position, orbital: s.orbital! })) });
    expect(r.imageEffect).toBeDefined();
    const ie = r.imageEffect!;
    expect(ie.worstUSite).toBe(sites[e.worstSite].id);
    expect(ie.worstURel).toBe(e.relativeU[e.worstSite]);
    expect(ie.worstVPair).toEqual([sites[e.pairs[2 * e.worstPair]].id, sites[e.pairs[2 * e.worstPair + 1]].id]);
    expect(ie.worstVRel).toBe(e.relativeV[e.worstPair]);
    expect(ie.tailBoundEv).toBe(e.tailBoundEv);
    expect(ie.maxLeak).toBe(e.maxLeak);
    // U in the stack = U in the infinite host × (1 + ΔU/U)
    const ua = r.sites[0];
    expect(ua.boundKind).toBe('rigorous');
    expect(Math.abs(ua.uEv / ((COULOMB_EV_NM / EPS_SI) * (5 / (8 * 2.5)) * (1 + e.relativeU[0])) - 1)).toBeLessThan(1e-12); // 1s self energy 5/(8a): textbook
  });

  it('the image effect of a silicon/vacuum interface on a deep Gaussian: ΔU/U → r·σ√π/(2·2d)… against the Jackson image, first order', () => {
    // Far from the interface (d ≫ σ) the reaction of a Gaussian is its image charge's energy,
    // q′/(ε₁·2d) with q′ = (ε₁ − ε₂)/(ε₁ + ε₂) (Jackson §4.4), against U = 1/(ε₁σ√π) (Gaussian self energy, textbook).
    const layers: HostLayer[] = [
      { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
      { name: 'vacuum', epsilonR: 1, zMinNm: 0, zMaxNm: null },
    ];
    const sigma = 1, depth = 10;
    const d = design({ layers, sites: [site('g', [0, 0, -depth], gaussian(sigma))], half: [30, 30, 30] });
    const r = farFieldCheck(d);
    const q = (EPS_SI - 1) / (EPS_SI + 1);
    const expected = (q / (2 * depth)) / (1 / (sigma * Math.sqrt(Math.PI)));
    expect(Math.abs(r.imageEffect!.worstURel! / expected - 1)).toBeLessThan(1e-9);
  });

  it('a homogeneous design keeps its report: no imageEffect, no boundKind', () => {
    const d = design({ sites, half: [30, 30, 30] });
    const r = farFieldCheck(d);
    expect(r.imageEffect).toBeUndefined();
    expect(r.sites.every((s) => s.boundKind === undefined)).toBe(true);
  });

  it('findings: electrode outside the domain, clipped (share kept), site near an electrode', () => {
    const electrodes: Electrode[] = [
      { name: 'far', minNm: [100, 0, 0], maxNm: [110, 5, 5], voltageV: 0 },
      // x from 20 to 40 in a box reaching x = 30: half of it kept
      { name: 'edge', minNm: [20, -2, 5], maxNm: [40, 2, 7], voltageV: 0.1 },
      // 4 nm below site a (at z = −10; the lead's top face at z = −14): within 3 × 2.5 nm
      { name: 'lead', minNm: [-4, -1, -16], maxNm: [-1, 1, -14], voltageV: 0 },
    ];
    const d = design({ layers: stack, electrodes, sites, half: [30, 30, 30] });
    const f = farFieldCheck(d).imageEffect!.findings;
    expect(f).toContainEqual({ code: 'electrode-outside-domain', index: 0 });
    expect(f).toContainEqual({ code: 'electrode-clipped', index: 1, value: 0.5 });
    expect(f).toContainEqual({ code: 'site-near-electrode', index: 0, value: 4 });
    // site b at x = 2.2 is 3.2 nm beside the lead and 4 nm above it: 5.12 nm, within 7.5 nm
    expect(f.find((x) => x.code === 'site-near-electrode' && x.index === 1)?.value).toBeCloseTo(Math.hypot(3.2, 4), 12);
    expect(electrodeFindings(electrodes, d.domain)).toHaveLength(2);
    expect(f.filter((x) => x.code === 'electrode-not-plane').map((x) => x.index)).toEqual([0, 1, 2]);
  });

  it('a metal sheet spanning the cross-section with sites on both sides is no plane (electrode-straddles)', () => {
    const sheet: Electrode = { name: 'sheet', minNm: [-40, -40, -12.5], maxNm: [40, 40, -12], voltageV: 0 };
    const d = design({ layers: stack, electrodes: [sheet], sites, half: [30, 30, 30] });
    expect(farFieldCheck(d).imageEffect!.findings).toContainEqual({ code: 'electrode-straddles', index: 0 });
  });

  it('exits the worst bound into worstRelBound: a 6 nm grounded box misses a 0.1 % target', () => {
    const d = design({ layers: stack, sites: [site('a', [0, 0, -2], hydrogenic(0.5))], half: [6, 6, 6] });
    const r = farFieldCheck(d);
    expect(r.worstRelBound).toBeGreaterThan(r.tolerance);
    expect(r.warnings.map((w) => w.code)).toContain('boundary-too-close');
  });
});
