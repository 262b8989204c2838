/**
 * Gate lever arms and site energies of a design whose electrodes are metal planes: the sites ×
 * electrodes matrix ∂E_i/∂V_g (meV/V) and E_i at the design's voltages, from the series-capacitor
 * potential of plates.ts. Exact for densities symmetric about their centre and wholly inside one
 * layer (φ is linear there, so ∫ρφ = φ(centre)); `density-leaks` says where a density reaches an
 * interface or a plate.
 *
 *     electrode              lever arm
 *     innermost plane above  sign·1000·w/W      sign = −1 for an electron, +1 for a hole
 *     innermost plane below  sign·1000·(1 − w/W)
 *     plane behind another   0 (screened by the inner plane)
 *     gate or lead (finite)  NaN: needs the FEM (`electrode-not-plane`)
 */
import type { Orbital, Vec3 } from '../design/types';
import { hostStack, type HostStackInput } from './planes';
import { plateProfile, topFraction, type Carrier } from './plates';
import { LEAK_NOTICE, leakBeyondInterfaces } from './reaction';
import type { HostFinding } from './types';

export interface LeverArmInput extends HostStackInput {
  sites: readonly { position: Vec3; orbital?: Orbital }[];
  /** carrier per site (default electron); an acceptor's bound hole is 'hole' */
  carriers?: readonly Carrier[];
}

export interface LeverArms {
  /** number of electrodes (columns) */
  electrodes: number;
  /** row-major sites × electrodes, meV/V; NaN where no closed form applies */
  meVPerV: Float64Array;
  /** energy of each site's carrier at the electrodes' voltages against all at 0 V (eV); NaN when any column is NaN */
  siteEnergiesEv: Float64Array;
  findings: HostFinding[];
}

export function planeLeverArms(input: LeverArmInput): LeverArms {
  const n = input.sites.length;
  const electrodes = input.electrodes ?? [];
  const m = electrodes.length;
  const meVPerV = new Float64Array(n * m).fill(Number.NaN);
  const siteEnergiesEv = new Float64Array(n).fill(Number.NaN);
  const { stack, planes, findings } = hostStack(input, Float64Array.from(input.sites, (s) => s.position[2]));
  if (!stack) return { electrodes: m, meVPerV, siteEnergiesEv, findings };
  const { profile, findings: plateFindings } = plateProfile(stack);
  findings.push(...plateFindings);
  if (!profile) return { electrodes: m, meVPerV, siteEnergiesEv, findings };
  // the innermost plane on each side is the one whose face bounds the dielectric stack
  let bottom = -1;
  let top = -1;
  for (const p of planes) {
    if (p.side === 'below' && p.zNm === profile.zBottomNm) bottom = p.electrode;
    if (p.side === 'above' && p.zNm === profile.zTopNm) top = p.electrode;
  }
  const isPlane = new Uint8Array(m);
  for (const p of planes) isPlane[p.electrode] = 1;
  for (let i = 0; i < n; i++) {
    const site = input.sites[i];
    const z = site.position[2];
    const sign = (input.carriers?.[i] ?? 'electron') === 'electron' ? -1 : 1;
    const f = topFraction(profile, z);
    let energy = 0;
    for (let g = 0; g < m; g++) {
      let arm: number;
      if (g === top) arm = sign * 1000 * f;
      else if (g === bottom) arm = sign * 1000 * (1 - f);
      else if (isPlane[g]) arm = 0;
      else arm = Number.NaN;
      meVPerV[i * m + g] = arm;
      energy += (arm / 1000) * electrodes[g].voltageV;
    }
    siteEnergiesEv[i] = energy;
    if (site.orbital) {
      const leak = leakBeyondInterfaces(stack, { position: site.position, orbital: site.orbital });
      if (leak > LEAK_NOTICE) findings.push({ code: 'density-leaks', index: i, value: leak });
    }
  }
  return { electrodes: m, meVPerV, siteEnergiesEv, findings };
}
