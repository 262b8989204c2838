/**
 * The reference tetrahedron: the one place that fixes vertex, edge and face numbering.
 * Everything else (mesher, exporters, P2 degrees of freedom, assembly) reads these tables.
 *
 *                 v3 (0,0,1)
 *                 /|\
 *                / | \          edges (VTK quadratic-tetra order, nodes 4..9):
 *            e3 /  |  \ e5        e0 = v0-v1   e1 = v1-v2   e2 = v0-v2
 *              /   |e4 \          e3 = v0-v3   e4 = v1-v3   e5 = v2-v3
 *             /    |    \
 *   (0,0,0) v0-----|-----v2 (0,1,0)   faces: face i is opposite vertex i, listed so that
 *             \ e0 |    /             its normal (right-hand rule) points out of a
 *              \   |   / e1           positively oriented tetrahedron:
 *               \  |  /                 f0 = (1,2,3)  f1 = (0,3,2)
 *                \ | /                  f2 = (0,1,3)  f3 = (0,2,1)
 *                 v1 (1,0,0)
 *
 * A tetrahedron (p0, p1, p2, p3) is positively oriented when det[p1−p0, p2−p0, p3−p0] > 0,
 * as the reference one is.
 */
import { gaussLegendre } from '../density/quadrature';

/** Reference vertex coordinates, 3 per vertex. */
export const REF_VERTICES = new Float64Array([0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0, 1]);

/** Local vertex pairs of the six edges, in VTK order (node 4 + e is the midpoint of edge e). */
export const TET_EDGES: ReadonlyArray<readonly [number, number]> = [
  [0, 1],
  [1, 2],
  [0, 2],
  [0, 3],
  [1, 3],
  [2, 3],
];

/** Local vertices of the four faces; face i is opposite vertex i, outward-oriented. */
export const TET_FACES: ReadonlyArray<readonly [number, number, number]> = [
  [1, 2, 3],
  [0, 3, 2],
  [0, 1, 3],
  [0, 2, 1],
];

// ---------------------------------------------------------------------------------------------
// Lagrange basis functions on the reference tetrahedron.
//
// We work with barycentric coordinates λ = (1−x−y−z, x, y, z): every formula below is a
// polynomial in λ, and the physical gradient of λ_i is constant per element (see tetGeometry),
// so basis gradients on a real element follow from ∇λ without a second mapping step.
//
//   P1 (4 nodes):   φ_i = λ_i
//   P2 (10 nodes):  φ_i = λ_i (2λ_i − 1)            vertex nodes i = 0..3
//                   φ_{4+e} = 4 λ_a λ_b               edge nodes, (a, b) = TET_EDGES[e]
// The P2 node order is the VTK quadratic-tetra order (vertices, then the six edge midpoints).
// ---------------------------------------------------------------------------------------------

/** Number of local nodes of the P1 and P2 tetrahedron. */
export const P1_NODES = 4;
export const P2_NODES = 10;

/** Barycentric coordinates of the reference point (x, y, z), written into out[0..3]. */
export function barycentric(x: number, y: number, z: number, out: Float64Array): void {
  out[0] = 1 - x - y - z;
  out[1] = x;
  out[2] = y;
  out[3] = z;
}

/** Gradients of λ_0..λ_3 on the reference tetrahedron (3 per function). */
export const REF_BARY_GRADIENTS = new Float64Array([-1, -1, -1, 1, 0, 0, 0, 1, 0, 0, 0, 1]);

/** P1 basis values at reference point (x, y, z) into out[0..3]. */
export function p1Basis(x: number, y: number, z: number, out: Float64Array): void {
  barycentric(x, y, z, out);
}

/** P1 reference gradients (constant), 3 per function, into out[0..11]. */
export function p1RefGradients(out: Float64Array): void {
  out.set(REF_BARY_GRADIENTS);
}

/** P2 basis values from barycentric coordinates l[0..3] into out[0..9]. */
export function p2BasisBary(l: ArrayLike<number>, out: Float64Array): void {
  for (let i = 0; i < 4; i++) out[i] = l[i] * (2 * l[i] - 1);
  for (let e = 0; e < 6; e++) {
    const [a, b] = TET_EDGES[e];
    out[4 + e] = 4 * l[a] * l[b];
  }
}

