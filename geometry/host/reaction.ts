/**
 * U and V of spherical orbital densities in a planar stack, built from the image series.
 *
 * A mirror image of a spherically symmetric density is the same density at the mirror point, and
 * a translated copy is the same density moved; every image of images.ts is one or the other. So
 * for densities wholly inside their regions the layered interaction is a finite sum of two-centre
 * free-space interactions (density/index.ts `pairEnergy`, Newton's theorem beyond that):
 *
 *     V_ij = ∫∫ ρ_i(r) ρ_j(r′) G(r, r′) = (1/ε_s) Σ_k c_k · P_ij(√(s_ij² + h_k²))
 *
 * with P_ij the free-space (εr = 1) interaction of the two densities at centre distance R. The
 * on-site U is the same sum with i = j and s = 0; its image part (all k but the direct one) is
 * the reaction energy ΔU. For one interface at depth d (Jackson §4.4 image q′ at distance 2d):
 *
 *     Gaussian σ:       ΔU = (q′/ε₁) · erf(d/σ) / (2d)                 (P of two Gaussians at 2d)
 *     hydrogenic 1s a:  ΔU = (q′/ε₁) · [1 − e^{−2w}(1 + 11w/8 + 3w²/4 + w³/6)] / (2d),  w = 2d/a
 *
 * (in nm⁻¹; × COULOMB_EV_NM for eV). ΔU is the change of the on-site interaction between two
 * electrons in the orbital, the Hubbard U; the polarisation energy of a single charge is half the
 * self-image term (the ½ of a charge's energy in its own induced field; from memory) and is not what U means.
 *
 * The approximation. A Gaussian or a 1s density is never wholly inside its region: the fraction f
 * beyond the nearest interface (exact: ½ erfc(d/(σ√2)) for a Gaussian, ½(1 + d/a) e^{−2d/a} for
 * 1s, stretched for the anisotropic model) sees the other medium's Green's function, which the
 * image construction ignores. Its share f is reported as `leak` (a size, not a rigorous bound);
 * tests/geometry/host/reaction.test.ts compares ΔU with an independent Fourier-space reference that
 * includes the leaked part and finds the relative error below f: for a Gaussian at 2σ–5σ (e.g.
 * 8e-4 at 3σ, where f = 1.3e-3) and for a 1s density at 3a and 4a (4.4e-3 at 3a, f = 5.0e-3),
 * under an oxide or vacuum. Keep sites several σ or a from interfaces.
 */
import type { Orbital, Vec3 } from '../design/types';
import { chargeBeyondPlaneZ, pairEnergy, sameOrbital, selfEnergy } from '../density';
import { COULOMB_EV_NM } from '../units';
import { imageSeries, type ImageOptions, type ImageSeries } from './images';
import type { HostFinding, PlanarStack } from './types';

/** Above this leaked share a `density-leaks` finding is raised (common practice: 0.1 %). */
export const LEAK_NOTICE = 1e-3;

export interface DensitySite {
  position: Vec3;
  orbital: Orbital;
}

export interface LayeredEnergy {
  /** ∫∫ρρ′G over the whole stack, in eV (U for i = i, V for a pair); null when no series exists */
  energyEv: number | null;
  /** the same in the free space of the source's own region (1/ε_s × free interaction), eV */
  freeEv: number | null;
  /** energyEv − freeEv: the reaction (image) part, eV; for two regions it is the whole minus the free form in ε_s */
  reactionEv: number | null;
  /** εr of the first site's region (the source of the series); NaN when no series exists */
  sourceEpsilonR: number;
  /** truncation bound of the series (eV, rigorous for point images) */
  tailBoundEv: number;
  /** largest share of either density beyond its nearest interface (approximation size; not a bound) */
  leak: number;
  findings: HostFinding[];
}

/** Free-space interaction (εr = 1, nm⁻¹) of two unit densities whose centres are R apart; 1/R without a closed form. */
function interaction(o1: Orbital, o2: Orbital, R: number): { value: number; point: boolean } {
  const exact = pairEnergy(o1, o2, R);
  if (exact !== null) return { value: exact, point: false };
  return { value: 1 / R, point: true };
}

