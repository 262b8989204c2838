/**
 * One planar interface between two media: the image-charge coefficients.
 *
 *            medium 2  (ε₂)                  potential in medium 2:  q″ / (ε₂ |r − r₀|)
 *     ─────────────────────────── z = 0
 *            medium 1  (ε₁)       • q at r₀    potential in medium 1:  q / (ε₁ |r − r₀|) + q′ / (ε₁ |r − r₀*|)
 *
 * with r₀* the mirror point of r₀ and (Jackson, Classical Electrodynamics, 3rd ed., §4.4, eq. 4.45 — equation
 * number from memory — in his notation with the charge in ε₁):
 *
 *     q′ = −q (ε₂ − ε₁) / (ε₂ + ε₁)          q″ = 2 ε₂ q / (ε₂ + ε₁)
 *
 * Both follow from continuity of φ and of ε ∂φ/∂z at z = 0. As reflection and transmission
 * factors of the potential (charge ÷ ε of the medium it is seen in, times ε₁ of the source):
 *
 *     r₁₂ = q′/q = (ε₁ − ε₂)/(ε₁ + ε₂)        T₁₂ = (q″/ε₂)·(ε₁/q) = 2ε₁/(ε₁ + ε₂) = 1 + r₁₂
 *
 * A grounded conductor is the limit ε₂ → ∞: r = −1 (image −q, Jackson §2.1), T = 0.
 */

/** Reflection factor r₁₂ = (ε₁ − ε₂)/(ε₁ + ε₂) for a charge in ε₁; −1 when medium 2 is metal (ε₂ = ∞). */
export function reflection(eps1: number, eps2: number): number {
  if (eps2 === Infinity) return -1;
  return (eps1 - eps2) / (eps1 + eps2);
}

/** Transmission factor T₁₂ = 2ε₁/(ε₁ + ε₂) of the potential into medium 2; 0 into metal. */
export function transmission(eps1: number, eps2: number): number {
  if (eps2 === Infinity) return 0;
  return (2 * eps1) / (eps1 + eps2);
}

/**
 * Jackson's image and transmitted charges (§4.4) for a charge q in ε₁ facing ε₂:
 * `image` = q′ (seen in medium 1 at the mirror point, divided by ε₁),
 * `transmitted` = q″ (seen in medium 2 at the real point, divided by ε₂).
 */
export function interfaceCharges(eps1: number, eps2: number, q = 1): { image: number; transmitted: number } {
  // the limit ε₂ → ∞ of q″ is 2q, but q″/ε₂ (the potential inside the metal) is 0
  if (eps2 === Infinity) return { image: -q, transmitted: 2 * q };
  return { image: (-q * (eps2 - eps1)) / (eps2 + eps1), transmitted: (2 * eps2 * q) / (eps2 + eps1) };
}