/**
 * P2 basis gradients at barycentric point l, given the gradients of the four barycentric
 * functions g (3 per function: reference ones give reference gradients, physical ones give
 * physical gradients). Output: 3 per basis function into out[0..29].
 *   ∇φ_i = (4λ_i − 1) ∇λ_i,    ∇φ_{4+e} = 4 (λ_a ∇λ_b + λ_b ∇λ_a)
 */
export function p2GradientsBary(l: ArrayLike<number>, g: ArrayLike<number>, out: Float64Array): void {
  for (let i = 0; i < 4; i++) {
    const c = 4 * l[i] - 1;
    out[3 * i] = c * g[3 * i];
    out[3 * i + 1] = c * g[3 * i + 1];
    out[3 * i + 2] = c * g[3 * i + 2];
  }
  for (let e = 0; e < 6; e++) {
    const [a, b] = TET_EDGES[e];
    const o = 3 * (4 + e);
    out[o] = 4 * (l[a] * g[3 * b] + l[b] * g[3 * a]);
    out[o + 1] = 4 * (l[a] * g[3 * b + 1] + l[b] * g[3 * a + 1]);
    out[o + 2] = 4 * (l[a] * g[3 * b + 2] + l[b] * g[3 * a + 2]);
  }
}

/** P2 basis values at reference point (x, y, z) into out[0..9]. */
export function p2Basis(x: number, y: number, z: number, out: Float64Array): void {
  p2BasisBary([1 - x - y - z, x, y, z], out);
}

/** P2 reference gradients at reference point (x, y, z), 3 per function, into out[0..29]. */
export function p2RefGradients(x: number, y: number, z: number, out: Float64Array): void {
  p2GradientsBary([1 - x - y - z, x, y, z], REF_BARY_GRADIENTS, out);
}

/** Reference coordinates of the P2 nodes (vertices, then edge midpoints), 3 per node. */
export const P2_REF_NODES: Float64Array = (() => {
  const out = new Float64Array(30);
  out.set(REF_VERTICES);
  for (let e = 0; e < 6; e++) {
    const [a, b] = TET_EDGES[e];
    for (let k = 0; k < 3; k++) out[12 + 3 * e + k] = 0.5 * (REF_VERTICES[3 * a + k] + REF_VERTICES[3 * b + k]);
  }
  return out;
})();

// ---------------------------------------------------------------------------------------------
// Element geometry: computed once per element and shared by stiffness, mass and load.
//
// The affine map x = p0 + J ξ has J = [p1−p0 | p2−p0 | p3−p0]. The physical gradient of λ_k
// (k = 1..3) is row k−1 of J⁻¹ (since λ_{1..3} = ξ = J⁻¹ (x − p0)), and ∇λ_0 = −Σ ∇λ_k.
// ---------------------------------------------------------------------------------------------

/** Size of the per-element geometry record written by tetGeometry. */
export const GEOM_SIZE = 16;

/**
 * Geometry of tetrahedron (a, b, c, d) of a flat coordinate array, written to out:
 *   out[0..11]  physical gradients of λ_0..λ_3 (3 each)
 *   out[12]     volume |det J| / 6
 *   out[13..15] p0 (the origin of the affine map; J columns are recomputed by callers that need
 *               physical quadrature points, via mapPoint)
 * Returns det J (signed; positive for a positively oriented element).
 */
