/**
 * The neglected far field of one orbital as a radial envelope.
 *
 * For a boundary condition B the Dirichlet data err, at a boundary point x, by
 *   n(x) = φ(x)                       grounded (the whole free-space potential is dropped)
 *   n(x) = φ(x) − Σ_{l ≤ L} Q_lm I_lm   multipole of order L about the site's own centre
 * (εr = 1, unit charge). envelope(d) bounds |n(x)| over every x at distance ≥ d from the
 * site centre, so the maximum over the domain boundary is at most envelope(d_min), d_min
 * being the distance from the site to the nearest face. Evaluated per site in O(1): this is
 * what makes the check fast enough for every pointer move.
 *
 * Spherical models (hydrogenic, gaussian): n is radial and decreasing, so the envelope is
 * exact (no sampling):
 *   grounded:    φ(d)                       (potential of a positive spherical density falls with r)
 *   multipole L: 1/d − φ(d), for every L     (all l ≥ 1 moments vanish about the centre, only
 *                hydrogenic (1/a + 1/d)e^{−2d/a}, gaussian erfc(d/σ√2)/d   the penetrating tail is left)
 * Anisotropic model: n is axially symmetric; we tabulate max over polar angle (33 directions
 * from the axis to the plane, enough for the slowly varying P_l; checked against 513
 * directions in the tests) of |n| on a logarithmic radius grid from 0.02 to 40 orbital
 * radii, with the exact ellipsoid potential; take suffix maxima so the envelope is
 * non-increasing and conservative between grid radii (the value of the next smaller grid
 * radius is used). Beyond 40 radii the penetrating tail is below e^{−80} and we use the series
 * Σ_{l > L, l even, l ≤ 14} |q_l| / d^{l+1} (|P_l| ≤ 1, so conservative in angle). One table per
 * distinct orbital and order, cached.
 */
import type { Boundary, Orbital } from '../design/types';
import { axialMoment, erfc, orbitalScale, potentialAt, radialPotential } from '../density';
import { legendreP } from '../density/quadrature';

export type Envelope = (d: number) => number;

const SQRT2 = Math.SQRT2;
const TABLE_R0 = 0.02;
const TABLE_R1 = 40;
const TABLE_N = 120;
const ANGLES = 33;
const SERIES_MAX_L = 14;

const cache = new Map<string, Envelope>();

/** Order of the expansion the boundary keeps (−1 for grounded: nothing kept). */
export function keptOrder(boundary: Boundary): number {
  return boundary.kind === 'grounded' ? -1 : boundary.order;
}

export function neglectedEnvelope(orbital: Orbital, boundary: Boundary): Envelope {
  const L = keptOrder(boundary);
  switch (orbital.model) {
    case 'hydrogenic-1s': {
      const a = orbital.radiusNm;
      if (L < 0) return (d) => radialPotential(orbital, Math.max(d, 0)) as number;
      return (d) => (d <= 0 ? Infinity : (1 / a + 1 / d) * Math.exp((-2 * d) / a));
    }
    case 'gaussian': {
      const s = orbital.sigmaNm;
      if (L < 0) return (d) => radialPotential(orbital, Math.max(d, 0)) as number;
      return (d) => (d <= 0 ? Infinity : erfc(d / (s * SQRT2)) / d);
    }
    case 'anisotropic-1s': {
      const key = `${orbital.radiusNm}|${orbital.radiusZNm}|${L}`;
      const hit = cache.get(key);
      if (hit) return hit;
      const env = anisotropicEnvelope(orbital, L);
      cache.set(key, env);
      return env;
    }
  }
}

/** |n| at distance r and polar angle with cosine mu, for the anisotropic model. */
export function anisotropicNeglected(orbital: Orbital, L: number, q: Float64Array, r: number, mu: number): number {
  const st = Math.sqrt(Math.max(0, 1 - mu * mu));
  let v = potentialAt(orbital, [0, 0, 0], r * st, 0, r * mu);
  for (let l = 0; l <= L; l += 2) v -= (q[l] * legendreP(l, mu)) / Math.pow(r, l + 1);
  return Math.abs(v);
}

function anisotropicEnvelope(orbital: Orbital, L: number): Envelope {
  const scale = orbitalScale(orbital);
  const q = new Float64Array(SERIES_MAX_L + 1);
  for (let l = 0; l <= SERIES_MAX_L; l += 2) q[l] = axialMoment(orbital, l);
  const r0 = TABLE_R0 * scale;
  const r1 = TABLE_R1 * scale;
  const step = Math.log(r1 / r0) / (TABLE_N - 1);
  const table = new Float64Array(TABLE_N);
  for (let k = 0; k < TABLE_N; k++) {
    const r = r0 * Math.exp(step * k);
    let worst = 0;
    for (let t = 0; t < ANGLES; t++) {
      const mu = Math.cos(((Math.PI / 2) * t) / (ANGLES - 1));
      worst = Math.max(worst, anisotropicNeglected(orbital, L, q, r, mu));
    }
    table[k] = worst;
  }
  const series = (d: number) => {
    let s = 0;
    for (let l = L + 1; l <= SERIES_MAX_L; l++) if (l % 2 === 0) s += Math.abs(q[l]) / Math.pow(d, l + 1);
    return s;
  };
  const atEnd = series(r1);
  const suffix = new Float64Array(TABLE_N);
  let run = atEnd;
  for (let k = TABLE_N - 1; k >= 0; k--) {
    run = Math.max(run, table[k]);
    suffix[k] = run;
  }
  return (d: number) => {
    if (!(d > 0)) return L < 0 ? suffix[0] : Infinity;
    if (d >= r1) return series(d);
    const k = Math.max(0, Math.floor(Math.log(d / r0) / step));
    // below r0 the grounded potential is at most its value at the centre region (suffix[0] covers
    // r ≥ r0); the truncated expansion diverges there, so a multipole bound is not available
    if (d < r0) return L < 0 ? Math.max(suffix[0], potentialAt(orbital, [0, 0, 0], 0, 0, 0)) : Infinity;
    return suffix[Math.min(k, TABLE_N - 1)];
  };
}

/**
 * Smallest clearance d (nm) with envelope(d) ≤ target, by bisection on log d (the envelope is
 * non-increasing). Infinity when even 10⁹ nm does not reach the target.
 */
export function clearanceFor(env: Envelope, target: number): number {
  if (!(target > 0)) return Infinity;
  let lo = 1e-6;
  let hi = 1e9;
  if (env(hi) > target) return Infinity;
  if (env(lo) <= target) return lo;
  for (let it = 0; it < 100 && hi / lo > 1 + 1e-10; it++) {
    const mid = Math.sqrt(lo * hi);
    if (env(mid) <= target) hi = mid;
    else lo = mid;
  }
  return hi;
}
