/**
 * The image series of a slab (three regions) and of parallel plates: boundary conditions,
 * reciprocity, limits, the truncation bound, and two independent references — the Sommerfeld
 * integral solved by our own quadrature (spectral-reference.ts) and, for grounded plates, the
 * eigenfunction expansion in K₀ (below).
 */
import { describe, expect, it } from 'vitest';
import { gaussLegendre } from '../../../geometry/density';
import { greenFunction, imageSeries, planarStack, seriesAt } from '../../../geometry/host';
import type { HostLayer, PlanarStack } from '../../../geometry/host';
import { sommerfeldG } from './spectral-reference';

type V3 = [number, number, number];

// εr: silicon 11.7, SiO₂ 3.9 (common practice, from memory); the oxide thickness is our own example.
const EPS = [11.7, 3.9, 1];
function siOxVac(t: number): PlanarStack {
  const layers: HostLayer[] = [
    { name: 'silicon', epsilonR: EPS[0], zMinNm: null, zMaxNm: 0 },
    { name: 'oxide', epsilonR: EPS[1], zMinNm: 0, zMaxNm: t },
    { name: 'vacuum', epsilonR: EPS[2], zMinNm: t, zMaxNm: null },
  ];
  return planarStack(layers).stack!;
}
const STACK = siOxVac(5);

function plates(t: number, eps: number): PlanarStack {
  return planarStack(
    [{ name: 'silicon', epsilonR: eps, zMinNm: null, zMaxNm: null }],
    [
      { name: 'back', side: 'below', zNm: 0 },
      { name: 'top', side: 'above', zNm: t },
    ],
  ).stack!;
}

const G = (stack: PlanarStack, src: V3, obs: V3) => greenFunction(stack, src, obs).value!;