export function tetGeometry(coords: Float64Array, a: number, b: number, c: number, d: number, out: Float64Array): number {
  const x0 = coords[3 * a], y0 = coords[3 * a + 1], z0 = coords[3 * a + 2];
  const j00 = coords[3 * b] - x0, j10 = coords[3 * b + 1] - y0, j20 = coords[3 * b + 2] - z0;
  const j01 = coords[3 * c] - x0, j11 = coords[3 * c + 1] - y0, j21 = coords[3 * c + 2] - z0;
  const j02 = coords[3 * d] - x0, j12 = coords[3 * d + 1] - y0, j22 = coords[3 * d + 2] - z0;
  // cofactors c_rc of J; J⁻¹ = adj(J)/det with adj = cofactor matrixᵀ
  const c00 = j11 * j22 - j12 * j21, c01 = j12 * j20 - j10 * j22, c02 = j10 * j21 - j11 * j20;
  const c10 = j02 * j21 - j01 * j22, c11 = j00 * j22 - j02 * j20, c12 = j01 * j20 - j00 * j21;
  const c20 = j01 * j12 - j02 * j11, c21 = j02 * j10 - j00 * j12, c22 = j00 * j11 - j01 * j10;
  const det = j00 * c00 + j01 * c01 + j02 * c02;
  const inv = 1 / det;
  // row k of J⁻¹ = column k of the cofactor matrix / det
  out[3] = c00 * inv; out[4] = c10 * inv; out[5] = c20 * inv;
  out[6] = c01 * inv; out[7] = c11 * inv; out[8] = c21 * inv;
  out[9] = c02 * inv; out[10] = c12 * inv; out[11] = c22 * inv;
  out[0] = -(out[3] + out[6] + out[9]);
  out[1] = -(out[4] + out[7] + out[10]);
  out[2] = -(out[5] + out[8] + out[11]);
  out[12] = Math.abs(det) / 6;
  out[13] = x0; out[14] = y0; out[15] = z0;
  return det;
}

/** Physical point of barycentric coordinates l in tetrahedron (a, b, c, d), into out[0..2]. */
export function mapBary(
  coords: Float64Array, a: number, b: number, c: number, d: number, l: ArrayLike<number>, out: Float64Array,
): void {
  for (let k = 0; k < 3; k++) {
    out[k] = l[0] * coords[3 * a + k] + l[1] * coords[3 * b + k] + l[2] * coords[3 * c + k] + l[3] * coords[3 * d + k];
  }
}

// ---------------------------------------------------------------------------------------------
// Exact local stiffness tensors.
//
// With G_pq = ∇λ_p·∇λ_q (4×4, constant per element) every stiffness entry is
//   ∫_T ∇φ_i·∇φ_j = |T| Σ_pq S[i][j][p][q] G_pq
// where S only depends on the basis, not on the element. For P2, ∇φ_i = Σ_p c_ip(λ) ∇λ_p with
// c_ip linear in λ, and ∫_T λ_r λ_s = |T| (1 + δ_rs) / 20 (the standard formula
// ∫_T λ^α = |T| 3! α! / (|α| + 3)!), so S is computed exactly once at load time.
// ---------------------------------------------------------------------------------------------

/** Index of the pair (p, q), p ≤ q, among the 10 entries of a symmetric 4×4 matrix. */
export const SYM4_INDEX: ReadonlyArray<ReadonlyArray<number>> = [
  [0, 1, 2, 3],
  [1, 4, 5, 6],
  [2, 5, 7, 8],
  [3, 6, 8, 9],
];

/**
 * P2 stiffness tensor: entry [(i*10 + j)*10 + s] multiplies the symmetric Gram entry number s
 * (SYM4_INDEX order, off-diagonal pairs already doubled), giving ∫∇φ_i·∇φ_j / |T|.
 */
export const P2_STIFFNESS_TENSOR: Float64Array = (() => {
  // M[i][p][r]: c_ip = Σ_r M[i][p][r] λ_r
  const M = new Float64Array(10 * 4 * 4);
  for (let i = 0; i < 4; i++) for (let r = 0; r < 4; r++) M[(i * 4 + i) * 4 + r] = 4 * (i === r ? 1 : 0) - 1;
  for (let e = 0; e < 6; e++) {
    const [a, b] = TET_EDGES[e];
    const i = 4 + e;
    M[(i * 4 + b) * 4 + a] = 4; // 4 λ_a ∇λ_b
    M[(i * 4 + a) * 4 + b] = 4; // 4 λ_b ∇λ_a
  }
  const S = new Float64Array(10 * 10 * 10);
  for (let i = 0; i < 10; i++) {
    for (let j = 0; j < 10; j++) {
      for (let p = 0; p < 4; p++) {
        for (let q = 0; q < 4; q++) {
          let v = 0;
          for (let r = 0; r < 4; r++) {
            for (let s = 0; s < 4; s++) v += M[(i * 4 + p) * 4 + r] * M[(j * 4 + q) * 4 + s] * (r === s ? 2 : 1);
          }
          S[(i * 10 + j) * 10 + SYM4_INDEX[p][q]] += v / 20;
        }
      }
    }
  }
  return S;
})();

