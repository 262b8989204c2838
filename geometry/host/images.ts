/**
 * The Green's function of a planar stack with at most two interfaces between the nearest metals,
 * as a sum of point images on the z axis through the source:
 *
 *     G(r, r₀) = (1/ε_s) Σ_k c_k / √(s² + h_k²)        s = lateral distance |(x − x₀, y − y₀)|
 *
 * in the convention of geometry/units.ts (−∇·(εr ∇G) = 4π δ(r − r₀), so G = 1/(εr |r − r₀|) in a
 * homogeneous medium); ε_s is the permittivity of the source's region. G is symmetric, G(r, r₀) =
 * G(r₀, r) (Green's reciprocity; Jackson §1.10, from memory), which the tests check term by term.
 *
 * Where the images come from. Each Fourier mode of the transverse plane, J₀(k s) e^{−k|z − z₀|}
 * (Sommerfeld's identity 1/R = ∫₀^∞ J₀(ks) e^{−k|z−z₀|} dk; Jackson §3.7, section from memory), is reflected
 * at an interface with r and transmitted with T = 1 + r (interface.ts); these factors do not depend
 * on k in electrostatics. Following the mode along every path of total vertical length h gives the
 * factor e^{−k h}, and ∫ J₀(ks) e^{−kh} dk = 1/√(s² + h²): each path is one point image at height
 * h from the observation point. Three regions, interfaces at z = a and z = b = a + t:
 *
 *     region 2  ε₂          ↑ T₁₂
 *     ──────────────── b ── r₁₂ ─── (reflection back into the slab)
 *     region 1  ε₁  (slab)  round trip in the slab: g = r₁₀ r₁₂, path 2t
 *     ──────────────── a ── r₁₀ ───
 *     region 0  ε₀          ↓ T₁₀
 *
 * Source in the slab, observation in the slab (the four image families of a slab, e.g.
 * the classic slab series, e.g. Smythe, Static and Dynamic Electricity, ch. 5 — from memory; derived here):
 *     1 at |z − z₀|;  r₁₀ gⁿ at 2nt + (z − a) + (z₀ − a);  r₁₂ gⁿ at 2nt + (b − z) + (b − z₀);
 *     gⁿ at 2nt ± (z − z₀) for n ≥ 1.
 * Source below the slab, observation below:
 *     1 at |z − z₀|;  r₀₁ at (a − z₀) + (a − z);  T₀₁T₁₀ r₁₂ gⁿ at (a − z₀) + (a − z) + 2t(n + 1).
 * Source below, observation in the slab: T₀₁ gⁿ at (z − z₀) + 2nt; T₀₁ r₁₂ gⁿ at (a − z₀) + t + (b − z) + 2nt.
 * Source below, observation above: T₀₁ T₁₂ gⁿ at (z − z₀) + 2nt.
 * Source in the slab, observation below: T₁₀ gⁿ at (z₀ − z) + 2nt; T₁₀ r₁₂ gⁿ at (b − z₀) + t + (a − z) + 2nt.
 * Sources above the slab are the mirror image (z → −z) of sources below.
 *
 * Truncation and its bound (stated once, tested in tests/geometry/host/images.test.ts):
 *  - |g| < 1 (at least one side of the slab is a dielectric): every omitted image lies at
 *    h ≥ 2Nt and carries at most |c| |g|^N, so with 1/√(s² + h²) ≤ 1/h the tail is at most
 *        (1/ε_s) Σ_families |c| · |g|^N / ((1 − |g|) · 2Nt)      (geometric series).
 *  - g = 1 (a slab between two metal planes, r₁₀ = r₁₂ = −1): the images are ±1 at 2nt + α and
 *    2nt + β (α = z − z₀, β = (z − a) + (z₀ − a)), n ∈ ℤ, kept for |n| ≤ N. Pairing n with −n,
 *    S_n = e(α) − e(β), e(c) = f(2nt + c) + f(2nt − c), f(h) = (s² + h²)^{−1/2}; since
 *    |f″(h)| ≤ 2/|h|³ for every s, |S_n| ≤ 2(β² − α²)/(2(n − 1)t)³, and Σ_{n>N} ≤
 *    (1/ε_s) (z − a)(z₀ − a) / (2 t³ (N − 1)²)  (N ≥ 2). This is an O(1/N²) tail: plates cost more terms.
 * N is the smallest number of round trips whose bound meets the tolerance, up to a cap.
 *
 * Where each image sits, and whether it is mirrored (for multipole sources, geometry/fem/boundary.ts).
 * Every height is a path length h = ±(z − ·) ± (z₀ − ·) + const, linear in both heights with slopes
 * ∂h/∂z = ±1 and ∂h/∂z₀ = ±1. The image lies on the observation point's side given by the first
 * slope: Z = z − (∂h/∂z)·h (below the observation point when h grows with z). Z depends on z₀ with
 * slope σ = dZ/dz₀ = −(∂h/∂z)(∂h/∂z₀): σ = +1 for the direct term, transmissions and an even
 * number of reflections, σ = −1 (a mirror image of the source, z₀ → const − z₀) for an odd number.
 * A smooth density ρ in the source's region then has images ρ(X_k⁻¹(·)) with X_k(p) = (p_x, p_y,
 * σ_k p_z + const): copies or mirror copies, each with the same factor c_k (the factors do not
 * depend on the transverse wavenumber in electrostatics; Jackson §4.4).
 */
