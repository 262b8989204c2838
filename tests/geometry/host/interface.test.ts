/**
 * One planar interface (two half-spaces) and a grounded plane, against the published image
 * solutions: Jackson, Classical Electrodynamics 3rd ed., §4.4 (charge in ε₁ near a planar
 * interface with ε₂: image q′ = −q(ε₂ − ε₁)/(ε₂ + ε₁) seen in medium 1, transmitted
 * q″ = 2ε₂q/(ε₂ + ε₁) seen in medium 2, eqs. 4.45) and §2.1–2.2 (grounded plane: image −q; the
 * induced charge totals −q).
 */
import { describe, expect, it } from 'vitest';
import { gaussLegendre } from '../../../geometry/density';
import { greenFunction, imageSeries, interfaceCharges, planarStack, reactionAt } from '../../../geometry/host';
import { reflection, transmission } from '../../../geometry/host/interface';
import type { PlanarStack } from '../../../geometry/host';

type V3 = [number, number, number];

function twoHalfSpaces(eps1: number, eps2: number): PlanarStack {
  return planarStack([
    { name: 'lower', epsilonR: eps1, zMinNm: null, zMaxNm: 0 },
    { name: 'upper', epsilonR: eps2, zMinNm: 0, zMaxNm: null },
  ]).stack!;
}

/** Jackson §4.4 written out independently of the library: charge q = 1 at (0, 0, −d) in ε₁ (z < 0), ε₂ above. */
function jackson(eps1: number, eps2: number, d: number, p: V3): number {
  const q1 = (-(eps2 - eps1) / (eps2 + eps1)) * 1; // q′
  const q2 = ((2 * eps2) / (eps2 + eps1)) * 1; // q″
  const R1 = Math.hypot(p[0], p[1], p[2] + d);
  const R2 = Math.hypot(p[0], p[1], p[2] - d);
  return p[2] < 0 ? (1 / R1 + q1 / R2) / eps1 : q2 / (eps2 * R1);
}

const G = (stack: PlanarStack, src: V3, obs: V3) => greenFunction(stack, src, obs).value!;