/**
 * Share of the density beyond the nearest interface of the stack (exact for one plane):
 * Gaussian ½ erfc(d/(σ√2)); 1s ½(1 + d/a)e^{−2d/a}, with a → the z radius for the anisotropic model
 * (the interfaces are normal to z): the registry's `beyondPlaneZ` (geometry/density/models.ts).
 */
export function leakBeyondInterfaces(stack: PlanarStack, site: DensitySite): number {
  let d = Infinity;
  for (let k = 0; k < stack.interfaces.length; k++) d = Math.min(d, Math.abs(site.position[2] - stack.interfaces[k]));
  if (d === Infinity) return 0;
  return chargeBeyondPlaneZ(site.orbital, d);
}

function sumOver(series: ImageSeries, o1: Orbital, o2: Orbital, s: number, skip: number): { value: number; point: boolean } {
  let sum = 0;
  let point = false;
  for (let k = series.count - 1; k >= 0; k--) {
    if (k === skip) continue;
    const h = series.height[k];
    const p = interaction(o1, o2, Math.sqrt(s * s + h * h));
    point ||= p.point;
    sum += series.coef[k] * p.value;
  }
  return { value: series.scale * sum, point };
}

/**
 * Image series by pair of heights, for callers that evaluate many pairs of one stack with the same
 * options (a planar array has one height, so one series serves every pair).
 */
export type SeriesCache = Map<string, ReturnType<typeof imageSeries>>;

function cachedSeries(stack: PlanarStack, z0: number, z: number, options: ImageOptions, cache?: SeriesCache): ReturnType<typeof imageSeries> {
  if (!cache) return imageSeries(stack, z0, z, options);
  const key = `${z0}|${z}`;
  let hit = cache.get(key);
  if (!hit) {
    hit = imageSeries(stack, z0, z, options);
    cache.set(key, hit);
  }
  return hit;
}

/**
 * U (i = j, pass the same site twice) or V of two sites in the stack, in eV, with the reaction
 * part against the free space of the source's region. For a pair in different regions the
 * "free" figure is the interaction in the first site's region alone, for comparison only.
 */
export function layeredEnergy(stack: PlanarStack, a: DensitySite, b: DensitySite, options: ImageOptions = {}, cache?: SeriesCache): LayeredEnergy {
  const { series, findings } = cachedSeries(stack, a.position[2], b.position[2], options, cache);
  const leak = Math.max(leakBeyondInterfaces(stack, a), leakBeyondInterfaces(stack, b));
  const out: HostFinding[] = [...findings];
  if (leak > LEAK_NOTICE) out.push({ code: 'density-leaks', value: leak });
  if (!series) return { energyEv: null, freeEv: null, reactionEv: null, sourceEpsilonR: Number.NaN, tailBoundEv: Infinity, leak, findings: out };
  const s = Math.hypot(b.position[0] - a.position[0], b.position[1] - a.position[1]);
  const R = Math.hypot(s, b.position[2] - a.position[2]);
  const same = a === b || (R === 0 && sameOrbital(a.orbital, b.orbital));
  const free = same
    ? { value: selfEnergy(a.orbital), point: false }
    : interaction(a.orbital, b.orbital, R);
  const images = sumOver(series, a.orbital, b.orbital, s, series.direct);
  if (images.point || free.point) out.push({ code: 'point-image' });
  const freeNm1 = series.scale * free.value;
  const whole = (series.direct >= 0 ? freeNm1 : 0) + images.value;
  return {
    energyEv: COULOMB_EV_NM * whole,
    freeEv: COULOMB_EV_NM * freeNm1,
    reactionEv: COULOMB_EV_NM * images.value - (series.direct >= 0 ? 0 : COULOMB_EV_NM * freeNm1),
    sourceEpsilonR: 1 / series.scale,
    tailBoundEv: COULOMB_EV_NM * series.tailBound,
    leak,
    findings: out,
  };
}