describe('slab between two half-spaces (Si / SiO₂ 5 nm / vacuum)', () => {
  const sources: V3[] = [
    [0, 0, -3], // silicon
    [0.3, 0.1, 2.2], // oxide
    [-0.2, 0.4, 7.5], // vacuum
  ];

  it('matches the Sommerfeld integral (own quadrature, independent of the image algebra) for every source and observation region', () => {
    const ref = { interfaces: [0, 5], epsilon: EPS };
    for (const src of sources) {
      for (const obs of [
        [1.1, 0.4, -1.7],
        [1.4, -0.6, 3.1],
        [-1.2, 0.8, 6.2],
      ] as V3[]) {
        const s = Math.hypot(obs[0] - src[0], obs[1] - src[1]);
        const image = G(STACK, src, obs);
        const spectral = sommerfeldG(ref, s, obs[2], src[2], 40, 0.25);
        expect(Math.abs(image / spectral - 1)).toBeLessThan(1e-9);
      }
    }
  });

  it('φ and ε ∂φ/∂z are continuous at both interfaces, for a source in each region', () => {
    const h = 1e-3;
    for (const src of sources) {
      for (const [zi, k] of [
        [0, 0],
        [5, 1],
      ]) {
        const [x, y] = [src[0] + 1.3, src[1] - 0.7];
        const below = [1, 2, 3].map((m) => G(STACK, src, [x, y, zi - m * h]));
        const above = [1, 2, 3].map((m) => G(STACK, src, [x, y, zi + m * h]));
        const phiB = 3 * below[0] - 3 * below[1] + below[2];
        const phiA = 3 * above[0] - 3 * above[1] + above[2];
        const dB = -(-2.5 * below[0] + 4 * below[1] - 1.5 * below[2]) / h;
        const dA = (-2.5 * above[0] + 4 * above[1] - 1.5 * above[2]) / h;
        expect(Math.abs(phiB - phiA) / Math.abs(phiA)).toBeLessThan(1e-8);
        expect(Math.abs(EPS[k] * dB - EPS[k + 1] * dA) / Math.abs(EPS[k] * dB)).toBeLessThan(1e-5);
      }
    }
  });

  it('is reciprocal: G(r, r′) = G(r′, r) for points in every pair of regions (Green’s reciprocity, Jackson §1.10, from memory)', () => {
    const points: V3[] = [
      [0, 0, -7],
      [1, 2, -0.4],
      [-1, 0.5, 0.6],
      [2, -1, 4.4],
      [0.3, 0.3, 5.2],
      [-2, 1, 11],
    ];
    for (const a of points)
      for (const b of points) {
        if (a === b) continue;
        const ab = greenFunction(STACK, a, b);
        const ba = greenFunction(STACK, b, a);
        expect(Math.abs(ab.value! - ba.value!)).toBeLessThanOrEqual(ab.tailBound + ba.tailBound + 1e-15);
      }
  });

  it('tends to the two-half-space result as the slab thins (O(t)) and near one interface of a thick slab', () => {
    const src: V3 = [0, 0, -2];
    const obs: V3 = [1.5, 0, -1];
    const siVac = planarStack([
      { name: 'silicon', epsilonR: EPS[0], zMinNm: null, zMaxNm: 0 },
      { name: 'vacuum', epsilonR: EPS[2], zMinNm: 0, zMaxNm: null },
    ]).stack!;
    const target = G(siVac, src, obs);
    const err = [1e-2, 1e-3, 1e-4].map((t) => Math.abs(G(siOxVac(t), src, obs) - target));
    expect(err[1]).toBeLessThan(err[0] / 5);
    expect(err[2]).toBeLessThan(err[1] / 5);
    expect(err[2] / target).toBeLessThan(1e-4);
    // thick oxide: near the Si/SiO₂ interface only that interface matters, up to O(d/t)
    const siOx = planarStack([
      { name: 'silicon', epsilonR: EPS[0], zMinNm: null, zMaxNm: 0 },
      { name: 'oxide', epsilonR: EPS[1], zMinNm: 0, zMaxNm: null },
    ]).stack!;
    const thick = [1e2, 1e3, 1e4].map((t) => Math.abs(G(siOxVac(t), src, obs) - G(siOx, src, obs)));
    expect(thick[1]).toBeLessThan(thick[0] / 5);
    expect(thick[2] / G(siOx, src, obs)).toBeLessThan(1e-4);
  });

  it('stays within its stated truncation bound when cut short, and says so', () => {
    const full = imageSeries(STACK, -1.5, -0.5, { toleranceNm1: 1e-16 });
    for (const N of [1, 2, 3, 5]) {
      const cut = imageSeries(STACK, -1.5, -0.5, { toleranceNm1: 1e-16, maxRoundTrips: N });
      expect(cut.findings.map((f) => f.code)).toContain('series-capped');
      for (const s of [0, 0.7, 4]) {
        const e = Math.abs(seriesAt(cut.series!, s) - seriesAt(full.series!, s));
        expect(e).toBeLessThanOrEqual(cut.series!.tailBound);
        expect(e).toBeGreaterThan(0);
      }
    }
    // with the default tolerance the bound is met
    expect(imageSeries(STACK, -1.5, -0.5).series!.tailBound).toBeLessThanOrEqual(1e-12);
  });

  it('with a metal plane on the oxide (Si / SiO₂ / gate) still matches the Sommerfeld integral', () => {
    const gated = planarStack(
      [
        { name: 'silicon', epsilonR: EPS[0], zMinNm: null, zMaxNm: 0 },
        { name: 'oxide', epsilonR: EPS[1], zMinNm: 0, zMaxNm: null },
      ],
      [{ name: 'gate', side: 'above', zNm: 5 }],
    ).stack!;
    const ref = { interfaces: [0, 5], epsilon: [EPS[0], EPS[1], Infinity] };
    for (const [src, obs] of [
      [
        [0, 0, -4],
        [1, 0, -2],
      ],
      [
        [0, 0, -4],
        [1, 1, 3],
      ],
      [
        [0, 0, 2],
        [0.5, 0, 1],
      ],
    ] as [V3, V3][]) {
      const s = Math.hypot(obs[0] - src[0], obs[1] - src[1]);
      expect(Math.abs(G(gated, src, obs) / sommerfeldG(ref, s, obs[2], src[2], 40, 0.25) - 1)).toBeLessThan(1e-9);
    }
    expect(G(gated, [0, 0, -4], [0, 0, 6])).toBe(0);
  });

  it('answers codes instead of numbers where it has no closed form', () => {
    expect(imageSeries(STACK, 0, -1).findings).toEqual([{ code: 'on-interface', value: 0 }]);
    const four = planarStack([
      { name: 'a', epsilonR: 11.7, zMinNm: null, zMaxNm: 0 },
      { name: 'b', epsilonR: 3.9, zMinNm: 0, zMaxNm: 5 },
      { name: 'c', epsilonR: 7, zMinNm: 5, zMaxNm: 6 },
      { name: 'd', epsilonR: 1, zMinNm: 6, zMaxNm: null },
    ]).stack!;
    expect(imageSeries(four, -1, -2).findings).toEqual([{ code: 'too-many-interfaces', value: 3 }]);
    expect(imageSeries(plates(10, 11.7), 11, 5).findings).toEqual([{ code: 'in-metal', value: 11 }]);
  });
});

