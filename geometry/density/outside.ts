/**
 * How much of a unit density lies beyond a radius, a plane or the faces of a box: the tails of
 * the two radial profiles the models are built from, and the box rules. The registry entries in
 * models.ts choose which rule applies; nothing here looks at a model's name.
 */
import type { Vec3 } from '../design/types';
import { erfc } from './erf';
import { gaussLegendre } from './quadrature';

const SQRT2 = Math.SQRT2;

/** Q(R) of a unit radial profile: the share beyond (stretched) radius R, R in units of the profile's own radius. */
export type ProfileTail = (R: number) => number;

/** e^{−2r} profile (the 1s envelopes, radius 1): Q = ∫_R^∞ 4r²e^{−2r} dr = e^{−2R}(1 + 2R + 2R²). */
export function expTail(R: number): number {
  return Math.exp(-2 * R) * (1 + 2 * R + 2 * R * R);
}

/** Gaussian profile (σ = 1): Q = erfc(R/√2) + √(2/π) R e^{−R²/2} (the χ distribution with 3 degrees of freedom). */
export function gaussTail(R: number): number {
  return erfc(R / SQRT2) + Math.sqrt(2 / Math.PI) * R * Math.exp(-(R * R) / 2);
}

/**
 * Fraction of the unit e^{−2|u|} density beyond one plane at (stretched) distance d:
 * the marginal along the normal is ½(1 + 2|z|)e^{−2|z|}, whose tail is ½(1 + d)e^{−2d}.
 */
export function halfSpaceTail1s(d: number): number {
  return 0.5 * (1 + d) * Math.exp(-2 * d);
}

/**
 * Exact fraction of a Gaussian outside an axis-aligned box: it factorises per axis,
 * inside = Π_k ½[erf((hi_k − c_k)/(σ√2)) − erf((lo_k − c_k)/(σ√2))].
 */
export function gaussianOutside(sigma: number, center: Vec3, boxCenter: Vec3, half: Vec3): number {
  let inside = 1;
  let outsideSum = 0; // for tiny outside fractions, 1 − Π(1 − ε_k) ≈ Σ ε_k loses nothing
  for (let k = 0; k < 3; k++) {
    const lo = (boxCenter[k] - half[k] - center[k]) / (sigma * SQRT2);
    const hi = (boxCenter[k] + half[k] - center[k]) / (sigma * SQRT2);
    // outside along this axis = ½[erfc(hi) + erfc(−lo)]
    const out = 0.5 * (erfc(hi) + erfc(-lo));
    outsideSum += out;
    inside *= 1 - out;
  }
  // below 1e-6 report Σ ε_k: an upper bound of 1 − Π(1 − ε_k) within Σ ε_k², and free of the
  // cancellation in 1 − inside
  return outsideSum < 1e-6 ? outsideSum : 1 - inside;
}

/** Faces whose whole tail is below this are left out of the face rule (absolute). */
const FACE_NEGLIGIBLE = 1e-14;
/** Faces whose whole tail is below this share of the nearest face's tail are left out. */
const FACE_RELATIVE = 1e-7;

/**
 * Fraction of the density outside the box by integrating over the box's own faces:
 *   outside = Σ_faces ∫_face Q(r(p)) · d / (4π r³) dA,
 * where d is the distance from the (stretched) centre to the face plane and r = |p − c|;
 * d/r³ dA is the solid angle the face element subtends, and the ray through p leaves the box
 * through p, so beyond it lies the tail Q(r). Integrating face by face keeps the integrand
 * smooth (no kinks where rays cross box edges). Each face is split at the foot of the
 * perpendicular and each quarter uses s = d·sinh(t) in both directions (the solid-angle
 * weight has width d), with an n×n Gauss–Legendre rule (n = 8 by default: ~1e-4 relative,
 * ample for a warning figure; faces whose whole tail is below 1e-7 of the nearest face's
 * tail, or below 1e-14, are skipped). Validated against the exact
 * factorised Gaussian result in the tests. Works in the stretched frame u = A⁻¹(x − c).
 */
