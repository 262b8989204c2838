import { describe, expect, it } from 'vitest';
import type { Orbital, Vec3 } from '../../../geometry/design/types';
import {
  axialMoment,
  chargeOutsideBox,
  densityAt,
  erf,
  erfc,
  gaussLegendre,
  orbitalModel,
  pairEnergy,
  potentialAt,
  radialPotential,
  selfEnergy,
} from '../../../geometry/density';
import { densityBatch } from '../../../geometry/density/models';
import { faceRuleOutside, halfSpaceTail1s } from '../../../geometry/density/outside';
import { BOHR_RADIUS_NM, COULOMB_EV_NM, HARTREE_EV } from '../../../geometry/units';

/** the face rule of outside.ts for one orbital, through its registry entry (the rule chargeOutsideBox falls back on) */
function chargeOutsideBoxByFaces(o: Orbital, c: Vec3, boxCenter: Vec3, half: Vec3, n: number): number {
  const m = orbitalModel(o);
  return faceRuleOutside(m.profileTail, m.axes(o), c, boxCenter, half, n);
}

const H: Orbital = { model: 'hydrogenic-1s', radiusNm: 2.5 };
const A: Orbital = { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 };
const G: Orbital = { model: 'gaussian', sigmaNm: 1.7 };
const C: Vec3 = [0.4, -1.1, 0.7];

/** ∫ f over all space in spherical coordinates about C: Gauss–Legendre in r (panels) and cosθ, trapezoid in φ. */
function integrate(f: (x: number, y: number, z: number) => number, rmax: number): number {
  const gl = gaussLegendre(24);
  const gm = gaussLegendre(24);
  const nphi = 32;
  const edges = [0, 0.05, 0.2, 0.5, 1].map((t) => t * rmax);
  let sum = 0;
  for (let p = 0; p + 1 < edges.length; p++) {
    const h = (edges[p + 1] - edges[p]) / 2;
    for (let i = 0; i < gl.nodes.length; i++) {
      const r = edges[p] + h * (gl.nodes[i] + 1);
      for (let j = 0; j < gm.nodes.length; j++) {
        const mu = gm.nodes[j];
        const st = Math.sqrt(1 - mu * mu);
        for (let k = 0; k < nphi; k++) {
          const ph = (2 * Math.PI * k) / nphi;
          const v = f(C[0] + r * st * Math.cos(ph), C[1] + r * st * Math.sin(ph), C[2] + r * mu);
          sum += h * gl.weights[i] * gm.weights[j] * ((2 * Math.PI) / nphi) * r * r * v;
        }
      }
    }
  }
  return sum;
}

describe('erf/erfc', () => {
  it('match tabulated values (Abramowitz & Stegun table 7.1; from memory to 16 digits)', () => {
    expect(erf(0.5)).toBeCloseTo(0.5204998778130465, 14);
    expect(erf(1)).toBeCloseTo(0.8427007929497149, 14);
    expect(erfc(3) / 2.209049699858544e-5 - 1).toBeLessThan(1e-12);
    expect(Math.abs(erfc(5) / 1.5374597944280349e-12 - 1)).toBeLessThan(1e-12);
    expect(erf(-1.3)).toBe(-erf(1.3));
  });
  it('is the integral of 2/√π e^{−t²} (definition), across the series/fraction switch', () => {
    const { nodes, weights } = gaussLegendre(40);
    for (const x of [0.3, 1.9, 2.0, 2.1, 3.5]) {
      let s = 0;
      for (let i = 0; i < nodes.length; i++) {
        const t = (x / 2) * (nodes[i] + 1);
        s += (x / 2) * weights[i] * (2 / Math.sqrt(Math.PI)) * Math.exp(-t * t);
      }
      expect(Math.abs(erf(x) - s)).toBeLessThan(1e-14);
    }
  });
});

