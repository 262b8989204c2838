/**
 * Analytic orbital densities of the design document, each normalised to one electron.
 *
 *   hydrogenic-1s   ρ = exp(−2r/a) / (π a³)                         a = radiusNm
 *   anisotropic-1s  ρ = exp(−2m) / (π a² b),  m² = (x²+y²)/a² + z²/b²   a = radiusNm, b = radiusZNm
 *   gaussian        ρ = exp(−r²/2σ²) / ((2π)^{3/2} σ³)             σ = sigmaNm
 *
 * Every density here is a spherical profile f(|u|) of the stretched coordinate
 * u = A⁻¹(x − c), A = diag(a, a, b) (A = a·I or σ·I for the spherical models). Most
 * closed forms below follow from that single fact.
 *
 * Potentials are for εr = 1 and a unit charge, in nm⁻¹, in the convention of
 * geometry/units.ts (−∇·(εr∇φ) = 4πρ, so a point charge has φ = 1/r). Divide by εr and
 * multiply by COULOMB_EV_NM for eV.
 *
 * Public API (used by the finite-element load and by the far-field check):
 *   densityAt, densityBatch, potentialAt, radialPotential, selfEnergy, pairEnergy,
 *   axialMoment, chargeOutsideBox, orbitalScale
 */
import type { Orbital, Vec3 } from '../design/types';
import { erf, erfc } from './erf';
import { gaussLegendre, legendreP } from './quadrature';

export { erf, erfc } from './erf';
export { gaussLegendre, legendreP } from './quadrature';

const INV_PI = 1 / Math.PI;
const GAUSS_NORM = 1 / Math.pow(2 * Math.PI, 1.5);
const SQRT_PI = Math.sqrt(Math.PI);
const SQRT2 = Math.SQRT2;

/** Electron density (nm⁻³) of a unit-normalised orbital centred at `center`, at (x, y, z). */
export function densityAt(orbital: Orbital, center: Vec3, x: number, y: number, z: number): number {
  const dx = x - center[0];
  const dy = y - center[1];
  const dz = z - center[2];
  switch (orbital.model) {
    case 'hydrogenic-1s': {
      const a = orbital.radiusNm;
      return (Math.exp((-2 * Math.sqrt(dx * dx + dy * dy + dz * dz)) / a) * INV_PI) / (a * a * a);
    }
    case 'anisotropic-1s': {
      const a = orbital.radiusNm;
      const b = orbital.radiusZNm;
      const m = Math.sqrt((dx * dx + dy * dy) / (a * a) + (dz * dz) / (b * b));
      return (Math.exp(-2 * m) * INV_PI) / (a * a * b);
    }
    case 'gaussian': {
      const s = orbital.sigmaNm;
      return (Math.exp(-(dx * dx + dy * dy + dz * dz) / (2 * s * s)) * GAUSS_NORM) / (s * s * s);
    }
  }
}

/**
 * Batch form: `points` holds 3n coordinates (x0,y0,z0,x1,…); writes n densities into `out`
 * (allocated when omitted) and returns it. Same values as densityAt, bit for bit.
 */
export function densityBatch(orbital: Orbital, center: Vec3, points: Float64Array, out?: Float64Array): Float64Array {
  const n = Math.floor(points.length / 3);
  const res = out ?? new Float64Array(n);
  if (res.length < n) throw new RangeError(`densityBatch: output holds ${res.length} values, need ${n}`);
  for (let i = 0; i < n; i++) res[i] = densityAt(orbital, center, points[3 * i], points[3 * i + 1], points[3 * i + 2]);
  return res;
}

/**
 * Exact free-space potential of a spherical model at distance r (εr = 1, unit charge, nm⁻¹),
 * or null for the anisotropic model (use potentialAt).
 *   hydrogenic: φ = 1/r − (1/a + 1/r) e^{−2r/a}   (textbook 1s potential)
 *   gaussian:   φ = erf(r / (σ√2)) / r
 */
export function radialPotential(orbital: Orbital, r: number): number | null {
  switch (orbital.model) {
    case 'hydrogenic-1s': {
      const a = orbital.radiusNm;
      const t = (2 * r) / a;
      if (t < 1e-2) {
        // series of 1 − (1 + t/2)e^{−t} = Σ_{n≥1} (−1)^{n+1}(2 − n) tⁿ / (2·n!) to dodge cancellation
        let sum = 0;
        let fact = 1;
        let pw = 1; // t^{n-1}
        for (let n = 1; n <= 8; n++) {
          fact *= n;
          sum += (((n % 2 === 1 ? 1 : -1) * (2 - n)) / (2 * fact)) * pw;
          pw *= t;
        }
        return (2 / a) * sum;
      }
      return (-Math.expm1(-t) - (t / 2) * Math.exp(-t)) / r;
    }
    case 'gaussian': {
      const s = orbital.sigmaNm;
      const w = r / (s * SQRT2);
      if (w < 1e-4) return (2 / (SQRT_PI * s * SQRT2)) * (1 - (w * w) / 3);
      return erf(w) / r;
    }
    case 'anisotropic-1s':
      return null;
  }
}

