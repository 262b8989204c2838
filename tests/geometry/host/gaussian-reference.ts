/**
 * Test-only reference: the exact reaction energy ΔU of a Gaussian density near one planar
 * interface, including the part of the density that lies across it, by our own quadrature of the
 * Fourier–Bessel form (stated as such):
 *
 *     ΔU = ∫₀^∞ dk e^{−k²σ²} ∫∫ g(z) g(z′) [F(k; z, z′) − e^{−k|z−z′|}/ε₁] dz dz′
 *
 * g is the normal profile of the Gaussian (σ per axis); e^{−k²σ²} is the transverse average of
 * J₀(k|s − s′|) over two transverse Gaussians (their difference is Gaussian with variance 2σ² per
 * axis); F is the one-interface spectral Green's function (continuity of F and εF′ at z = 0):
 *     z, z′ < 0:  (e^{−k|z−z′|} + r e^{k(z+z′)})/ε₁        r = (ε₁ − ε₂)/(ε₁ + ε₂)
 *     z, z′ > 0:  (e^{−k|z−z′|} − r e^{−k(z+z′)})/ε₂
 *     otherwise:  2 e^{−k|z−z′|}/(ε₁ + ε₂)
 * Result in nm⁻¹ (× COULOMB_EV_NM for eV), interface at z = 0, centre at z₀ < 0.
 */
import { gaussLegendre } from '../../../geometry/density';

export function gaussianReactionReference(sigma: number, z0: number, eps1: number, eps2: number): number {
  const r = (eps1 - eps2) / (eps1 + eps2);
  const zr = gaussLegendre(20);
  const kr = gaussLegendre(16);
  // z panels of width 2σ over z₀ ± 8σ, split at the interface
  const edges: number[] = [];
  for (let k = -4; k <= 4; k++) edges.push(z0 + 2 * k * sigma);
  if (0 > edges[0] && 0 < edges[edges.length - 1]) edges.push(0);
  edges.sort((a, b) => a - b);
  const zs: number[] = [];
  const ws: number[] = [];
  for (let p = 0; p + 1 < edges.length; p++) {
    const half = (edges[p + 1] - edges[p]) / 2;
    if (half <= 0) continue;
    for (let i = 0; i < zr.nodes.length; i++) {
      const z = edges[p] + half * (zr.nodes[i] + 1);
      zs.push(z);
      ws.push((half * zr.weights[i] * Math.exp(-((z - z0) ** 2) / (2 * sigma * sigma))) / (sigma * Math.sqrt(2 * Math.PI)));
    }
  }
  const kMax = 9 / sigma;
  const kPanels = 12;
  let total = 0;
  for (let p = 0; p < kPanels; p++) {
    const lo = (p * kMax) / kPanels;
    const half = kMax / kPanels / 2;
    for (let i = 0; i < kr.nodes.length; i++) {
      const k = lo + half * (kr.nodes[i] + 1);
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
          row += ws[b] * (F - direct / eps1);
        }
        inner += ws[a] * row;
      }
      total += half * kr.weights[i] * Math.exp(-k * k * sigma * sigma) * inner;
    }
  }
  return total;
}