import { reflection, transmission } from './interface';
import { regionOf, screenedStack } from './stack';
import type { HostFinding, PlanarStack } from './types';

/** Default absolute tolerance on G (nm⁻¹): common practice, far below the quadrature error of any FEM figure. */
export const IMAGE_TOLERANCE_NM1 = 1e-12;
/** Default cap on round trips in the slab (keeps buffers ≤ ~6 MB each). */
export const MAX_ROUND_TRIPS = 200_000;

export interface ImageSeries {
  /** 1/ε_s of the source's region */
  scale: number;
  /** image strengths c_k (dimensionless) */
  coef: Float64Array;
  /** vertical distance h_k (nm) of each image from the observation height */
  height: Float64Array;
  count: number;
  /** height Z_k (nm) of each image (on the vertical through the source) */
  imageZ: Float64Array;
  /** 1 where the image is the source mirrored in z (odd number of reflections), 0 for a copy */
  mirror: Uint8Array;
  /** index of the direct term 1/|r − r₀| when source and observation share a region, −1 otherwise */
  direct: number;
  /** rigorous bound on |G − Σ kept terms| (nm⁻¹), valid at every lateral distance */
  tailBound: number;
  /** round trips kept in the slab (0 without a slab) */
  roundTrips: number;
  /** regions of source and observation in the stack given */
  sourceRegion: number;
  observationRegion: number;
}

export interface ImageOptions {
  toleranceNm1?: number;
  maxRoundTrips?: number;
}

interface Builder {
  coef: Float64Array;
  height: Float64Array;
  imageZ: Float64Array;
  mirror: Uint8Array;
  count: number;
}

/**
 * Appends the image c at height h, with dz = ∂h/∂z and dz0 = ∂h/∂z₀ (±1) in the working frame;
 * `flip` is −1 when that frame is mirrored (z → −z), `z` the observation height in the caller's frame.
 */
function push(b: Builder, c: number, h: number, dz: number, dz0: number, z: number, flip: number): void {
  b.coef[b.count] = c;
  b.height[b.count] = h;
  b.imageZ[b.count] = z - flip * dz * h;
  b.mirror[b.count] = dz * dz0 > 0 ? 1 : 0;
  b.count++;
}

function builder(size: number): Builder {
  return { coef: new Float64Array(size), height: new Float64Array(size), imageZ: new Float64Array(size), mirror: new Uint8Array(size), count: 0 };
}

/** ∂|u|/∂u, taken as +1 at u = 0 (the direct term at equal heights: either side gives Z = z₀). */
function sgn(u: number): number {
  return u < 0 ? -1 : 1;
}

/** Smallest N ≥ 1 with K |g|^N / (2Nt) ≤ tol, capped; K already holds Σ|c|/(1 − |g|) and the scale. */
function geometricRoundTrips(K: number, g: number, t: number, tol: number, cap: number): number {
  const ag = Math.abs(g);
  let N = 1;
  let pw = ag;
  while (N < cap && (K * pw) / (2 * N * t) > tol) {
    N++;
    pw *= ag;
  }
  return N;
}

function geometricBound(K: number, g: number, t: number, N: number): number {
  return (K * Math.pow(Math.abs(g), N)) / (2 * N * t);
}

/**
 * The image series of G(r, r₀) for a source at height z0 and an observation point at height z
 * (only heights matter; the lateral distance enters at evaluation). Returns null with a finding
 * when a point sits on an interface (`on-interface`), the source is in metal (`in-metal`) or more
 * than two interfaces separate the nearest metals (`too-many-interfaces`). An observation point in
 * or beyond metal gets an empty series (G = 0: grounded metal). `series-capped` comes with a
 * usable series whose `tailBound` exceeds the tolerance.
 */
