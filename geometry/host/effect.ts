/**
 * The worst image-charge effect of a planar stack and metal planes on U and V, against an infinite
 * host of the design's εr (the figure `check` will report, issue 11): for every site
 * ΔU_i = U_i(stack) − U_i(infinite host), for every pair ΔV_ij likewise, and the largest of each
 * relative to the infinite-host value.
 *
 *     electrodes spanning the domain's x–y cross-section   → metal half-spaces (planes)
 *     other electrodes (gates, leads)                      → left out: they need the FEM
 *                                                            (finding `electrode-not-plane`)
 *
 * The figures come from reaction.ts (point images of spherical densities; exact for densities
 * wholly inside their layers, see `leak`) and carry the series' truncation bound.
 */
import type { Orbital, Vec3 } from '../design/types';
import { pairEnergy, selfEnergy } from '../density';
import { COULOMB_EV_NM } from '../units';
import type { ImageOptions } from './images';
import { layeredEnergy, type SeriesCache } from './reaction';
import { hostStack, type HostStackInput } from './planes';
import type { HostFinding, PlanarStack } from './types';

/** All pairs are evaluated up to this many sites when no pair list is given (common practice; 32,640 pairs). */
export const IMAGE_EFFECT_ALL_PAIRS_LIMIT = 256;

/** `epsilonR` is also the infinite reference host's εr; `domain` is needed to recognise metal planes. */
export interface ImageEffectInput extends HostStackInput {
  /** sites that carry a density */
  sites: readonly { position: Vec3; orbital: Orbital }[];
  /** pairs (i0, j0, i1, j1, …) to evaluate; default all pairs up to IMAGE_EFFECT_ALL_PAIRS_LIMIT sites */
  pairs?: Uint32Array;
}

export interface ImageEffect {
  /** the stack used (null when the layers are invalid) */
  stack: PlanarStack | null;
  /** ΔU per site (eV) and relative to the infinite host's U; NaN where no closed form applies */
  deltaU: Float64Array;
  relativeU: Float64Array;
  pairs: Uint32Array;
  deltaV: Float64Array;
  relativeV: Float64Array;
  /** index of the site / pair with the largest |relative| change, −1 when none */
  worstSite: number;
  worstPair: number;
  /** largest series truncation bound over all figures (eV) */
  tailBoundEv: number;
  /** largest share of a density beyond an interface (size of the point-image approximation) */
  maxLeak: number;
  findings: HostFinding[];
}

function allPairs(n: number): Uint32Array {
  const out = new Uint32Array(n * (n - 1));
  let p = 0;
  for (let i = 0; i < n; i++)
    for (let j = i + 1; j < n; j++) {
      out[p++] = i;
      out[p++] = j;
    }
  return out;
}

/**
 * Default series tolerance for this figure (nm⁻¹): 1.4e-9 eV on any U or V, far below anything
 * the relative change is read for (common practice); it keeps the slow plate series short.
 */
export const IMAGE_EFFECT_TOLERANCE_NM1 = 1e-9;

export function imageChargeEffect(input: ImageEffectInput, options: ImageOptions = {}): ImageEffect {
  const opts: ImageOptions = { toleranceNm1: IMAGE_EFFECT_TOLERANCE_NM1, ...options };
  const cache: SeriesCache = new Map();
  const sites = input.sites;
  const n = sites.length;
  const findings: HostFinding[] = [];
  const built = hostStack(input, Float64Array.from(sites, (s) => s.position[2]));
  findings.push(...built.findings);
  const stack = built.stack;
  let pairs = input.pairs ?? new Uint32Array(0);
  if (!input.pairs) {
    if (n <= IMAGE_EFFECT_ALL_PAIRS_LIMIT) pairs = allPairs(n);
    else findings.push({ code: 'pairs-not-given', value: n });
  }
  const np = pairs.length >> 1;
  const deltaU = new Float64Array(n).fill(Number.NaN);
  const relativeU = new Float64Array(n).fill(Number.NaN);
  const deltaV = new Float64Array(np).fill(Number.NaN);
  const relativeV = new Float64Array(np).fill(Number.NaN);
  let tail = 0;
  let leak = 0;
  let worstSite = -1;
  let worstPair = -1;
  const seen = new Set<string>();
  const note = (list: HostFinding[], index: number) => {
    for (const f of list) {
      // one finding per code and site is enough for the report; series-capped keeps its figure
      const key = `${f.code}:${index}`;
      if (seen.has(key)) continue;
      seen.add(key);
      findings.push({ ...f, index });
    }
  };
  if (stack) {
    const hostScale = COULOMB_EV_NM / input.epsilonR;
    for (let i = 0; i < n; i++) {
      const r = layeredEnergy(stack, sites[i], sites[i], opts, cache);
      note(r.findings, i);
      leak = Math.max(leak, r.leak);
      if (r.energyEv === null) continue;
      tail = Math.max(tail, r.tailBoundEv);
      const self = selfEnergy(sites[i].orbital);
      const u0 = hostScale * self;
      // split as (free in the site's own εr − free in the host) + reaction, so a site in a layer
      // of the host's εr gets exactly the reaction (no rounding residue of two equal free terms)
      deltaU[i] = (r.sourceEpsilonR === input.epsilonR ? 0 : COULOMB_EV_NM * self * (1 / r.sourceEpsilonR - 1 / input.epsilonR)) + r.reactionEv!;
      relativeU[i] = deltaU[i] / u0;
      if (worstSite < 0 || Math.abs(relativeU[i]) > Math.abs(relativeU[worstSite])) worstSite = i;
    }
    for (let p = 0; p < np; p++) {
      const i = pairs[2 * p];
      const j = pairs[2 * p + 1];
      const r = layeredEnergy(stack, sites[i], sites[j], opts, cache);
      note(
        r.findings.filter((f) => f.code !== 'density-leaks'),
        i,
      );
      if (r.energyEv === null) continue;
      tail = Math.max(tail, r.tailBoundEv);
      const a = sites[i].position;
      const b = sites[j].position;
      const R = Math.hypot(b[0] - a[0], b[1] - a[1], b[2] - a[2]);
      const free = pairEnergy(sites[i].orbital, sites[j].orbital, R) ?? 1 / R;
      const v0 = hostScale * free;
      deltaV[p] = (r.sourceEpsilonR === input.epsilonR ? 0 : COULOMB_EV_NM * free * (1 / r.sourceEpsilonR - 1 / input.epsilonR)) + r.reactionEv!;
      relativeV[p] = deltaV[p] / v0;
      if (worstPair < 0 || Math.abs(relativeV[p]) > Math.abs(relativeV[worstPair])) worstPair = p;
    }
  }
  return { stack, deltaU, relativeU, pairs, deltaV, relativeV, worstSite, worstPair, tailBoundEv: tail, maxLeak: leak, findings };
}
