/**
 * Test-only reference: the exact reaction energy ΔU of an axially symmetric density near one planar
 * interface (z = 0), including the part of the density that lies across it, by our own quadrature
 * of the Fourier–Bessel form (stated as such):
 *
 *     ΔU = ∫₀^∞ dk ∫∫ ρ̃(k, z) ρ̃(k, z′) [F(k; z, z′) − e^{−k|z−z′|}/ε₁] dz dz′
 *
 * with ρ̃(k, z) = 2π ∫₀^∞ ρ(s, z) J₀(ks) s ds the transverse Hankel transform (J₀(k|s − s′|) is the
 * angular average of e^{ik·(s−s′)}, so the transverse double integral factorises), and F the
 * one-interface spectral Green's function (continuity of F and εF′ at z = 0):
 *     z, z′ < 0:  (e^{−k|z−z′|} + r e^{k(z+z′)})/ε₁        r = (ε₁ − ε₂)/(ε₁ + ε₂)
 *     z, z′ > 0:  (e^{−k|z−z′|} − r e^{−k(z+z′)})/ε₂
 *     otherwise:  2 e^{−k|z−z′|}/(ε₁ + ε₂)
 * Transforms used (unit densities centred at z₀, u = z − z₀):
 *     Gaussian σ:  ρ̃ = e^{−k²σ²/2} e^{−u²/2σ²}/(σ√(2π))
 *     1s radius a: ρ̃ = (2/a³) α (1 + |u|β) e^{−|u|β}/β³,  α = 2/a, β = √(k² + α²)
 *       (−∂/∂α of the Sommerfeld–Yukawa transform ∫ e^{−αR}/R J₀(ks) s ds = e^{−|u|β}/β; from
 *       memory, and checked at k = 0, where it must integrate to 1, in reaction.test.ts)
 * Result in nm⁻¹ (× COULOMB_EV_NM for eV); centre at z₀ < 0.
 */
import { gaussLegendre } from '../../../geometry/density';

type Profile = (k: number, u: number) => number;

export function gaussianProfile(sigma: number): Profile {
  return (k, u) => (Math.exp(-(k * k * sigma * sigma) / 2) * Math.exp(-(u * u) / (2 * sigma * sigma))) / (sigma * Math.sqrt(2 * Math.PI));
}

export function hydrogenicProfile(a: number): Profile {
  const alpha = 2 / a;
  return (k, u) => {
    const beta = Math.sqrt(k * k + alpha * alpha);
    const au = Math.abs(u);
    return ((2 / (a * a * a)) * alpha * (1 + au * beta) * Math.exp(-au * beta)) / (beta * beta * beta);
  };
}

/**
 * ΔU for a profile centred at z0 < 0: z panels of width `width` over z₀ ± `reach`, split at the
 * centre (the 1s profile has a kink there) and at the interface; k panels up to kMax.
 */
export function reactionReference(profile: Profile, z0: number, eps1: number, eps2: number, width: number, reach: number, kMax: number): number {
  const r = (eps1 - eps2) / (eps1 + eps2);
  const zr = gaussLegendre(20);
  const kr = gaussLegendre(16);
  const edges: number[] = [];
  for (let x = -reach; x <= reach + 1e-12; x += width) edges.push(z0 + x);
  if (0 > edges[0] && 0 < edges[edges.length - 1]) edges.push(0);
  edges.sort((p, q) => p - q);
  const zs: number[] = [];
  const ws: number[] = [];
  for (let p = 0; p + 1 < edges.length; p++) {
    const half = (edges[p + 1] - edges[p]) / 2;
    if (half <= 1e-12) continue;
    for (let i = 0; i < zr.nodes.length; i++) {
      zs.push(edges[p] + half * (zr.nodes[i] + 1));
      ws.push(half * zr.weights[i]);
    }
  }
  const kPanels = 12;
  let total = 0;
  const prof = new Float64Array(zs.length);
  for (let p = 0; p < kPanels; p++) {
    const lo = (p * kMax) / kPanels;
    const half = kMax / kPanels / 2;
    for (let i = 0; i < kr.nodes.length; i++) {
      const k = lo + half * (kr.nodes[i] + 1);
      for (let a = 0; a < zs.length; a++) prof[a] = ws[a] * profile(k, zs[a] - z0);
      let inner = 0;
      for (let a = 0; a < zs.length; a++) {
        const z = zs[a];
        let row = 0;
        for (let b = 0; b < zs.length; b++) {
          const zp = zs[b];
          const direct = Math.exp(-k * Math.abs(z - zp));
          let F: number;
          if (z < 0 && zp < 0) F = (direct + r * Math.exp(k * (z + zp))) / eps1;
          else if (z > 0 && zp > 0) F = (direct - r * Math.exp(-k * (z + zp))) / eps2;
          else F = (2 * direct) / (eps1 + eps2);
          row += prof[b] * (F - direct / eps1);
        }
        inner += prof[a] * row;
      }
      total += half * kr.weights[i] * inner;
    }
  }
  return total;
}

/** The Gaussian case with the resolution the tests use (panels of 2σ over ±8σ, k ≤ 9/σ). */
export function gaussianReactionReference(sigma: number, z0: number, eps1: number, eps2: number): number {
  return reactionReference(gaussianProfile(sigma), z0, eps1, eps2, 2 * sigma, 8 * sigma, 9 / sigma);
}
