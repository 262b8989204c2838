/**
 * Gauss–Legendre rules on [-1, 1], computed once by Newton's method on the Legendre
 * recurrence (Golub–Welsch would need an eigen-solver; Newton from the Chebyshev guess
 * converges in a handful of steps and is deterministic). Exact for polynomials of
 * degree ≤ 2n − 1 (any numerical-analysis text, e.g. Abramowitz & Stegun 25.4.29).
 */
export interface Rule {
  nodes: Float64Array;
  weights: Float64Array;
}

const cache = new Map<number, Rule>();

export function gaussLegendre(n: number): Rule {
  const hit = cache.get(n);
  if (hit) return hit;
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    // Chebyshev-like starting guess for the i-th root (descending order)
    let x = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    for (let it = 0; it < 100; it++) {
      const dx = legendreP(n, x) / legendreDP(n, x);
      x -= dx;
      if (Math.abs(dx) < 1e-16) break;
    }
    // derivative at the converged root for the weight
    const dp = legendreDP(n, x);
    nodes[n - 1 - i] = x;
    weights[n - 1 - i] = 2 / ((1 - x * x) * dp * dp);
  }
  const rule = { nodes, weights };
  cache.set(n, rule);
  return rule;
}

/**
 * P_n'(x) = n (x P_n − P_{n−1}) / (x² − 1), |x| < 1: the derivative identity of the Legendre
 * polynomials (Abramowitz & Stegun ch. 22, section number from memory).
 */
function legendreDP(n: number, x: number): number {
  return (n * (x * legendreP(n, x) - legendreP(n - 1, x))) / (x * x - 1);
}

/** Legendre polynomial P_l(x) by the three-term recurrence (Bonnet). */
export function legendreP(l: number, x: number): number {
  if (l === 0) return 1;
  let p0 = 1;
  let p1 = x;
  for (let k = 2; k <= l; k++) {
    const p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
    p0 = p1;
    p1 = p2;
  }
  return p1;
}
