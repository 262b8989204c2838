/**
 * Two metal planes at set voltages with dielectric layers between them: the potential is
 * piecewise linear in z, and each site's energy moves linearly with each plate's voltage.
 *
 *     V_top  ═══════════════════ z_top      (metal)
 *              ε_m   E_m = σ/ε_m             σ = ε E is the same in every layer (continuity of the
 *     ───────────────────────── interface    normal D; no free charge between the plates), so
 *              ...                           the layers are capacitors in series (any
 *              ε_1   E_1 = σ/ε_1             introductory text, e.g. Jackson §4.4's boundary
 *     V_bot  ═══════════════════ z_bot      conditions with Gauss's law):
 *
 *     w(z) = Σ_{layers below z} t_k/ε_k + (z − z_k)/ε(z),    W = w(z_top)   ("electrical thickness", nm)
 *     φ(z) = V_bot + (V_top − V_bot) · w(z)/W
 *
 * A density symmetric about its centre and wholly inside one layer, where φ is linear, has
 * ∫ρφ = φ(centre) exactly; so an electron's energy is E = −e φ(centre) and its lever arm to the top
 * plate is ∂E/∂V_top = −w/W (eV/V; −1000 w/W meV/V, negative for an electron under a positive gate;
 * the sign flips for a hole). The capacitance per area is ε₀/W (W in m).
 */
import { VACUUM_PERMITTIVITY_F_M } from '../units';
import type { HostFinding, PlanarStack } from './types';

export type Carrier = 'electron' | 'hole';

export interface PlateProfile {
  /** heights of the lower and upper metal faces (nm) */
  zBottomNm: number;
  zTopNm: number;
  /** electrical thickness W = Σ t_k/ε_k (nm) */
  electricalThicknessNm: number;
  /** capacitance per area ε₀/W (F/m²) */
  capacitanceFPerM2: number;
  /** the dielectric regions between the plates, bottom to top: lower height and εr of each */
  layerZMinNm: Float64Array;
  layerEpsilon: Float64Array;
}

/**
 * The stack as a parallel-plate capacitor: it must start and end with metal (regions 0 and last)
 * and hold only dielectrics between; otherwise `not-between-plates`.
 */
export function plateProfile(stack: PlanarStack): { profile: PlateProfile | null; findings: HostFinding[] } {
  const eps = stack.epsilon;
  const m = eps.length;
  const bad = m < 3 || eps[0] !== Infinity || eps[m - 1] !== Infinity;
  for (let k = 1; !bad && k < m - 1; k++) if (!Number.isFinite(eps[k])) return { profile: null, findings: [{ code: 'not-between-plates', index: k }] };
  if (bad) return { profile: null, findings: [{ code: 'not-between-plates' }] };
  const layerZMinNm = stack.interfaces.slice(0, m - 2);
  const layerEpsilon = eps.slice(1, m - 1);
  let W = 0;
  for (let k = 0; k < layerEpsilon.length; k++) W += (stack.interfaces[k + 1] - stack.interfaces[k]) / layerEpsilon[k];
  return {
    profile: {
      zBottomNm: stack.interfaces[0],
      zTopNm: stack.interfaces[m - 2],
      electricalThicknessNm: W,
      capacitanceFPerM2: VACUUM_PERMITTIVITY_F_M / (W * 1e-9),
      layerZMinNm,
      layerEpsilon,
    },
    findings: [],
  };
}

/** w(z)/W: the share of the plate voltage difference dropped below height z (0 at the bottom plate, 1 at the top). */
export function topFraction(profile: PlateProfile, z: number): number {
  const zs = profile.layerZMinNm;
  let w = 0;
  for (let k = 0; k < zs.length; k++) {
    const hi = k + 1 < zs.length ? zs[k + 1] : profile.zTopNm;
    if (z <= zs[k]) break;
    w += (Math.min(z, hi) - zs[k]) / profile.layerEpsilon[k];
  }
  return w / profile.electricalThicknessNm;
}

/**
 * Lever arms of a carrier at height z to the bottom and top plates, meV/V:
 * electron −1000·(1 − w/W) and −1000·w/W; a hole has the opposite signs.
 */
export function plateLeverArms(profile: PlateProfile, z: number, carrier: Carrier = 'electron'): { bottomMeVPerV: number; topMeVPerV: number } {
  const f = topFraction(profile, z);
  const sign = carrier === 'electron' ? -1 : 1;
  return { bottomMeVPerV: sign * 1000 * (1 - f), topMeVPerV: sign * 1000 * f };
}

/** Energy (eV) of a carrier centred at z with the plates at vBottom and vTop volts, against all plates at 0 V. */
export function plateSiteEnergy(profile: PlateProfile, z: number, vBottom: number, vTop: number, carrier: Carrier = 'electron'): number {
  const phi = vBottom + (vTop - vBottom) * topFraction(profile, z);
  return carrier === 'electron' ? -phi : phi;
}
