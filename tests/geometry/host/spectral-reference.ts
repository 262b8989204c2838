/**
 * Test-only reference: the Green's function of a planar stack from Sommerfeld's integral,
 * computed by our own quadrature (stated as such: an independent route, not an outside library).
 *
 *     G(s, z, z₀) = ∫₀^∞ J₀(k s) F(k; z, z₀) dk
 *
 * where, for each k, F solves the one-dimensional problem −(ε F′)′ + ε k² F = 2k δ(z − z₀) with F
 * continuous, ε F′ continuous at interfaces, F → 0 at ±∞ and F = 0 on metal (the transverse Fourier–Bessel transform of Poisson's
 * equation; in a homogeneous medium F = e^{−k|z−z₀|}/ε, which with ∫J₀(ks)e^{−k|Δz|}dk = 1/R gives
 * 1/(εR)). F is found here by solving the interface conditions as a dense linear system — no ray or
 * image algebra — so agreement with the image series checks that algebra independently.
 */
import { gaussLegendre } from '../../../geometry/density';

export interface RefStack {
  interfaces: number[];
  /** Infinity = metal */
  epsilon: number[];
}

/** Dense Gaussian elimination with partial pivoting (test helper). */
function solve(A: number[][], b: number[]): number[] {
  const n = b.length;
  const M = A.map((row, i) => [...row, b[i]]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(M[r][c]) > Math.abs(M[p][c])) p = r;
    [M[c], M[p]] = [M[p], M[c]];
    for (let r = c + 1; r < n; r++) {
      const f = M[r][c] / M[c][c];
      for (let k = c; k <= n; k++) M[r][k] -= f * M[c][k];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let s = M[r][n];
    for (let k = r + 1; k < n; k++) s -= M[r][k] * x[k];
    x[r] = s / M[r][r];
  }
  return x;
}

function regionIndex(stack: RefStack, z: number): number {
  let k = 0;
  while (k < stack.interfaces.length && z > stack.interfaces[k]) k++;
  return k;
}

/**
 * F(k; z, z₀) minus, when `subtractDirect`, the free term e^{−k|z−z₀|}/ε_s (source and observation
 * in one region). Region i (finite ε) holds A_i e^{k(z − top_i)} + B_i e^{−k(z − bot_i)}, scaled so
 * that no exponential exceeds 1; the source region adds e^{−k|z−z₀|}/ε_s.
 */
export function spectralF(stack: RefStack, k: number, z: number, z0: number, subtractDirect: boolean): number {
  const m = stack.epsilon.length;
  const s = regionIndex(stack, z0);
  const o = regionIndex(stack, z);
  let lo = s;
  while (lo > 0 && Number.isFinite(stack.epsilon[lo - 1])) lo--;
  let hi = s;
  while (hi < m - 1 && Number.isFinite(stack.epsilon[hi + 1])) hi++;
  if (o < lo || o > hi) return 0;
  const bot = (i: number) => (i === 0 ? -Infinity : stack.interfaces[i - 1]);
  const top = (i: number) => (i === m - 1 ? Infinity : stack.interfaces[i]);
  // unknowns: A_i (absent when top = +∞), B_i (absent when bot = −∞), for lo ≤ i ≤ hi
  const idxA = new Map<number, number>();
  const idxB = new Map<number, number>();
  let n = 0;
  for (let i = lo; i <= hi; i++) {
    if (top(i) !== Infinity) idxA.set(i, n++);
    if (bot(i) !== -Infinity) idxB.set(i, n++);
  }
  const es = stack.epsilon[s];
  const A: number[][] = [];
  const rhs: number[] = [];
  // value and derivative of each basis function of region i at height zz, plus the source part
  const basis = (i: number, zz: number) => {
    const row = new Array<number>(n).fill(0);
    const drow = new Array<number>(n).fill(0);
    if (idxA.has(i)) {
      const e = Math.exp(k * (zz - top(i)));
      row[idxA.get(i)!] = e;
      drow[idxA.get(i)!] = k * e;
    }
    if (idxB.has(i)) {
      const e = Math.exp(-k * (zz - bot(i)));
      row[idxB.get(i)!] = e;
      drow[idxB.get(i)!] = -k * e;
    }
    let src = 0;
    let dsrc = 0;
    if (i === s) {
      src = Math.exp(-k * Math.abs(zz - z0)) / es;
      dsrc = (zz > z0 ? -k : k) * src;
    }
    return { row, drow, src, dsrc };
  };
  for (let j = lo; j < hi; j++) {
    const zi = stack.interfaces[j];
    const below = basis(j, zi);
    const above = basis(j + 1, zi);
    A.push(below.row.map((v, c) => v - above.row[c]));
    rhs.push(above.src - below.src);
    const e1 = stack.epsilon[j];
    const e2 = stack.epsilon[j + 1];
    A.push(below.drow.map((v, c) => e1 * v - e2 * above.drow[c]));
    rhs.push(e2 * above.dsrc - e1 * below.dsrc);
  }
  if (lo > 0) {
    const b = basis(lo, stack.interfaces[lo - 1]);
    A.push(b.row);
    rhs.push(-b.src);
  }
  if (hi < m - 1) {
    const b = basis(hi, stack.interfaces[hi]);
    A.push(b.row);
    rhs.push(-b.src);
  }
  const x = n > 0 ? solve(A, rhs) : [];
  const v = basis(o, z);
  let F = v.src;
  for (let c = 0; c < n; c++) F += v.row[c] * x[c];
  if (subtractDirect && o === s) F -= Math.exp(-k * Math.abs(z - z0)) / es;
  return F;
}

const J0_RULE = gaussLegendre(96);

/** J₀(x) = (1/π) ∫₀^π cos(x sin θ) dθ (Bessel's integral; Abramowitz & Stegun 9.1.18, from memory), Gauss–Legendre, x ≲ 60. */
export function besselJ0(x: number): number {
  let sum = 0;
  for (let i = 0; i < J0_RULE.nodes.length; i++) {
    const th = (Math.PI / 2) * (J0_RULE.nodes[i] + 1);
    sum += J0_RULE.weights[i] * Math.cos(x * Math.sin(th));
  }
  return sum / 2;
}

const K_RULE = gaussLegendre(24);

/**
 * G(s, z, z₀) in nm⁻¹ by ∫₀^{kMax} J₀(ks) F dk with composite Gauss–Legendre panels of width
 * `panel` (nm⁻¹). With `subtractDirect`, the free term is taken out of F and added back in closed
 * form 1/(ε_s R) (left out with `reactionOnly`), so the integrand decays like e^{−k h_min} with h_min the nearest image height.
 */
export function sommerfeldG(stack: RefStack, s: number, z: number, z0: number, kMax: number, panel: number, reactionOnly = false): number {
  const sameRegion = regionIndex(stack, z) === regionIndex(stack, z0);
  const es = stack.epsilon[regionIndex(stack, z0)];
  let sum = 0;
  for (let lo = 0; lo < kMax; lo += panel) {
    const half = Math.min(panel, kMax - lo) / 2;
    for (let i = 0; i < K_RULE.nodes.length; i++) {
      const k = lo + half * (K_RULE.nodes[i] + 1);
      sum += half * K_RULE.weights[i] * besselJ0(k * s) * spectralF(stack, k, z, z0, sameRegion);
    }
  }
  if (sameRegion && !reactionOnly) sum += 1 / (es * Math.hypot(s, z - z0));
  return sum;
}