export function faceRuleOutside(tail: ProfileTail, A: Vec3, center: Vec3, boxCenter: Vec3, half: Vec3, n: number): number {
  const lo: Vec3 = [0, 0, 0];
  const hi: Vec3 = [0, 0, 0];
  for (let k = 0; k < 3; k++) {
    lo[k] = (boxCenter[k] - half[k] - center[k]) / A[k];
    hi[k] = (boxCenter[k] + half[k] - center[k]) / A[k];
    if (lo[k] >= 0 || hi[k] <= 0) return Number.NaN; // centre not strictly inside: caller handles
  }
  const { nodes, weights } = gaussLegendre(n);
  // a face at distance d receives at most the tail beyond d: skip faces that cannot matter
  // next to the nearest one (their share is below FACE_RELATIVE of it)
  let nearest = Infinity;
  for (let axis = 0; axis < 3; axis++) nearest = Math.min(nearest, -lo[axis], hi[axis]);
  const skipBelow = Math.max(FACE_NEGLIGIBLE, FACE_RELATIVE * tail(nearest));
  let total = 0;
  for (let axis = 0; axis < 3; axis++) {
    const p = (axis + 1) % 3;
    const q = (axis + 2) % 3;
    for (const d of [-lo[axis], hi[axis]]) {
      if (tail(d) < skipBelow) continue;
      // quarters of the face around the foot point (0,0) in (p,q)
      for (const [pl, ql] of [
        [-lo[p], -lo[q]],
        [-lo[p], hi[q]],
        [hi[p], -lo[q]],
        [hi[p], hi[q]],
      ] as const) {
        const tp = Math.asinh(pl / d);
        const tq = Math.asinh(ql / d);
        let acc = 0;
        for (let i = 0; i < n; i++) {
          const ti = 0.5 * tp * (nodes[i] + 1);
          const si = d * Math.sinh(ti);
          const ji = d * Math.cosh(ti) * 0.5 * tp * weights[i];
          for (let j = 0; j < n; j++) {
            const tj = 0.5 * tq * (nodes[j] + 1);
            const sj = d * Math.sinh(tj);
            const jj = d * Math.cosh(tj) * 0.5 * tq * weights[j];
            const r = Math.sqrt(d * d + si * si + sj * sj);
            acc += ji * jj * tail(r) * (d / (4 * Math.PI * r * r * r));
          }
        }
        total += acc;
      }
    }
  }
  return total;
}

/** Relative accuracy at which the half-space sum is accepted in place of the face rule. */
const HALF_SPACE_ACCEPT = 1e-2;

/** scaled distances to the faces, lo in [0, 3), hi in [3, 6): reused, no arrays per call (the check calls this per site) */
const faceScratch = new Float64Array(6);

/**
 * Fraction of a 1s (e^{−2|u|}) envelope with stretch axes A = (across, across,
 * along) outside the axis-aligned box (boxCenter ± half). In the stretched frame the outside is the union of the six half-spaces
 * beyond the faces, so by inclusion–exclusion
 *   Σ_k T(d_k) − C ≤ outside ≤ Σ_k T(d_k),   T = halfSpaceTail1s,
 * where C is at most Σ over perpendicular face pairs of Q(√(d_i² + d_j²))/4: two half-spaces
 * meet only beyond the ball of that radius, inside one quadrant of the pair's plane, and the
 * density is symmetric under each axis reflection, so that quadrant holds a quarter of the
 * tail. Opposite faces never meet. When that C is below 1 % of the sum — every site not close
 * to an edge or corner — the closed-form sum is returned (an upper bound within 1 %). Otherwise
 * the face rule integrates it. A centre outside the box gives 1, a centre on a face 0.5 (the
 * check flags such sites separately).
 */
export function expOutsideBox(across: number, along: number, center: Vec3, boxCenter: Vec3, half: Vec3, n: number): number {
  // the stretch A = (across, across, along): radiusNm in x and y, radiusZNm (or radiusNm) along z
  const d = faceScratch;
  for (let k = 0; k < 3; k++) {
    const Ak = k === 2 ? along : across;
    d[k] = (center[k] - (boxCenter[k] - half[k])) / Ak;
    d[3 + k] = (boxCenter[k] + half[k] - center[k]) / Ak;
    if (d[k] < 0 || d[3 + k] < 0) return 1;
  }
  for (let k = 0; k < 3; k++) if (d[k] === 0 || d[3 + k] === 0) return 0.5;
  let sum = 0;
  for (let k = 0; k < 3; k++) sum += halfSpaceTail1s(d[k]) + halfSpaceTail1s(d[3 + k]);
  let corr = 0;
  // each pair of axes, the four corners (lo or hi on each), in the order lo·lo, lo·hi, hi·lo, hi·hi
  for (let p = 0; p < 3; p++)
    for (let q = p + 1; q < 3; q++)
      for (let u = 0; u < 2; u++) {
        const dp = d[3 * u + p];
        for (let v = 0; v < 2; v++) {
          const dq = d[3 * v + q];
          corr += 0.25 * expTail(Math.sqrt(dp * dp + dq * dq));
        }
      }
  if (corr <= HALF_SPACE_ACCEPT * sum) return sum;
  return Math.min(1, Math.max(0, faceRuleOutside(expTail, [across, across, along], center, boxCenter, half, n)));
}