describe('two half-spaces (Jackson §4.4)', () => {
  const eps1 = 11.7; // silicon, common practice
  const eps2 = 3.9; // SiO₂, common practice
  const stack = twoHalfSpaces(eps1, eps2);
  const d = 2.3;
  const src: V3 = [0.4, -0.2, -d];

  it("the image and transmitted charges are Jackson's", () => {
    const { image, transmitted } = interfaceCharges(eps1, eps2, 1);
    // §4.4: q′ = −q(ε₂ − ε₁)/(ε₂ + ε₁), q″ = 2ε₂q/(ε₂ + ε₁); for 11.7 | 3.9 both are exactly q/2
    expect(image).toBeCloseTo(0.5, 15);
    expect(transmitted).toBeCloseTo(0.5, 15);
    expect(reflection(eps1, eps2)).toBeCloseTo(image, 15);
    // T = (q″/ε₂)·ε₁ = 1 + r (continuity of φ at the interface)
    expect(transmission(eps1, eps2)).toBeCloseTo((transmitted / eps2) * eps1, 15);
  });

  it('G equals the image solution on both sides of the interface', () => {
    for (const p of [
      [1, 2, -0.7],
      [-3, 0.5, -6],
      [0.4, -0.2, -0.3],
      [2, -1, 0.8],
      [0, 0, 4],
    ] as V3[]) {
      const rel: V3 = [p[0] - src[0], p[1] - src[1], p[2]];
      expect(G(stack, src, p) / jackson(eps1, eps2, d, rel) - 1).toBeLessThan(1e-14);
      expect(G(stack, src, p) / jackson(eps1, eps2, d, rel) - 1).toBeGreaterThan(-1e-14);
    }
  });

  it('φ and ε ∂φ/∂z are continuous at the interface (the conditions the images are built from)', () => {
    const h = 1e-3;
    for (const [x, y] of [
      [0.4, -0.2],
      [1.5, 0.3],
      [-4, 2],
    ]) {
      // quadratic one-sided extrapolation from heights ±h, ±2h, ±3h (error O(h³) in φ, O(h²) in φ′)
      const below = [1, 2, 3].map((k) => G(stack, src, [x, y, -k * h]));
      const above = [1, 2, 3].map((k) => G(stack, src, [x, y, k * h]));
      const phiBelow = 3 * below[0] - 3 * below[1] + below[2];
      const phiAbove = 3 * above[0] - 3 * above[1] + above[2];
      const dBelow = -(-2.5 * below[0] + 4 * below[1] - 1.5 * below[2]) / h;
      const dAbove = (-2.5 * above[0] + 4 * above[1] - 1.5 * above[2]) / h;
      expect(Math.abs(phiBelow - phiAbove) / phiAbove).toBeLessThan(1e-8);
      expect(Math.abs(eps1 * dBelow - eps2 * dAbove) / Math.abs(eps1 * dBelow)).toBeLessThan(1e-5);
      // and the normal field itself jumps by ε₁/ε₂ (a check that can fail if ε were dropped)
      expect(dAbove / dBelow).toBeCloseTo(eps1 / eps2, 4);
    }
  });

  it('the reaction part is harmonic in medium 1 (7-point Laplacian, O(h²))', () => {
    const { series } = imageSeries(stack, -d, -1.1);
    const { series: up } = imageSeries(stack, -d, -1.1 + 0.01);
    const { series: dn } = imageSeries(stack, -d, -1.1 - 0.01);
    const h = 0.01;
    const s0 = 0.8;
    // in cylindrical form ∇²φ = φ_ss + φ_s/s + φ_zz at lateral distance s0
    const c = reactionAt(series!, s0);
    const lap =
      (reactionAt(series!, s0 + h) - 2 * c + reactionAt(series!, s0 - h)) / (h * h) +
      (reactionAt(series!, s0 + h) - reactionAt(series!, s0 - h)) / (2 * h * s0) +
      (reactionAt(up!, s0) - 2 * c + reactionAt(dn!, s0)) / (h * h);
    expect(Math.abs(lap) / c).toBeLessThan(1e-4);
  });

  it('ε₂ → ε₁ leaves no image; ε₂ → ∞ gives the grounded-plane image −q', () => {
    const p: V3 = [1.2, 0.1, -0.9];
    const homogeneous = 1 / (eps1 * Math.hypot(p[0] - src[0], p[1] - src[1], p[2] - src[2]));
    expect(G(twoHalfSpaces(eps1, eps1), src, p)).toBeCloseTo(homogeneous, 15);
    const near = G(twoHalfSpaces(eps1, eps1 * (1 + 1e-8)), src, p);
    expect(Math.abs(near / homogeneous - 1)).toBeLessThan(1e-8);
    // grounded plane (Jackson §2.1): φ = (1/ε₁)(1/R − 1/R′)
    const grounded = planarStack([{ name: 'Si', epsilonR: eps1, zMinNm: null, zMaxNm: null }], [{ name: 'gate', side: 'above', zNm: 0 }]).stack!;
    const R = Math.hypot(p[0] - src[0], p[1] - src[1], p[2] + d);
    const Rm = Math.hypot(p[0] - src[0], p[1] - src[1], p[2] - d);
    const exact = (1 / R - 1 / Rm) / eps1;
    expect(G(grounded, src, p) / exact - 1).toBeCloseTo(0, 14);
    // a very large ε₂ approaches it as 1/ε₂ (r = −1 + 2ε₁/ε₂ + …)
    const large = G(twoHalfSpaces(eps1, 1e9), src, p);
    expect(Math.abs(large - exact) / Math.abs(exact)).toBeLessThan(1e-6);
    expect(Math.abs(large - exact)).toBeGreaterThan(0);
    // inside the metal the potential is the metal's own (0)
    expect(G(grounded, src, [0, 0, 1])).toBe(0);
  });

  it('the charge induced on a grounded plane totals −q (Jackson §2.1–2.2)', () => {
    const grounded = planarStack([{ name: 'Si', epsilonR: eps1, zMinNm: null, zMaxNm: null }], [{ name: 'gate', side: 'above', zNm: 0 }]).stack!;
    // σ = (ε/4π) ∂φ/∂z at the metal face (units of geometry/units.ts: −∇·(ε∇φ) = 4πρ); the flux
    // through the plane is integrated in s = d·tan(θ), which maps [0, ∞) to [0, π/2)
    const h = 1e-4;
    const { nodes, weights } = gaussLegendre(64);
    let q = 0;
    for (let i = 0; i < nodes.length; i++) {
      const th = (Math.PI / 4) * (nodes[i] + 1);
      const s = d * Math.tan(th);
      const ds = (d / Math.cos(th) ** 2) * (Math.PI / 4) * weights[i];
      const f1 = G(grounded, [0, 0, -d], [s, 0, -h]);
      const f2 = G(grounded, [0, 0, -d], [s, 0, -2 * h]);
      const dphi = (0 - (4 / 3) * f1 + (1 / 3) * f2) / ((2 / 3) * h); // one-sided, φ(0) = 0
      q += ((eps1 * dphi) / (4 * Math.PI)) * 2 * Math.PI * s * ds;
    }
    expect(q).toBeCloseTo(-1, 6);
  });
});
