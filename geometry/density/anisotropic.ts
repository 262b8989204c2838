/**
 * Closed forms of the anisotropic (single-valley) 1s envelope ρ = exp(−2m)/(π a² b),
 * m² = (x²+y²)/a² + z²/b², that need more than one line: its potential, its self-energy and its
 * axial multipole moments. The registry entry in models.ts calls these.
 */
import { gaussLegendre, legendreP } from './quadrature';

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

export function anisotropicPotential(a: number, b: number, dx: number, dy: number, dz: number): number {
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

/**
 * ∫₀¹ dμ / (1 + (κ² − 1) μ²): the angular factor by which stretching a spherical density
 * along z changes its Coulomb self-energy. From U = (1/2π²)∫|ρ̂(k)|²/k² d³k with
 * ρ̂_stretched(k) = ρ̂(|Ak|): U_aniso = U_sphere(unit radius) · G(a/b) / b.
 */
export function stretchFactor(kappa: number): number {
  const d = kappa * kappa - 1;
  if (Math.abs(d) < 1e-8) return 1 - d / 3;
  if (d > 0) return Math.atan(Math.sqrt(d)) / Math.sqrt(d);
  const e = Math.sqrt(-d);
  return Math.atanh(e) / e;
}

/**
 * Axial multipole moment q_l = ∫ρ r^l P_l(cosθ) about the envelope's own centre (z axis), l ≥ 1.
 * With u = A⁻¹x: q_l = ⟨|u|^l⟩ · ½∫₋₁¹ g_l(μ) dμ, where g_l(μ) = (a²(1−μ²) + b²μ²)^{l/2}
 * P_l(bμ / √(a²(1−μ²)+b²μ²)) is a polynomial of degree l in μ (so a Gauss rule with
 * > l/2 nodes is exact) and ⟨|u|^l⟩ = (l+2)!/2^{l+1} for the profile e^{−2|u|}.
 * Odd l vanish by symmetry. By axial symmetry these are the only non-zero real
 * solid-harmonic moments (m = 0) with Racah normalisation.
 */
export function anisotropicAxialMoment(a: number, b: number, l: number): number {
  if (l === 0) return 1;
  if (l % 2 === 1) return 0;
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