// ---------------------------------------------------------------------------------------------
// Quadrature on the reference tetrahedron (volume 1/6; weights sum to 1/6).
// ---------------------------------------------------------------------------------------------

/** A quadrature rule: points in reference coordinates (3 each) and barycentric (4 each). */
export interface TetRule {
  /** polynomials of total degree ≤ degree are integrated exactly */
  degree: number;
  n: number;
  points: Float64Array;
  bary: Float64Array;
  weights: Float64Array;
}

function ruleFromPoints(degree: number, pts: number[][], w: number[]): TetRule {
  const n = w.length;
  const points = new Float64Array(3 * n);
  const bary = new Float64Array(4 * n);
  for (let q = 0; q < n; q++) {
    const [x, y, z] = pts[q];
    points[3 * q] = x; points[3 * q + 1] = y; points[3 * q + 2] = z;
    bary[4 * q] = 1 - x - y - z; bary[4 * q + 1] = x; bary[4 * q + 2] = y; bary[4 * q + 3] = z;
  }
  return { degree, n, points, bary, weights: Float64Array.from(w) };
}

/**
 * Gauss–Legendre nodes and weights on [0, 1], n points, exact for degree 2n − 1: the rule on
 * [−1, 1] (geometry/density/quadrature.ts) mapped by x = (1 − t)/2, which halves the weights.
 * Nodes ascend in x.
 */
export function gaussLegendre01(n: number): { x: Float64Array; w: Float64Array } {
  const { nodes, weights } = gaussLegendre(n); // t ascending, so x descends: read it backwards
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    x[i] = 0.5 * (1 - nodes[n - 1 - i]);
    w[i] = 0.5 * weights[n - 1 - i];
  }
  return { x, w };
}

/**
 * Conical-product (collapsed Gauss) rule of any degree, all weights positive:
 * ξ = u, η = (1−u) v, ζ = (1−u)(1−v) w with Jacobian (1−u)²(1−v), Gauss–Legendre in each of
 * u, v, w with enough points for the raised degrees (d+2, d+1, d). Stroud, "Approximate
 * calculation of multiple integrals" (1971), conical product formulas. Positive weights make it
 * the safe choice for sharply peaked positive integrands such as orbital densities.
 */
export function conicalRule(degree: number): TetRule {
  const d = Math.max(0, Math.floor(degree));
  const nu = Math.max(1, Math.ceil((d + 3) / 2));
  const nv = Math.max(1, Math.ceil((d + 2) / 2));
  const nw = Math.max(1, Math.ceil((d + 1) / 2));
  const gu = gaussLegendre01(nu), gv = gaussLegendre01(nv), gw = gaussLegendre01(nw);
  const pts: number[][] = [];
  const w: number[] = [];
  for (let i = 0; i < nu; i++) {
    for (let j = 0; j < nv; j++) {
      for (let k = 0; k < nw; k++) {
        const u = gu.x[i], v = gv.x[j], s = gw.x[k];
        pts.push([u, (1 - u) * v, (1 - u) * (1 - v) * s]);
        w.push(gu.w[i] * gv.w[j] * gw.w[k] * (1 - u) * (1 - u) * (1 - v));
      }
    }
  }
  return ruleFromPoints(d, pts, w);
}

function factorial(n: number): number {
  let f = 1;
  for (let k = 2; k <= n; k++) f *= k;
  return f;
}

