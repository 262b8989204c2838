/**
 * The worst image-charge effect on U and V against an infinite silicon host (the figure `check`
 * will report): zero for a homogeneous host, the closed forms built from the image for one
 * interface (Jackson §4.4), the Sommerfeld reference for an oxide under a metal plane, and the
 * recognition of metal planes among electrodes.
 */
import { describe, expect, it } from 'vitest';
import type { Orbital, Vec3 } from '../../../geometry/design/types';
import { erf, selfEnergy } from '../../../geometry/density';
import { imageChargeEffect } from '../../../geometry/host';
import type { Electrode, HostLayer } from '../../../geometry/host';
import { COULOMB_EV_NM } from '../../../geometry/units';
import { sommerfeldG } from './spectral-reference';

const EPS_SI = 11.7; // common practice, from memory
const EPS_OX = 3.9; // common practice, from memory
const G1: Orbital = { model: 'gaussian', sigmaNm: 1 };

const SI_VAC: HostLayer[] = [
  { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
  { name: 'vacuum', epsilonR: 1, zMinNm: 0, zMaxNm: null },
];
const SI_OX: HostLayer[] = [
  { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
  { name: 'oxide', epsilonR: EPS_OX, zMinNm: 0, zMaxNm: null },
];
const DOMAIN = { center: [0, 0, -10] as Vec3, halfExtentsNm: [40, 40, 20] as Vec3 };
// a top gate covering the domain's cross-section on a 5 nm oxide (our own example)
const TOP_PLANE: Electrode = { name: 'top gate', minNm: [-40, -40, 5], maxNm: [40, 40, 7], voltageV: 0.4 };

describe('imageChargeEffect', () => {
  it('is zero in a homogeneous host', () => {
    const sites = [0, 1, 2].map((i) => ({ position: [4.3 * i, 0, -8] as Vec3, orbital: G1 }));
    const e = imageChargeEffect({ epsilonR: EPS_SI, sites });
    expect(Array.from(e.deltaU)).toEqual([0, 0, 0]);
    expect(Array.from(e.deltaV)).toEqual([0, 0, 0]);
    expect(e.pairs.length).toBe(6);
    expect(e.findings).toEqual([]);
  });

  it('below vacuum: ΔU and ΔV are the closed forms from the image, and the shallowest site is the worst', () => {
    const depths = [12, 6, 9];
    const sites = depths.map((d, i) => ({ position: [4.3 * i, 0, -d] as Vec3, orbital: G1 }));
    const e = imageChargeEffect({ epsilonR: EPS_SI, layers: SI_VAC, sites });
    const qImage = -(1 - EPS_SI) / (1 + EPS_SI); // Jackson §4.4 q′ for q = 1
    const u0 = (COULOMB_EV_NM / EPS_SI) * selfEnergy(G1);
    depths.forEach((d, i) => {
      const du = ((COULOMB_EV_NM * qImage) / EPS_SI) * (erf(d) / (2 * d));
      expect(e.deltaU[i] / du - 1).toBeCloseTo(0, 12);
      expect(e.relativeU[i] / (du / u0) - 1).toBeCloseTo(0, 12);
    });
    expect(e.worstSite).toBe(1);
    // pair (0, 1): image distance √(4.3² + (12 + 6)²); Gaussian pair formula erf(R/2σ)/R
    const Rs = Math.hypot(4.3, 18);
    const dv = ((COULOMB_EV_NM * qImage) / EPS_SI) * (erf(Rs / 2) / Rs);
    expect(e.pairs[0]).toBe(0);
    expect(e.pairs[1]).toBe(1);
    expect(e.deltaV[0] / dv - 1).toBeCloseTo(0, 12);
    expect(e.relativeV[e.worstPair]).toBe(Math.max(...Array.from(e.relativeV)));
    expect(e.tailBoundEv).toBe(0); // one interface: no series to truncate
  });

  it('under an oxide and a metal plane: matches the Sommerfeld point reaction, and the metal lowers U', () => {
    const d = 10;
    const sites = [{ position: [0, 0, -d] as Vec3, orbital: G1 }];
    const withGate = imageChargeEffect({ epsilonR: EPS_SI, layers: SI_OX, electrodes: [TOP_PLANE], domain: DOMAIN, sites });
    expect(Array.from(withGate.stack!.epsilon)).toEqual([EPS_SI, EPS_OX, Infinity]);
    const point = sommerfeldG({ interfaces: [0, 5], epsilon: [EPS_SI, EPS_OX, Infinity] }, 0, -d, -d, 20, 0.125, true);
    // d = 10σ: the Gaussian's images equal point images to erfc(10) ≈ 2e-45
    // within the stated truncation bound at the default tolerance, and to 1e-9 at a tight one
    expect(Math.abs(withGate.deltaU[0] - COULOMB_EV_NM * point)).toBeLessThanOrEqual(withGate.tailBoundEv + 1e-12);
    expect(withGate.tailBoundEv).toBeGreaterThan(0);
    const tight = imageChargeEffect({ epsilonR: EPS_SI, layers: SI_OX, electrodes: [TOP_PLANE], domain: DOMAIN, sites }, { toleranceNm1: 1e-14 });
    expect(Math.abs(tight.deltaU[0] / (COULOMB_EV_NM * point) - 1)).toBeLessThan(1e-9);
    const oxideOnly = imageChargeEffect({ epsilonR: EPS_SI, layers: SI_OX, sites });
    expect(oxideOnly.deltaU[0]).toBeGreaterThan(0);
    expect(withGate.deltaU[0]).toBeLessThan(oxideOnly.deltaU[0]);
  });

  it('treats only electrodes spanning the domain as planes, and says what it left out', () => {
    const sites = [{ position: [0, 0, -10] as Vec3, orbital: G1 }];
    const smallGate: Electrode = { name: 'plunger', minNm: [-5, -5, 5], maxNm: [5, 5, 7], voltageV: 0.2 };
    const straddling: Electrode = { name: 'lead', minNm: [-40, -40, -12], maxNm: [40, 40, -8], voltageV: 0 };
    const e = imageChargeEffect({ epsilonR: EPS_SI, layers: SI_OX, electrodes: [smallGate, TOP_PLANE, straddling], domain: DOMAIN, sites });
    expect(e.findings).toContainEqual({ code: 'electrode-not-plane', index: 0 });
    expect(e.findings).toContainEqual({ code: 'electrode-straddles', index: 2 });
    expect(Array.from(e.stack!.epsilon)).toEqual([EPS_SI, EPS_OX, Infinity]);
    expect(imageChargeEffect({ epsilonR: EPS_SI, layers: SI_OX, electrodes: [TOP_PLANE], sites }).findings).toContainEqual({ code: 'no-domain' });
  });

  it('a back gate and a top gate around silicon and oxide have no closed form here: NaN and a code', () => {
    const back: Electrode = { name: 'back gate', minNm: [-40, -40, -40], maxNm: [40, 40, -30], voltageV: 0 };
    const e = imageChargeEffect({
      epsilonR: EPS_SI,
      layers: SI_OX,
      electrodes: [back, TOP_PLANE],
      domain: DOMAIN,
      sites: [{ position: [0, 0, -10], orbital: G1 }],
    });
    expect(e.findings).toContainEqual({ code: 'too-many-interfaces', value: 3, index: 0 });
    expect(Number.isNaN(e.deltaU[0])).toBe(true);
    expect(e.worstSite).toBe(-1);
  });

  it('a site in the oxide counts the change of its own εr against the silicon host', () => {
    const e = imageChargeEffect({ epsilonR: EPS_SI, layers: SI_OX, sites: [{ position: [0, 0, 40], orbital: G1 }] });
    // far from the interface U ≈ U_Si·ε_Si/ε_ox, so ΔU/U ≈ 11.7/3.9 − 1 = 2, plus a small image part
    expect(e.relativeU[0]).toBeCloseTo(2, 1);
    expect(e.relativeU[0]).not.toBe(2);
  });

  it('evaluates all pairs up to its limit and asks for a pair list above it', () => {
    const many = Array.from({ length: 257 }, (_, i) => ({ position: [4.3 * (i % 16), 4.3 * Math.floor(i / 16), -10] as Vec3, orbital: G1 }));
    const e = imageChargeEffect({ epsilonR: EPS_SI, layers: SI_VAC, sites: many });
    expect(e.findings).toContainEqual({ code: 'pairs-not-given', value: 257 });
    expect(e.pairs.length).toBe(0);
    const given = imageChargeEffect({ epsilonR: EPS_SI, layers: SI_VAC, sites: many, pairs: Uint32Array.of(0, 1, 5, 200) });
    expect(given.deltaV.length).toBe(2);
    expect(given.findings).toEqual([]);
  });
});