export function imageSeries(
  stack: PlanarStack,
  z0: number,
  z: number,
  options: ImageOptions = {},
): { series: ImageSeries | null; findings: HostFinding[] } {
  const tol = options.toleranceNm1 ?? IMAGE_TOLERANCE_NM1;
  const cap = Math.max(2, Math.floor(options.maxRoundTrips ?? MAX_ROUND_TRIPS));
  const sAll = regionOf(stack, z0);
  const oAll = regionOf(stack, z);
  if (sAll < 0) return { series: null, findings: [{ code: 'on-interface', value: z0 }] };
  if (oAll < 0) return { series: null, findings: [{ code: 'on-interface', value: z }] };
  if (stack.epsilon[sAll] === Infinity) return { series: null, findings: [{ code: 'in-metal', value: z0 }] };
  const cut = screenedStack(stack, sAll);
  const scale = 1 / stack.epsilon[sAll];
  const base = { scale, direct: -1, tailBound: 0, roundTrips: 0, sourceRegion: sAll, observationRegion: oAll };
  let o = oAll - cut.offset;
  let s = cut.source;
  const m = cut.stack.interfaces.length;
  if (o < 0 || o > m || cut.stack.epsilon[o] === Infinity) {
    return { series: { ...base, ...builder(0) }, findings: [] };
  }
  if (m > 2) return { series: null, findings: [{ code: 'too-many-interfaces', value: m }] };

  if (m === 0) {
    const b = builder(1);
    push(b, 1, Math.abs(z - z0), sgn(z - z0), -sgn(z - z0), z, 1);
    return { series: { ...base, ...b, direct: 0 }, findings: [] };
  }
  if (m === 1) {
    const a = cut.stack.interfaces[0];
    const es = cut.stack.epsilon[s];
    const eo = cut.stack.epsilon[1 - s];
    const b = builder(2);
    if (s === o) {
      push(b, 1, Math.abs(z - z0), sgn(z - z0), -sgn(z - z0), z, 1);
      push(b, reflection(es, eo), Math.abs(z - a) + Math.abs(z0 - a), sgn(z - a), sgn(z0 - a), z, 1);
      return { series: { ...base, ...b, direct: 0 }, findings: [] };
    }
    push(b, transmission(es, eo), Math.abs(z - z0), sgn(z - z0), -sgn(z - z0), z, 1);
    return { series: { ...base, ...b }, findings: [] };
  }

  // two interfaces: mirror z → −z so that the source is in region 0 or 1, and, when the source
  // is in the slab and the observation outside it, the observation is in region 0
  let a = cut.stack.interfaces[0];
  let bz = cut.stack.interfaces[1];
  let eps = [cut.stack.epsilon[0], cut.stack.epsilon[1], cut.stack.epsilon[2]];
  let zs = z0;
  let zo = z;
  let flip = 1;
  if (s === 2 || (s === 1 && o === 2)) {
    flip = -1;
    [a, bz] = [-bz, -a];
    eps = [eps[2], eps[1], eps[0]];
    zs = -z0;
    zo = -z;
    s = 2 - s;
    o = 2 - o;
  }
  const t = bz - a;
  const [e0, e1, e2] = eps;
  const r10 = reflection(e1, e0);
  const r12 = reflection(e1, e2);
  const g = r10 * r12;
  const findings: HostFinding[] = [];

  if (s === 1 && o === 1) {
    const plates = e0 === Infinity && e2 === Infinity;
    let N: number;
    let bound: number;
    if (plates) {
      const p = (zo - a) * (zs - a);
      const need = 1 + Math.ceil(Math.sqrt((scale * p) / (2 * t * t * t * tol)));
      N = Math.min(cap, Math.max(2, need));
      bound = (scale * p) / (2 * t * t * t * (N - 1) * (N - 1));
    } else {
      const K = (scale * (Math.abs(r10) + Math.abs(r12) + 2)) / (1 - Math.abs(g));
      N = geometricRoundTrips(K, g, t, tol, cap);
      bound = geometricBound(K, g, t, N);
    }
    const b = builder(4 * N + 2);
    push(b, 1, Math.abs(zo - zs), sgn(zo - zs), -sgn(zo - zs), z, flip);
    let gn = 1;
    for (let n = 0; n <= N; n++) {
      push(b, r10 * gn, 2 * n * t + (zo - a) + (zs - a), 1, 1, z, flip);
      if (n < N) push(b, r12 * gn, 2 * n * t + (bz - zo) + (bz - zs), -1, -1, z, flip);
      if (n >= 1) {
        push(b, gn, 2 * n * t + (zo - zs), 1, -1, z, flip);
        push(b, gn, 2 * n * t + (zs - zo), -1, 1, z, flip);
      }
      gn *= g;
    }
    if (bound > tol) findings.push({ code: 'series-capped', value: bound });
    return { series: { ...base, ...b, direct: 0, tailBound: bound, roundTrips: N }, findings };
  }

  // the remaining cases have |g| < 1 (region 0 holds the source or the observation, so it is a dielectric)
  let c1: number;
  let c2: number;
  let h1: number;
  let h2: number;
  let direct = -1;
  let lead: [number, number] | null = null;
  // slopes ∂h/∂z, ∂h/∂z₀ of each family (see the header): c1 is reflected only in case (0, 0)
  let d1: [number, number];
  const d2: [number, number] = [-1, -1]; // c2 is reflected once at b and seen from below
  if (s === 0 && o === 0) {
    const r01 = reflection(e0, e1);
    lead = [r01, a - zs + (a - zo)];
    c1 = transmission(e0, e1) * transmission(e1, e0) * r12;
    h1 = a - zs + (a - zo) + 2 * t;
    d1 = [-1, -1];
    c2 = 0;
    h2 = 0;
  } else if (s === 0 && o === 1) {
    c1 = transmission(e0, e1);
    h1 = zo - zs;
    d1 = [1, -1];
    c2 = transmission(e0, e1) * r12;
    h2 = a - zs + t + (bz - zo);
  } else if (s === 0 && o === 2) {
    c1 = transmission(e0, e1) * transmission(e1, e2);
    h1 = zo - zs;
    d1 = [1, -1];
    c2 = 0;
    h2 = 0;
  } else {
    // s === 1, o === 0
    c1 = transmission(e1, e0);
    h1 = zs - zo;
    d1 = [-1, 1];
    c2 = transmission(e1, e0) * r12;
    h2 = bz - zs + t + (a - zo);
  }
  const K = (scale * (Math.abs(c1) + Math.abs(c2))) / (1 - Math.abs(g));
  const N = geometricRoundTrips(K, g, t, tol, cap);
  const bound = geometricBound(K, g, t, N);
  const b = builder(2 * N + 2);
  if (lead) {
    direct = 0;
    push(b, 1, Math.abs(zo - zs), sgn(zo - zs), -sgn(zo - zs), z, flip);
    push(b, lead[0], lead[1], -1, -1, z, flip);
  }
  let gn = 1;
  for (let n = 0; n < N; n++) {
    if (c1 !== 0) push(b, c1 * gn, h1 + 2 * n * t, d1[0], d1[1], z, flip);
    if (c2 !== 0) push(b, c2 * gn, h2 + 2 * n * t, d2[0], d2[1], z, flip);
    gn *= g;
  }
  if (bound > tol) findings.push({ code: 'series-capped', value: bound });
  return { series: { ...base, ...b, direct, tailBound: bound, roundTrips: N }, findings };
}