/**
 * Grundmann–Möller rule of index s (degree 2s + 1) on the tetrahedron: A. Grundmann and
 * H. M. Möller, "Invariant integration formulas for the n-simplex by combinatorial methods",
 * SIAM J. Numer. Anal. 15 (1978) 282–290, Theorem 4 with n = 3:
 *   ∫_T f ≈ Σ_{i=0..s} (−1)^i 2^{−2s} (d + 3 − 2i)^d / (i! (d + 3 − i)!) ·
 *            Σ_{|β| = s−i} f( (2β_0+1)/(d+3−2i), …, (2β_3+1)/(d+3−2i) )   (barycentric)
 * Few points, but some weights are negative: prefer conicalRule for positive integrands.
 */
export function grundmannMollerRule(s: number): TetRule {
  const d = 2 * s + 1;
  const pts: number[][] = [];
  const w: number[] = [];
  for (let i = 0; i <= s; i++) {
    const m = s - i;
    const den = d + 3 - 2 * i;
    const wi = ((i % 2 === 0 ? 1 : -1) * Math.pow(2, -2 * s) * Math.pow(den, d)) / (factorial(i) * factorial(d + 3 - i));
    // all β ∈ ℕ⁴ with |β| = m, in lexicographic order (deterministic)
    for (let b1 = 0; b1 <= m; b1++) {
      for (let b2 = 0; b2 <= m - b1; b2++) {
        for (let b3 = 0; b3 <= m - b1 - b2; b3++) {
          pts.push([(2 * b1 + 1) / den, (2 * b2 + 1) / den, (2 * b3 + 1) / den]);
          w.push(wi);
        }
      }
    }
  }
  return ruleFromPoints(d, pts, w);
}

/**
 * The fully symmetric 15-point rule of degree 5 with positive weights (Keast, "Moderate-degree
 * tetrahedral quadrature formulas", Comput. Methods Appl. Mech. Eng. 55 (1986), rule with 15
 * points; values from memory, verified by the monomial test): the centroid, two 4-point orbits
 * (a, a, a, 1−3a) and one 6-point orbit (c, c, d, d) of barycentric coordinates.
 */
function symmetric15(): TetRule {
  const pts: number[][] = [];
  const w: number[] = [];
  const add = (l: number[], weight: number): void => {
    pts.push([l[1], l[2], l[3]]);
    w.push(weight);
  };
  add([0.25, 0.25, 0.25, 0.25], 0.01975308641975309);
  for (const [a, weight] of [[0.09197107805272303, 0.01198951396316977], [0.3197936278296299, 0.0115113678710454]]) {
    const b = 1 - 3 * a;
    for (let k = 0; k < 4; k++) add([0, 1, 2, 3].map((i) => (i === k ? b : a)), weight);
  }
  const c = 0.05635083268962916, dd = 0.4436491673103708;
  for (let i = 0; i < 4; i++) {
    for (let j = i + 1; j < 4; j++) add([0, 1, 2, 3].map((k) => (k === i || k === j ? c : dd)), 0.008818342151675485);
  }
  return ruleFromPoints(5, pts, w);
}

const ruleCache = new Map<number, TetRule>();

/**
 * The default rule of a given exact degree, all weights positive:
 *   degree ≤ 1: the centroid;
 *   degree 2: the symmetric 4-point rule with λ = (5 ± 3√5)/20 (Hammer, Marlowe & Stroud,
 *             Math. Tables Aids Comput. 10 (1956));
 *   degree 3–5: the symmetric 15-point rule of degree 5 (Keast 1986);
 *   degree ≥ 6: the conical product rule.
 * Rules are cached and must not be modified.
 */
export function tetQuadrature(degree: number): TetRule {
  const d = Math.max(1, Math.floor(degree));
  const hit = ruleCache.get(d);
  if (hit) return hit;
  let rule: TetRule;
  if (d === 1) {
    rule = ruleFromPoints(1, [[0.25, 0.25, 0.25]], [1 / 6]);
  } else if (d === 2) {
    const a = (5 + 3 * Math.sqrt(5)) / 20;
    const b = (5 - Math.sqrt(5)) / 20;
    rule = ruleFromPoints(2, [[b, b, b], [a, b, b], [b, a, b], [b, b, a]], [1 / 24, 1 / 24, 1 / 24, 1 / 24]);
  } else if (d <= 5) {
    rule = symmetric15();
  } else {
    rule = conicalRule(d);
  }
  ruleCache.set(d, rule);
  return rule;
}