describe('densities', () => {
  it.each([H, A, G])('%o is normalised to one electron (numerical cubature)', (o) => {
    expect(integrate((x, y, z) => densityAt(o, C, x, y, z), 60)).toBeCloseTo(1, 9);
  });
  it('batch form equals the pointwise form bit for bit', () => {
    const pts = new Float64Array([0, 0, 0, 1, 2, 3, -4, 0.5, 2]);
    for (const o of [H, A, G]) {
      const out = densityBatch(o, C, pts);
      for (let i = 0; i < 3; i++) expect(out[i]).toBe(densityAt(o, C, pts[3 * i], pts[3 * i + 1], pts[3 * i + 2]));
    }
  });
  it('hydrogenic density at the centre is 1/(πa³) (textbook 1s)', () => {
    expect(densityAt(H, C, ...C)).toBeCloseTo(1 / (Math.PI * 2.5 ** 3), 15);
  });
});

describe('potentials and energies', () => {
  it('5/8 Hartree self-repulsion of hydrogen 1s at a = a0 (first-order helium integral; CODATA 2018 constants)', () => {
    const o: Orbital = { model: 'hydrogenic-1s', radiusNm: BOHR_RADIUS_NM };
    expect(COULOMB_EV_NM * selfEnergy(o)).toBeCloseTo((5 / 8) * HARTREE_EV, 6);
  });
  it('closed-form potentials integrate to the closed-form self-energies (∫ρφ by cubature)', () => {
    for (const o of [H, G]) {
      const u = integrate((x, y, z) => densityAt(o, C, x, y, z) * potentialAt(o, C, x, y, z), 60);
      expect(u / selfEnergy(o) - 1).toBeLessThan(1e-8);
    }
  });
  it('anisotropic: ellipsoid-potential quadrature (Binney & Tremaine 2.140) and the Fourier stretch factor agree', () => {
    const u = integrate((x, y, z) => densityAt(A, C, x, y, z) * potentialAt(A, C, x, y, z), 60);
    expect(Math.abs(u / selfEnergy(A) - 1)).toBeLessThan(1e-6);
  });
  it('anisotropic with a = b reduces to the hydrogenic potential', () => {
    const iso: Orbital = { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 2.5 };
    for (const r of [0, 1e-3, 0.011, 0.3, 2, 9, 60, 500]) {
      const p = potentialAt(iso, [0, 0, 0], 0.6 * r, 0, 0.8 * r);
      expect(Math.abs(p / (radialPotential(H, r) as number) - 1)).toBeLessThan(1e-12);
    }
  });
  it('Gaussian potential is erf(r/σ√2)/r and tends to 1/r (Gauss law) far away', () => {
    expect(radialPotential(G, 40)).toBeCloseTo(1 / 40, 14);
    expect(radialPotential(G, 0)).toBeCloseTo(Math.sqrt(2 / Math.PI) / 1.7, 12);
  });
  it('pair energies: closed forms equal ∫ρ₂φ₁ by cubature', () => {
    const R = 3.2;
    for (const [o1, o2] of [
      [H, H],
      [G, { model: 'gaussian', sigmaNm: 0.9 } as Orbital],
    ] as const) {
      const c2: Vec3 = [C[0] + R, C[1], C[2]];
      const v = integrate((x, y, z) => densityAt(o1, C, x, y, z) * potentialAt(o2, c2, x, y, z), 60);
      expect(Math.abs((pairEnergy(o1, o2, R) as number) / v - 1)).toBeLessThan(1e-7);
    }
  });
});

