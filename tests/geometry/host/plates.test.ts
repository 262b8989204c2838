/**
 * Two metal planes at set voltages: the linear potential, lever arms (meV/V) and the series
 * capacitor of two dielectrics, against textbook results (parallel-plate capacitor and capacitors
 * in series from continuity of the normal D, e.g. Jackson §4.4 boundary conditions with Gauss's
 * law), and the Shockley–Ramo theorem (W. Shockley, J. Appl. Phys. 9, 635 (1938); S. Ramo, Proc.
 * IRE 27, 584 (1939); citations from memory): the charge a unit charge induces on a grounded plate equals minus the
 * potential at the charge when that plate is at 1 V and the other at 0 — checked by integrating
 * the flux of the image-series Green's function, which ties the lever arms to images.ts.
 */
import { describe, expect, it } from 'vitest';
import { gaussLegendre } from '../../../geometry/density';
import { imageSeries, planarStack, planeLeverArms, plateLeverArms, plateProfile, plateSiteEnergy, seriesAt } from '../../../geometry/host';
import { topFraction } from '../../../geometry/host/plates';
import type { HostLayer } from '../../../geometry/host';
import { VACUUM_PERMITTIVITY_F_M } from '../../../geometry/units';

const EPS_SI = 11.7; // common practice, from memory
const EPS_OX = 3.9; // common practice, from memory

function between(layers: HostLayer[], zBottom: number, zTop: number) {
  return planarStack(layers, [
    { name: 'back gate', side: 'below', zNm: zBottom },
    { name: 'top gate', side: 'above', zNm: zTop },
  ]).stack!;
}

describe('one dielectric between two plates', () => {
  const stack = between([{ name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: null }], 0, 30);
  const { profile } = plateProfile(stack);

  it('the potential is linear: lever arms −1000·z/D and −1000·(1 − z/D) meV/V for an electron, opposite for a hole', () => {
    for (const z of [3, 12.5, 29]) {
      const e = plateLeverArms(profile!, z, 'electron');
      expect(e.topMeVPerV).toBeCloseTo((-1000 * z) / 30, 12);
      expect(e.bottomMeVPerV).toBeCloseTo(-1000 * (1 - z / 30), 12);
      const h = plateLeverArms(profile!, z, 'hole');
      expect(h.topMeVPerV).toBeCloseTo(-e.topMeVPerV, 12);
      // an electron at the design's voltages: E = −e·φ, φ = V_b + (V_t − V_b)·z/D
      expect(plateSiteEnergy(profile!, z, 0.1, 0.4)).toBeCloseTo(-(0.1 + 0.3 * (z / 30)), 14);
    }
    // a positive top gate lowers an electron's energy
    expect(plateSiteEnergy(profile!, 10, 0, 1)).toBeLessThan(0);
    // parallel-plate capacitor per area: ε₀εr/D
    expect(profile!.capacitanceFPerM2 / ((VACUUM_PERMITTIVITY_F_M * EPS_SI) / 30e-9) - 1).toBeCloseTo(0, 14);
  });

  it('Shockley–Ramo: the charge induced on the top plate by a unit charge at z₀ is −z₀/D (image-series flux)', () => {
    const D = 30;
    for (const z0 of [7, 18]) {
      // σ on the top plate = (ε/4π) ∂φ/∂z at z = D⁻ (−∇·(ε∇φ) = 4πρ, geometry/units.ts). The field
      // between plates dies like e^{−πs/D} (lowest mode), so s ≤ 6D leaves out ~1e-8 of the charge.
      const h = 0.05;
      const { nodes, weights } = gaussLegendre(24);
      // one series per height, evaluated at every lateral distance
      const opts = { toleranceNm1: 1e-13 };
      const near = imageSeries(stack, z0, D - h, opts).series!;
      const far = imageSeries(stack, z0, D - 2 * h, opts).series!;
      let q = 0;
      for (let p = 0; p < 12; p++) {
        for (let i = 0; i < nodes.length; i++) {
          const s = (D / 2) * (p + (nodes[i] + 1) / 2);
          const ds = (D / 4) * weights[i];
          const f1 = seriesAt(near, s);
          const f2 = seriesAt(far, s);
          // one-sided second-order derivative with φ(D) = 0: φ′(D) = (−4φ(D − h) + φ(D − 2h))/(2h)
          const dphi = (-4 * f1 + f2) / (2 * h);
          q += ((EPS_SI * dphi) / (4 * Math.PI)) * 2 * Math.PI * s * ds;
        }
      }
      // = minus the top plate's share of the potential at z₀, i.e. the electron's lever arm / 1000
      expect(q).toBeCloseTo(-z0 / D, 5);
      expect(q).toBeCloseTo(plateLeverArms(profile!, z0).topMeVPerV / 1000, 5);
    }
  });
});