/**
 * The potential of the anisotropic density from the classic formula for an
 * ellipsoidally stratified body (Binney & Tremaine, Galactic Dynamics, Thm 2.10 / eq. 2.140):
 *   φ(x) = π a² b ∫₀^∞ [ψ(∞) − ψ(m²(u))] / Δ(u) du,  Δ = (a²+u)√(b²+u),
 *   m²(u) = (x²+y²)/(a²+u) + z²/(b²+u),  ψ(m²) = ∫₀^{m²} ρ(s) ds.
 * For ρ = e^{−2m}/(πa²b): ψ(∞) − ψ(m²) = e^{−2m}(1+2m)/(2πa²b), so
 *   φ(x) = ½ ∫₀^∞ e^{−2m}(1 + 2m) / ((a²+u)√(b²+u)) du.
 * Substituting u = w²(1/s² − 1), w² = max(a²,b²) + |x|², maps [0,∞) to s ∈ (0,1] with a
 * smooth integrand (it tends to a constant as s → 0) whose variation scale is O(1) in s
 * wherever x is; 4 panels × 24 Gauss–Legendre nodes give ≤ ~1e-12 relative (checked against the
 * hydrogenic closed form at a = b in the tests).
 */
const PANELS = [0, 0.5, 0.8, 0.95, 1];

function anisotropicPotential(a: number, b: number, dx: number, dy: number, dz: number): number {
  const rho2 = dx * dx + dy * dy;
  const z2 = dz * dz;
  const w2 = Math.max(a * a, b * b) + rho2 + z2;
  const { nodes, weights } = gaussLegendre(24);
  let sum = 0;
  // panels in s, finer towards s = 1 where e^{−2m} switches off
  for (let panel = 0; panel < PANELS.length - 1; panel++) {
    const lo = PANELS[panel];
    const half = 0.5 * (PANELS[panel + 1] - lo);
    for (let k = 0; k < nodes.length; k++) {
      const s = lo + half * (nodes[k] + 1);
      const s2 = s * s;
      const u = w2 * (1 / s2 - 1);
      const au = a * a + u;
      const bu = b * b + u;
      const m = Math.sqrt(rho2 / au + z2 / bu);
      const f = Math.exp(-2 * m) * (1 + 2 * m);
      const dudS = (2 * w2) / (s2 * s);
      sum += half * weights[k] * (f * dudS) / (au * Math.sqrt(bu));
    }
  }
  return 0.5 * sum;
}

/** Exact free-space potential (εr = 1, unit charge, nm⁻¹) of the orbital centred at `center`. */
export function potentialAt(orbital: Orbital, center: Vec3, x: number, y: number, z: number): number {
  const dx = x - center[0];
  const dy = y - center[1];
  const dz = z - center[2];
  if (orbital.model === 'anisotropic-1s') return anisotropicPotential(orbital.radiusNm, orbital.radiusZNm, dx, dy, dz);
  return radialPotential(orbital, Math.sqrt(dx * dx + dy * dy + dz * dz)) as number;
}

/**
 * ∫₀¹ dμ / (1 + (κ² − 1) μ²): the angular factor by which stretching a spherical density
 * along z changes its Coulomb self-energy. From U = (1/2π²)∫|ρ̂(k)|²/k² d³k with
 * ρ̂_stretched(k) = ρ̂(|Ak|): U_aniso = U_sphere(unit radius) · G(a/b) / b.
 */
function stretchFactor(kappa: number): number {
  const d = kappa * kappa - 1;
  if (Math.abs(d) < 1e-8) return 1 - d / 3;
  if (d > 0) return Math.atan(Math.sqrt(d)) / Math.sqrt(d);
  const e = Math.sqrt(-d);
  return Math.atanh(e) / e;
}

/**
 * Self-repulsion ∫∫ρρ'/|x−x'| of the unit density (εr = 1, nm⁻¹); U[eV] = COULOMB_EV_NM·selfEnergy/εr.
 *   hydrogenic: 5/(8a)   (the first-order helium integral, 5/8 Hartree at a = a₀)
 *   gaussian:   1/(σ√π)  (standard Gaussian charge result)
 *   anisotropic: (5/8)·G(a/b)/b (stretch of the hydrogenic result, see stretchFactor)
 */
export function selfEnergy(orbital: Orbital): number {
  switch (orbital.model) {
    case 'hydrogenic-1s':
      return 5 / (8 * orbital.radiusNm);
    case 'gaussian':
      return 1 / (orbital.sigmaNm * SQRT_PI);
    case 'anisotropic-1s':
      return ((5 / 8) * stretchFactor(orbital.radiusNm / orbital.radiusZNm)) / orbital.radiusZNm;
  }
}

