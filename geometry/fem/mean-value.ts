/**
 * The mean-value rule: when ∫ρ_j φ may be read as φ(p_j).
 *
 * Mean-value property of harmonic functions (Gauss; e.g. O. D. Kellogg, Foundations of Potential
 * Theory, 1929, ch. 6 — from memory): if φ is harmonic in the ball B(p, d), its average over every
 * sphere |x − p| = r < d is φ(p). A spherically symmetric unit density ρ_j about p_j therefore sees
 *
 *     ∫ρ_j φ = φ(p_j) + ∫_{|x−p_j|>d} ρ_j (S(r) − φ(p_j)),   S(r) the sphere average of φ,
 *
 * i.e. exactly φ(p_j) up to the charge of ρ_j beyond d (the registry's `profileTail`)
 * times the oscillation of φ there. We use it where
 *  - the orbital model is spherical with a closed form (`hasClosedForm`: hydrogenic 1s, Gaussian),
 *  - d_j is the distance from p_j to the nearest layer interface inside the domain, electrode box or
 *    domain wall (inside that ball the medium is one layer and no Dirichlet value is imposed), and
 *  - the charge beyond d_j is at most MEAN_VALUE_TAIL_FRACTION × the design's targetRelError.
 * φ is harmonic in that ball for
 *  - the lever arms' φ_g (Laplace in each homogeneous layer away from metal; lever.ts), where
 *    0 ≤ φ_g ≤ 1 (maximum principle) makes the neglected term at most the tail charge in V/V, and
 *  - the split's remainder φ_r,i (split.ts) wherever ε = ε_i (site i's own layer), including ρ_i's
 *    own support; so site j's layer must have the permittivity of site i's.
 * Elsewhere the callers keep the density loads (load.ts).
 *
 * Point values of a finite-element solution converge at h^{p+1} (pointwise L∞ error of P_p
 * elements on smooth solutions; e.g. Ciarlet, The Finite Element Method for Elliptic Problems,
 * 1978 — from memory), slower than the h^{2p} of the ∫ρφ functional: POINT_VALUE_RATE gives the
 * theoretical rate the error bars use for numbers read at centres.
 */
import type { Design, Orbital, Vec3 } from '../design/types';
import { orbitalModel, profileRadius } from '../density';
import { clippedElectrodes, interfacesInside } from '../mesh/device';
import { hasClosedForm } from './split';

/** The tail beyond the harmonic ball may be at most this fraction of the target (common practice: well under it). */
export const MEAN_VALUE_TAIL_FRACTION = 0.1;

/** Theoretical rate (in h) of a point value of P_p elements: p + 1 (header; Ciarlet 1978, from memory). */
export function pointValueRate(order: 1 | 2): number {
  return order + 1;
}

/**
 * Radius of the largest ball about p that lies inside the domain, on one side of every interface
 * inside the domain, and outside every (clipped) electrode box (nm).
 */
export function harmonicBallRadius(design: Design, p: Vec3): number {
  const c = design.domain.center, h = design.domain.halfExtentsNm;
  let d = Infinity;
  for (let a = 0; a < 3; a++) d = Math.min(d, h[a] - Math.abs(p[a] - c[a]));
  for (const z of interfacesInside(design)) d = Math.min(d, Math.abs(p[2] - z));
  for (const e of clippedElectrodes(design)) {
    let q = 0;
    for (let a = 0; a < 3; a++) {
      const t = p[a] < e.min[a] ? e.min[a] - p[a] : p[a] > e.max[a] ? p[a] - e.max[a] : 0;
      q += t * t;
    }
    d = Math.min(d, Math.sqrt(q));
  }
  return Math.max(0, d);
}

export interface MeanValueSites {
  /** harmonic ball radius per site (nm) */
  radius: Float64Array;
  /** charge of the site's unit density beyond that radius */
  tail: Float64Array;
  /** 1 where the centre value may replace the density integral (header) */
  ok: Uint8Array;
}

/** The mean-value rule (header) for each site; `tolerance` = the largest tail allowed. */
export function meanValueSites(design: Design, sites: readonly { orbital: Orbital; position: Vec3 }[], tolerance = MEAN_VALUE_TAIL_FRACTION * design.refinement.targetRelError): MeanValueSites {
  const n = sites.length;
  const radius = new Float64Array(n);
  const tail = new Float64Array(n);
  const ok = new Uint8Array(n);
  sites.forEach((s, k) => {
    radius[k] = harmonicBallRadius(design, s.position);
    if (!hasClosedForm(s.orbital) || !(radius[k] > 0)) {
      tail[k] = 1;
      return;
    }
    // the registry's tail: the share of the unit charge beyond the radius (exact for spherical models)
    tail[k] = orbitalModel(s.orbital).profileTail(radius[k] / profileRadius(s.orbital));
    ok[k] = tail[k] <= tolerance ? 1 : 0;
  });
  return { radius, tail, ok };
}