describe('two dielectrics between two plates (silicon 20 nm under oxide 5 nm)', () => {
  const stack = between(
    [
      { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
      { name: 'oxide', epsilonR: EPS_OX, zMinNm: 0, zMaxNm: null },
    ],
    -20,
    5,
  );
  const { profile, findings } = plateProfile(stack);

  it('is a series capacitor: C = ε₀ / (t₁/ε₁ + t₂/ε₂)', () => {
    expect(findings).toEqual([]);
    expect(profile!.electricalThicknessNm).toBeCloseTo(20 / EPS_SI + 5 / EPS_OX, 14);
    const series = 1 / (1 / ((VACUUM_PERMITTIVITY_F_M * EPS_SI) / 20e-9) + 1 / ((VACUUM_PERMITTIVITY_F_M * EPS_OX) / 5e-9));
    expect(profile!.capacitanceFPerM2 / series - 1).toBeCloseTo(0, 13);
  });

  it('φ is continuous, ε·E is the same in both layers, and the ends hold the plate voltages', () => {
    const phi = (z: number) => -plateSiteEnergy(profile!, z, -0.2, 0.7); // electron energy = −φ
    expect(phi(-20)).toBeCloseTo(-0.2, 14);
    expect(phi(5)).toBeCloseTo(0.7, 14);
    expect(Math.abs(phi(-1e-9) - phi(1e-9))).toBeLessThan(1e-9);
    const E1 = -(phi(-5) - phi(-10)) / 5;
    const E2 = -(phi(4) - phi(1)) / 3;
    expect(EPS_SI * E1).toBeCloseTo(EPS_OX * E2, 13);
    expect(E2 / E1).toBeCloseTo(EPS_SI / EPS_OX, 12);
  });

  it('a donor 10 nm below the oxide sees the top gate with a lever arm of (10/ε_Si)/W', () => {
    const f = 10 / EPS_SI / (20 / EPS_SI + 5 / EPS_OX);
    expect(topFraction(profile!, -10)).toBeCloseTo(f, 14);
    expect(plateLeverArms(profile!, -10).topMeVPerV).toBeCloseTo(-1000 * f, 10);
    expect(plateLeverArms(profile!, -10).bottomMeVPerV).toBeCloseTo(-1000 * (1 - f), 10);
  });

  it('refuses a stack that is not closed by metal on both sides', () => {
    const open = planarStack([{ name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: null }], [{ name: 'top gate', side: 'above', zNm: 5 }]).stack!;
    expect(plateProfile(open)).toEqual({ profile: null, findings: [{ code: 'not-between-plates' }] });
  });
});

describe('lever-arm matrix of a design whose electrodes include planes', () => {
  // our own example: donors 12 nm under a 5 nm oxide, a top gate plane on the oxide, a back gate 30 nm
  // down, a finite plunger gate and a second back plane behind the first
  const layers: HostLayer[] = [
    { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
    { name: 'oxide', epsilonR: EPS_OX, zMinNm: 0, zMaxNm: 5 },
    { name: 'vacuum', epsilonR: 1, zMinNm: 5, zMaxNm: null },
  ];
  const domain = { center: [0, 0, -10] as [number, number, number], halfExtentsNm: [30, 30, 25] as [number, number, number] };
  const electrodes = [
    { name: 'top gate', minNm: [-30, -30, 5], maxNm: [30, 30, 7], voltageV: 0.5 },
    { name: 'plunger', minNm: [-3, -3, 5], maxNm: [3, 3, 7], voltageV: 0.1 },
    { name: 'back gate', minNm: [-30, -30, -33], maxNm: [30, 30, -30], voltageV: -0.2 },
    { name: 'substrate', minNm: [-30, -30, -35], maxNm: [30, 30, -34], voltageV: 1 },
  ] as { name: string; minNm: [number, number, number]; maxNm: [number, number, number]; voltageV: number }[];

  it('gives series-capacitor arms for the inner planes, 0 for a screened plane and NaN (with a code) for a finite gate', () => {
    const sites = [
      { position: [0, 0, -12] as [number, number, number], orbital: { model: 'hydrogenic-1s' as const, radiusNm: 2.5 } },
      { position: [4.3, 0, -12] as [number, number, number] },
    ];
    const r = planeLeverArms({ epsilonR: EPS_SI, layers, electrodes, domain, sites, carriers: ['electron', 'hole'] });
    expect(r.findings).toContainEqual({ code: 'electrode-not-plane', index: 1 });
    const W = 30 / EPS_SI + 5 / EPS_OX;
    const f = (30 - 12) / EPS_SI / W; // share of the drop below z = −12 (series capacitors)
    expect(r.meVPerV[0]).toBeCloseTo(-1000 * f, 10); // electron, top gate
    expect(Number.isNaN(r.meVPerV[1])).toBe(true); // plunger: needs the FEM
    expect(r.meVPerV[2]).toBeCloseTo(-1000 * (1 - f), 10); // back gate
    expect(r.meVPerV[3]).toBe(0); // behind the back gate
    expect(r.meVPerV[4]).toBeCloseTo(1000 * f, 10); // hole: opposite sign
    expect(Number.isNaN(r.siteEnergiesEv[0])).toBe(true); // the plunger's share is unknown
  });

  it('with planes only, the site energy is −φ(centre) at the design voltages for an electron', () => {
    const planesOnly = [electrodes[0], electrodes[2]];
    const r = planeLeverArms({ epsilonR: EPS_SI, layers, electrodes: planesOnly, domain, sites: [{ position: [0, 0, -12] }] });
    const W = 30 / EPS_SI + 5 / EPS_OX;
    const f = (30 - 12) / EPS_SI / W;
    expect(r.siteEnergiesEv[0]).toBeCloseTo(-(-0.2 + (0.5 + 0.2) * f), 13);
    expect(r.findings).toEqual([]);
  });

  it('says when a density reaches an interface (the closed form assumes it does not)', () => {
    const r = planeLeverArms({
      epsilonR: EPS_SI,
      layers,
      electrodes: [electrodes[0], electrodes[2]],
      domain,
      sites: [{ position: [0, 0, -2], orbital: { model: 'gaussian', sigmaNm: 1 } }],
    });
    expect(r.findings.map((x) => x.code)).toEqual(['density-leaks']);
  });
});