/**
 * Interaction ∫∫ρ₁ρ₂/|x−x'| (εr = 1, nm⁻¹) of two unit densities whose centres are R apart,
 * where a closed form exists; otherwise null (callers then use the point-charge 1/R).
 *   two gaussians: erf(R / √(2(σ₁²+σ₂²))) / R   (convolution of Gaussians is Gaussian)
 *   a gaussian or a hydrogenic with a spherical partner of any kind when the partner is a
 *   gaussian: handled by the first rule only; two hydrogenic of equal radius a (w = R/a):
 *   [1 − e^{−2w}(1 + 11w/8 + 3w²/4 + w³/6)] / R   (the 1s–1s Coulomb integral of the
 *   hydrogen molecule, e.g. Slater, Quantum Theory of Molecules and Solids vol. 1; from memory,
 *   checked numerically in the tests).
 */
export function pairEnergy(o1: Orbital, o2: Orbital, R: number): number | null {
  if (o1.model === 'gaussian' && o2.model === 'gaussian') {
    const s = Math.sqrt(o1.sigmaNm * o1.sigmaNm + o2.sigmaNm * o2.sigmaNm);
    if (R < 1e-9 * s) return SQRT2 / (s * SQRT_PI);
    return erf(R / (s * SQRT2)) / R;
  }
  if (o1.model === 'hydrogenic-1s' && o2.model === 'hydrogenic-1s' && o1.radiusNm === o2.radiusNm) {
    const a = o1.radiusNm;
    const w = R / a;
    if (w < 1e-3) return 5 / (8 * a);
    return (1 - Math.exp(-2 * w) * (1 + (11 * w) / 8 + (3 * w * w) / 4 + (w * w * w) / 6)) / R;
  }
  return null;
}

/**
 * Axial multipole moment q_l = ∫ρ r^l P_l(cosθ) about the orbital's own centre (z axis).
 * The spherical models have q_0 = 1 and nothing else. For the anisotropic model,
 * with u = A⁻¹x: q_l = ⟨|u|^l⟩ · ½∫₋₁¹ g_l(μ) dμ, where g_l(μ) = (a²(1−μ²) + b²μ²)^{l/2}
 * P_l(bμ / √(a²(1−μ²)+b²μ²)) is a polynomial of degree l in μ (so a Gauss rule with
 * > l/2 nodes is exact) and ⟨|u|^l⟩ = (l+2)!/2^{l+1} for the profile e^{−2|u|}.
 * Odd l vanish by symmetry. By axial symmetry these are the only non-zero real
 * solid-harmonic moments (m = 0) with Racah normalisation.
 */
export function axialMoment(orbital: Orbital, l: number): number {
  if (l === 0) return 1;
  if (orbital.model !== 'anisotropic-1s' || l % 2 === 1) return 0;
  const a = orbital.radiusNm;
  const b = orbital.radiusZNm;
  let radial = 1;
  for (let k = 2; k <= l + 2; k++) radial *= k;
  radial /= Math.pow(2, l + 1);
  const { nodes, weights } = gaussLegendre(l + 2);
  let ang = 0;
  for (let k = 0; k < nodes.length; k++) {
    const mu = nodes[k];
    const s2 = a * a * (1 - mu * mu) + b * b * mu * mu;
    const s = Math.sqrt(s2);
    ang += weights[k] * Math.pow(s, l) * legendreP(l, (b * mu) / s);
  }
  return radial * 0.5 * ang;
}

/** Length scale of the orbital: the largest of its radii (a, b or σ), for grading and tolerances. */
export function orbitalScale(orbital: Orbital): number {
  switch (orbital.model) {
    case 'hydrogenic-1s':
      return orbital.radiusNm;
    case 'anisotropic-1s':
      return Math.max(orbital.radiusNm, orbital.radiusZNm);
    case 'gaussian':
      return orbital.sigmaNm;
  }
}

/**
 * Fraction of the (stretched-spherical) density beyond stretched radius R, in units of the
 * orbital's own radius: Q(R) = ∫_R^∞ f(r) 4πr² dr.
 *   e^{−2r} profile:   Q = e^{−2R}(1 + 2R + 2R²)
 *   Gaussian (σ = 1):  Q = erfc(R/√2) + √(2/π) R e^{−R²/2}
 */
export function radialTail(model: Orbital['model'], R: number): number {
  if (model === 'gaussian') return erfc(R / SQRT2) + Math.sqrt(2 / Math.PI) * R * Math.exp(-(R * R) / 2);
  return Math.exp(-2 * R) * (1 + 2 * R + 2 * R * R);
}