describe('moments and charge outside a box', () => {
  it('anisotropic quadrupole q2 = b² − a² (⟨x²⟩ = a², ⟨z²⟩ = b² for the e^{−2m} profile), cross-checked by cubature', () => {
    expect(axialMoment(A, 2)).toBeCloseTo(1.4 ** 2 - 2.5 ** 2, 12);
    const q4 = integrate((x, y, z) => {
      const dx = x - C[0], dy = y - C[1], dz = z - C[2];
      const r2 = dx * dx + dy * dy + dz * dz;
      return densityAt(A, C, x, y, z) * (35 * dz ** 4 - 30 * dz * dz * r2 + 3 * r2 * r2) / 8;
    }, 80);
    expect(Math.abs(axialMoment(A, 4) / q4 - 1)).toBeLessThan(1e-8);
    expect(axialMoment(H, 2)).toBe(0);
    expect(axialMoment(A, 3)).toBe(0);
  });
  it('face rule reproduces the exact (erf-factorised) Gaussian outside fraction', () => {
    const cases: [Vec3, Vec3][] = [
      [[0.3, -0.2, 0.5], [3, 4, 2.5]],
      [[2.9, 0, 0], [3, 4, 2.5]],
      [[0, 0, 0], [8, 8, 8]],
    ];
    for (const [c, h] of cases) {
      const exact = chargeOutsideBox(G, c, [0, 0, 0], h);
      const faces = chargeOutsideBoxByFaces(G, c, [0, 0, 0], h, 12);
      expect(Math.abs(faces / exact - 1)).toBeLessThan(1e-6);
    }
  });
  it('the default rule (8×8 per face quarter) is within 1e-4 of the exact Gaussian fraction', () => {
    for (const c of [[0.3, -0.2, 0.5], [2.9, 0, 0], [1, 1, 1.2]] as Vec3[]) {
      const exact = chargeOutsideBox(G, c, [0, 0, 0], [3, 4, 2.5]);
      expect(Math.abs(chargeOutsideBoxByFaces(G, c, [0, 0, 0], [3, 4, 2.5], 8) / exact - 1)).toBeLessThan(1e-4);
    }
  });
  it('1s outside fraction of a centred cube lies between the inscribed and circumscribed sphere tails', () => {
    const L = 5;
    const out = chargeOutsideBox(H, [0, 0, 0], [0, 0, 0], [L, L, L]);
    const tail = (R: number) => Math.exp(-2 * R) * (1 + 2 * R + 2 * R * R);
    expect(out).toBeLessThan(tail(L / 2.5));
    expect(out).toBeGreaterThan(tail((Math.sqrt(3) * L) / 2.5));
  });
});

describe('half-space closed form for 1s densities', () => {
  it('½(1 + d)e^{−2d} (marginal of e^{−2r}/π) matches the face rule for a site near one face of a large box', () => {
    const H1: Orbital = { model: 'hydrogenic-1s', radiusNm: 1 };
    for (const d of [0.5, 2, 6]) {
      const c: Vec3 = [50 - d, 0, 0];
      const faces = chargeOutsideBoxByFaces(H1, c, [0, 0, 0], [50, 50, 50], 16);
      expect(Math.abs(halfSpaceTail1s(d) / faces - 1)).toBeLessThan(1e-6);
      expect(Math.abs(chargeOutsideBox(H1, c, [0, 0, 0], [50, 50, 50]) / faces - 1)).toBeLessThan(1e-6);
    }
  });
  it('near an edge the face rule takes over and stays within 1e-4 of a fine rule', () => {
    const c: Vec3 = [2.0, 2.2, 0];
    const fine = chargeOutsideBoxByFaces(A, c, [0, 0, 0], [3, 3, 10], 24);
    expect(Math.abs(chargeOutsideBox(A, c, [0, 0, 0], [3, 3, 10]) / fine - 1)).toBeLessThan(1e-4);
  });
});

describe('closed-form path near (not at) an edge', () => {
  it('is an upper bound within 1% of the fine face rule (inclusion–exclusion)', () => {
    const Hc: Orbital = { model: 'hydrogenic-1s', radiusNm: 2.5 };
    for (const c of [[16, 14, 0], [10, 12, 0], [-18, 3, 30]] as Vec3[]) {
      const fine = chargeOutsideBoxByFaces(Hc, c, [0, 0, 0], [36, 36, 40], 24);
      const v = chargeOutsideBox(Hc, c, [0, 0, 0], [36, 36, 40]);
      expect(v).toBeGreaterThanOrEqual(fine * (1 - 1e-6));
      expect(v).toBeLessThanOrEqual(fine * 1.01);
    }
  });
});