/** G at lateral distance s (nm) from the series (nm⁻¹); Infinity at the source itself. */
export function seriesAt(series: ImageSeries, s: number): number {
  return series.scale * sumTerms(series, s, -1);
}

/** The reaction (image) part of G: G minus the direct term 1/(ε_s |r − r₀|) (nm⁻¹). */
export function reactionAt(series: ImageSeries, s: number): number {
  return series.scale * sumTerms(series, s, series.direct);
}

function sumTerms(series: ImageSeries, s: number, skip: number): number {
  const s2 = s * s;
  let sum = 0;
  // far images first: the plate series alternates, and small terms added first lose less
  for (let k = series.count - 1; k >= 0; k--) {
    if (k === skip) continue;
    const h = series.height[k];
    sum += series.coef[k] / Math.sqrt(s2 + h * h);
  }
  return sum;
}

/** G(r, r₀) in nm⁻¹ for points r = (x, y, z) and r₀ = (x0, y0, z0); null with findings where imageSeries gives none. */
export function greenFunction(
  stack: PlanarStack,
  source: readonly [number, number, number],
  observation: readonly [number, number, number],
  options: ImageOptions = {},
): { value: number | null; tailBound: number; findings: HostFinding[] } {
  const { series, findings } = imageSeries(stack, source[2], observation[2], options);
  if (!series) return { value: null, tailBound: Infinity, findings };
  const s = Math.hypot(observation[0] - source[0], observation[1] - source[1]);
  return { value: seriesAt(series, s), tailBound: series.tailBound, findings };
}