function stretch(orbital: Orbital): Vec3 {
  switch (orbital.model) {
    case 'hydrogenic-1s':
      return [orbital.radiusNm, orbital.radiusNm, orbital.radiusNm];
    case 'anisotropic-1s':
      return [orbital.radiusNm, orbital.radiusNm, orbital.radiusZNm];
    case 'gaussian':
      return [orbital.sigmaNm, orbital.sigmaNm, orbital.sigmaNm];
  }
}

/**
 * Exact fraction of a Gaussian outside an axis-aligned box: it factorises per axis,
 * inside = Π_k ½[erf((hi_k − c_k)/(σ√2)) − erf((lo_k − c_k)/(σ√2))].
 */
function gaussianOutside(sigma: number, center: Vec3, boxCenter: Vec3, half: Vec3): number {
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
function faceRuleOutside(model: Orbital['model'], A: Vec3, center: Vec3, boxCenter: Vec3, half: Vec3, n: number): number {
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
  const skipBelow = Math.max(FACE_NEGLIGIBLE, FACE_RELATIVE * radialTail(model, nearest));
  let total = 0;
  for (let axis = 0; axis < 3; axis++) {
    const p = (axis + 1) % 3;
    const q = (axis + 2) % 3;
    for (const d of [-lo[axis], hi[axis]]) {
      if (radialTail(model, d) < skipBelow) continue;
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
            acc += ji * jj * radialTail(model, r) * (d / (4 * Math.PI * r * r * r));
          }
        }
        total += acc;
      }
    }
  }
  return total;
}

/**
 * Fraction of the unit e^{−2|u|} density beyond one plane at (stretched) distance d:
 * the marginal along the normal is ½(1 + 2|z|)e^{−2|z|}, whose tail is ½(1 + d)e^{−2d}.
 */
export function halfSpaceTail1s(d: number): number {
  return 0.5 * (1 + d) * Math.exp(-2 * d);
}

/** Relative accuracy at which the half-space sum is accepted in place of the face rule. */
const HALF_SPACE_ACCEPT = 1e-2;

/**
 * Fraction of the orbital's unit charge lying outside the axis-aligned box (boxCenter ± half).
 * Gaussian: exact (erf per axis). 1s models, in the stretched frame: the outside is the union of
 * the six half-spaces beyond the faces, so by inclusion–exclusion
 *   Σ_k T(d_k) − C ≤ outside ≤ Σ_k T(d_k),   T = halfSpaceTail1s,
 * where C is at most Σ over perpendicular face pairs of Q(√(d_i² + d_j²))/4: two half-spaces
 * meet only beyond the ball of that radius, inside one quadrant of the pair's plane, and the
 * density is symmetric under each axis reflection, so that quadrant holds a quarter of the
 * tail. Opposite faces never meet. When that C is below 1 % of the sum — every site not close
 * to an edge or corner — the closed-form sum is returned (an upper bound within 1 %). Otherwise the face rule integrates it. A centre outside the box gives 1,
 * a centre on a face 0.5 (the check flags such sites separately).
 */
export function chargeOutsideBox(orbital: Orbital, center: Vec3, boxCenter: Vec3, half: Vec3, n = 8): number {
  if (orbital.model === 'gaussian') return gaussianOutside(orbital.sigmaNm, center, boxCenter, half);
  const A = stretch(orbital);
  const lo = [0, 0, 0];
  const hi = [0, 0, 0];
  for (let k = 0; k < 3; k++) {
    lo[k] = (center[k] - (boxCenter[k] - half[k])) / A[k];
    hi[k] = (boxCenter[k] + half[k] - center[k]) / A[k];
    if (lo[k] < 0 || hi[k] < 0) return 1;
  }
  for (let k = 0; k < 3; k++) if (lo[k] === 0 || hi[k] === 0) return 0.5;
  let sum = 0;
  for (let k = 0; k < 3; k++) sum += halfSpaceTail1s(lo[k]) + halfSpaceTail1s(hi[k]);
  let corr = 0;
  for (let p = 0; p < 3; p++)
    for (let q = p + 1; q < 3; q++)
      for (const dp of [lo[p], hi[p]]) for (const dq of [lo[q], hi[q]]) corr += 0.25 * radialTail(orbital.model, Math.sqrt(dp * dp + dq * dq));
  if (corr <= HALF_SPACE_ACCEPT * sum) return sum;
  return Math.min(1, Math.max(0, faceRuleOutside(orbital.model, A, center, boxCenter, half, n)));
}

/** Same face rule exposed for validation against the exact Gaussian (tests only). */
export function chargeOutsideBoxByFaces(orbital: Orbital, center: Vec3, boxCenter: Vec3, half: Vec3, n = 12): number {
  return faceRuleOutside(orbital.model, stretch(orbital), center, boxCenter, half, n);
}