/** K₀(x) = ∫₀^∞ e^{−x cosh u} du (Abramowitz & Stegun 9.6.24, from memory), Gauss–Legendre on [0, U] with x cosh U = x + 50. */
function besselK0(x: number): number {
  const U = Math.acosh(1 + 50 / x);
  const { nodes, weights } = gaussLegendre(64);
  let sum = 0;
  for (let i = 0; i < nodes.length; i++) {
    const u = (U / 2) * (nodes[i] + 1);
    sum += (U / 2) * weights[i] * Math.exp(-x * Math.cosh(u));
  }
  return sum;
}

/**
 * Grounded plates at z = 0 and z = t, εr = ε: the eigenfunction expansion of the Green's function
 * in sin(nπz/t), each transverse factor solving (−∇⊥² + k²)g = 4πδ², i.e. g = 2K₀(ks):
 *     G = (4/(ε t)) Σ_n sin(nπz/t) sin(nπz₀/t) K₀(nπs/t)
 * (the method of Jackson §3.11; the form is derived here, not copied). Converges fast for s > 0.
 */
function platesModal(t: number, eps: number, s: number, z: number, z0: number): number {
  let sum = 0;
  for (let n = 1; (n * Math.PI * s) / t < 45; n++) {
    const k = (n * Math.PI) / t;
    sum += Math.sin(k * z) * Math.sin(k * z0) * besselK0(k * s);
  }
  return (4 / (eps * t)) * sum;
}

describe('charge between two grounded plates', () => {
  const t = 10;
  const stack = plates(t, 11.7);

  it('the image series matches the eigenfunction (K₀) expansion within its bound', () => {
    for (const [z0, z, s] of [
      [3, 7, 0.5],
      [3, 7, 3],
      [5, 5, 2],
      [1, 9.5, 8],
      [2, 2.5, 15],
    ]) {
      const { value, tailBound } = greenFunction(stack, [0, 0, z0], [s, 0, z]);
      const modal = platesModal(t, 11.7, s, z, z0);
      expect(Math.abs(value! - modal)).toBeLessThanOrEqual(tailBound + 1e-14);
    }
  });

  it('the plate tail bound holds when cut short, and shrinks like 1/N²', () => {
    const full = imageSeries(stack, 3, 7, { toleranceNm1: 1e-14 });
    let prev = Infinity;
    for (const N of [2, 4, 8, 16, 64]) {
      const cut = imageSeries(stack, 3, 7, { toleranceNm1: 1e-16, maxRoundTrips: N });
      const b = cut.series!.tailBound;
      for (const s of [0, 1, 10]) expect(Math.abs(seriesAt(cut.series!, s) - seriesAt(full.series!, s))).toBeLessThanOrEqual(b + full.series!.tailBound);
      expect(b).toBeLessThan(prev);
      prev = b;
    }
    const b8 = imageSeries(stack, 3, 7, { toleranceNm1: 1e-16, maxRoundTrips: 9 }).series!.tailBound;
    const b16 = imageSeries(stack, 3, 7, { toleranceNm1: 1e-16, maxRoundTrips: 17 }).series!.tailBound;
    expect(b8 / b16).toBeCloseTo(4, 10);
  });

  it('a dielectric of huge εr outside the slab approaches the plates', () => {
    const nearMetal = planarStack([
      { name: 'm1', epsilonR: 1e9, zMinNm: null, zMaxNm: 0 },
      { name: 'si', epsilonR: 11.7, zMinNm: 0, zMaxNm: t },
      { name: 'm2', epsilonR: 1e9, zMinNm: t, zMaxNm: null },
    ]).stack!;
    const a = G(stack, [0, 0, 3], [2, 0, 6]);
    const b = greenFunction(nearMetal, [0, 0, 3], [2, 0, 6], { toleranceNm1: 1e-10 }).value!;
    expect(Math.abs(a - b) / a).toBeLessThan(1e-5);
  });
});
