/**
 * Multipole moments Q_lm = ∫ρ(x) R_lm(x − c) d³x (real solid harmonics, Racah normalisation,
 * see harmonics.ts) of the orbital densities, up to order 4, about any centre c.
 *
 * Spherical models (the registry's `spherical` entries, geometry/density): ρ is spherical about its centre p, and R_lm is harmonic, so by the mean
 * value property ∫ρ R_lm(x − c) = R_lm(p − c): exactly the point-charge moments.
 * Stretched models (the anisotropic envelope): ρ is a spherical e^{−2|u|} profile in u = A⁻¹(x − p), so
 *   ∫ρ P(x) d³x = E_U E_v [ P(p + U·A v) ],  v uniform on the unit sphere, U with density ∝ U² e^{−2U}.
 * For a polynomial P of degree ≤ 4: the 12 icosahedron vertices are a spherical 5-design
 * (Delsarte–Goethals–Seidel 1977; Hardin & Sloane's tables), so E_v is exact with them; for
 * each v, g(U) = P(p + U A v) is a quartic in U and E_U g = Σ_n g⁽ⁿ⁾(0)/n! ⟨Uⁿ⟩ with
 * ⟨Uⁿ⟩ = (n+2)!/2^{n+1}; the derivatives come exactly from the five samples U = −2…2
 * (central differences are exact for quartics). Hence 60 evaluations, exact to rounding.
 */
import type { Orbital, Vec3 } from '../design/types';
import { orbitalModel } from '../density';
import { harmonicCount, regularHarmonics } from './harmonics';

const PHI = (1 + Math.sqrt(5)) / 2;
const ICOSA: Vec3[] = (() => {
  const raw: Vec3[] = [];
  for (const s1 of [-1, 1])
    for (const s2 of [-1, 1]) {
      raw.push([0, s1, s2 * PHI]);
      raw.push([s1, s2 * PHI, 0]);
      raw.push([s2 * PHI, 0, s1]);
    }
  const n = Math.sqrt(1 + PHI * PHI);
  return raw.map((v) => [v[0] / n, v[1] / n, v[2] / n] as Vec3);
})();

/** Weights w_k on samples U = k − 2 (k = 0..4) with E_U[g] = Σ w_k g(k−2) for quartic g. */
const U_WEIGHTS = (() => {
  const mu = [1, 1.5, 3, 7.5, 22.5]; // ⟨Uⁿ⟩ = (n+2)!/2^{n+1}
  // coefficients c_n of g in terms of samples g(−2), g(−1), g(0), g(1), g(2)
  const c = [
    [0, 0, 1, 0, 0],
    [1 / 12, -8 / 12, 0, 8 / 12, -1 / 12],
    [-1 / 24, 16 / 24, -30 / 24, 16 / 24, -1 / 24],
    [-1 / 12, 2 / 12, 0, -2 / 12, 1 / 12],
    [1 / 24, -4 / 24, 6 / 24, -4 / 24, 1 / 24],
  ];
  const w = [0, 0, 0, 0, 0];
  for (let n = 0; n < 5; n++) for (let k = 0; k < 5; k++) w[k] += mu[n] * c[n][k];
  return w;
})();

/**
 * Moments Q_lm (l ≤ order ≤ 4) of the unit orbital density centred at `site`, about `center`.
 * Written into `out` (length ≥ (order+1)²) when given; returns it.
 */
export function orbitalMoments(orbital: Orbital, site: Vec3, center: Vec3, order: number, out?: Float64Array): Float64Array {
  const n = harmonicCount(order);
  const res = out ?? new Float64Array(n);
  const dx = site[0] - center[0], dy = site[1] - center[1], dz = site[2] - center[2];
  const model = orbitalModel(orbital);
  if (model.spherical) return regularHarmonics(dx, dy, dz, order, res);
  // U_WEIGHTS hold the radial moments of the e^{−2U} profile, the only stretched profile in the registry
  if (model.profile !== 'exp') throw new Error(`orbitalMoments: no radial weights for the ${model.profile} profile`);
  const A = model.axes(orbital);
  const tmp = new Float64Array(n);
  res.fill(0, 0, n);
  for (const v of ICOSA) {
    for (let k = 0; k < 5; k++) {
      const U = k - 2;
      regularHarmonics(dx + U * A[0] * v[0], dy + U * A[1] * v[1], dz + U * A[2] * v[2], order, tmp);
      const w = U_WEIGHTS[k] / ICOSA.length;
      for (let i = 0; i < n; i++) res[i] += w * tmp[i];
    }
  }
  return res;
}

/**
 * Moments of a weighted sum of orbital densities (e.g. an array with weights = electrons)
 * about `center`, up to `order`.
 */
export function combinedMoments(
  items: readonly { orbital: Orbital; position: Vec3; weight: number }[],
  center: Vec3,
  order: number,
): Float64Array {
  const n = harmonicCount(order);
  const total = new Float64Array(n);
  const one = new Float64Array(n);
  for (const it of items) {
    if (it.weight === 0) continue;
    orbitalMoments(it.orbital, it.position, center, order, one);
    for (let i = 0; i < n; i++) total[i] += it.weight * one[i];
  }
  return total;
}
