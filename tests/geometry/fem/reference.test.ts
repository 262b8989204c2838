import { describe, expect, it } from 'vitest';
import {
  REF_VERTICES, TET_EDGES, P2_REF_NODES, P2_STIFFNESS_TENSOR, SYM4_INDEX, GEOM_SIZE, conicalRule, grundmannMollerRule,
  gaussLegendre01, p1Basis, p2Basis, p2RefGradients, tetGeometry, tetQuadrature, type TetRule,
} from '../../../geometry/fem/reference';

const fact = (n: number): number => (n <= 1 ? 1 : n * fact(n - 1));

/** ∫_T x^a y^b z^c over the unit reference tetrahedron = a! b! c! / (a+b+c+3)! (Dirichlet integral, standard). */
const exactMonomial = (a: number, b: number, c: number): number => (fact(a) * fact(b) * fact(c)) / fact(a + b + c + 3);

function applyRule(rule: TetRule, f: (x: number, y: number, z: number) => number): number {
  let s = 0;
  for (let q = 0; q < rule.n; q++) s += rule.weights[q] * f(rule.points[3 * q], rule.points[3 * q + 1], rule.points[3 * q + 2]);
  return s;
}

function worstMonomialError(rule: TetRule, degree: number): number {
  let worst = 0;
  for (let a = 0; a <= degree; a++) {
    for (let b = 0; a + b <= degree; b++) {
      for (let c = 0; a + b + c <= degree; c++) {
        const got = applyRule(rule, (x, y, z) => x ** a * y ** b * z ** c);
        const exact = exactMonomial(a, b, c);
        worst = Math.max(worst, Math.abs(got - exact) / exact);
      }
    }
  }
  return worst;
}

describe('quadrature on the reference tetrahedron', () => {
  // Source: ∫ x^a y^b z^c = a! b! c!/(a+b+c+3)! over the unit tetrahedron (standard Dirichlet integral).
  it('default rules integrate every monomial up to their degree exactly', () => {
    for (let d = 1; d <= 10; d++) {
      const rule = tetQuadrature(d);
      expect(rule.degree).toBeGreaterThanOrEqual(d);
      expect(worstMonomialError(rule, d)).toBeLessThan(1e-13);
      for (const w of rule.weights) expect(w).toBeGreaterThan(0); // positive rules
    }
  });

  it('degrees 3 to 5 use the 15-point symmetric rule (Keast 1986), exact to degree 5 but not 6', () => {
    for (const d of [3, 4, 5]) expect(tetQuadrature(d).n).toBe(15);
    expect(worstMonomialError(tetQuadrature(5), 6)).toBeGreaterThan(1e-6);
  });

  it('default rules are not exact one degree beyond (the check can fail)', () => {
    // the centroid rule misses ∫x² = 2/5! = 1/60
    expect(worstMonomialError(tetQuadrature(1), 2)).toBeGreaterThan(1e-3);
    expect(worstMonomialError(tetQuadrature(2), 3)).toBeGreaterThan(1e-3);
  });

  // Source: Grundmann & Möller, SIAM J. Numer. Anal. 15 (1978): index s is exact for degree 2s+1.
  it('Grundmann–Möller rules are exact to degree 2s+1', () => {
    for (let s = 0; s <= 4; s++) {
      const rule = grundmannMollerRule(s);
      expect(rule.degree).toBe(2 * s + 1);
      expect(worstMonomialError(rule, 2 * s + 1)).toBeLessThan(1e-12);
      expect(worstMonomialError(rule, 2 * s + 2)).toBeGreaterThan(1e-8);
    }
  });

  it('conical product rules are exact to their degree with positive weights', () => {
    for (const d of [3, 5, 8, 12]) {
      const rule = conicalRule(d);
      expect(worstMonomialError(rule, d)).toBeLessThan(1e-12);
      for (const w of rule.weights) expect(w).toBeGreaterThan(0);
    }
  });

  // Source: Abramowitz & Stegun 25.4.29 — the 3-point Gauss–Legendre nodes are 1/2 ± √(3/5)/2, weights 5/18, 8/18.
  it('Gauss–Legendre nodes match the tabulated 3-point rule', () => {
    const g = gaussLegendre01(3);
    expect(g.x[0]).toBeCloseTo(0.5 - Math.sqrt(0.6) / 2, 14);
    expect(g.x[1]).toBeCloseTo(0.5, 14);
    expect(g.w[0]).toBeCloseTo(5 / 18, 14);
    expect(g.w[1]).toBeCloseTo(8 / 18, 14);
  });
});

describe('Lagrange basis on the reference tetrahedron', () => {
  it('P1 and P2 basis functions are nodal (Kronecker delta) and sum to one', () => {
    const v = new Float64Array(10);
    for (let i = 0; i < 4; i++) {
      p1Basis(REF_VERTICES[3 * i], REF_VERTICES[3 * i + 1], REF_VERTICES[3 * i + 2], v);
      for (let j = 0; j < 4; j++) expect(v[j]).toBe(i === j ? 1 : 0);
    }
    for (let i = 0; i < 10; i++) {
      p2Basis(P2_REF_NODES[3 * i], P2_REF_NODES[3 * i + 1], P2_REF_NODES[3 * i + 2], v);
      for (let j = 0; j < 10; j++) expect(v[j]).toBeCloseTo(i === j ? 1 : 0, 15);
    }
    p2Basis(0.1, 0.2, 0.3, v);
    expect(v.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 14);
  });

  it('P2 edge nodes sit at the midpoints of the VTK-ordered edges', () => {
    for (let e = 0; e < 6; e++) {
      const [a, b] = TET_EDGES[e];
      for (let k = 0; k < 3; k++) {
        expect(P2_REF_NODES[3 * (4 + e) + k]).toBe(0.5 * (REF_VERTICES[3 * a + k] + REF_VERTICES[3 * b + k]));
      }
    }
  });

  it('P2 gradients match central differences of the basis values', () => {
    const g = new Float64Array(30), p = new Float64Array(10), m = new Float64Array(10);
    const x = 0.21, y = 0.17, z = 0.33, h = 1e-6;
    p2RefGradients(x, y, z, g);
    for (let axis = 0; axis < 3; axis++) {
      const d = [0, 0, 0];
      d[axis] = h;
      p2Basis(x + d[0], y + d[1], z + d[2], p);
      p2Basis(x - d[0], y - d[1], z - d[2], m);
      for (let i = 0; i < 10; i++) expect(g[3 * i + axis]).toBeCloseTo((p[i] - m[i]) / (2 * h), 8);
    }
  });

  it('the exact P2 stiffness tensor equals quadrature of the gradients (reference element)', () => {
    // On the reference element G_pq = ∇λ_p·∇λ_q with ∇λ_0 = (−1,−1,−1), ∇λ_k = e_k.
    const gl = [[-1, -1, -1], [1, 0, 0], [0, 1, 0], [0, 0, 1]];
    const G = new Float64Array(10);
    for (let p = 0; p < 4; p++) for (let q = p; q < 4; q++) G[SYM4_INDEX[p][q]] = gl[p][0] * gl[q][0] + gl[p][1] * gl[q][1] + gl[p][2] * gl[q][2];
    const rule = tetQuadrature(2); // gradients are linear: products are quadratic
    const gr = new Float64Array(30);
    for (let i = 0; i < 10; i++) {
      for (let j = 0; j < 10; j++) {
        let quad = 0;
        for (let q = 0; q < rule.n; q++) {
          p2RefGradients(rule.points[3 * q], rule.points[3 * q + 1], rule.points[3 * q + 2], gr);
          quad += rule.weights[q] * (gr[3 * i] * gr[3 * j] + gr[3 * i + 1] * gr[3 * j + 1] + gr[3 * i + 2] * gr[3 * j + 2]);
        }
        let tensor = 0;
        for (let s = 0; s < 10; s++) tensor += P2_STIFFNESS_TENSOR[(i * 10 + j) * 10 + s] * G[s];
        expect(tensor / 6).toBeCloseTo(quad, 13); // |T_ref| = 1/6
      }
    }
  });
});

describe('element geometry', () => {
  it('physical barycentric gradients satisfy ∇λ_i·(p_j − p_0) = δ_ij − δ_i0 and the volume is |det|/6', () => {
    const coords = new Float64Array([0.3, -0.2, 0.1, 1.4, 0.1, -0.3, 0.2, 0.9, 0.4, -0.1, 0.3, 1.2]);
    const g = new Float64Array(GEOM_SIZE);
    for (const order of [[0, 1, 2, 3], [0, 2, 1, 3]]) {
      const det = tetGeometry(coords, order[0], order[1], order[2], order[3], g);
      for (let i = 0; i < 4; i++) {
        for (let j = 1; j < 4; j++) {
          let s = 0;
          for (let k = 0; k < 3; k++) s += g[3 * i + k] * (coords[3 * order[j] + k] - coords[3 * order[0] + k]);
          expect(s).toBeCloseTo((i === j ? 1 : 0) - (i === 0 ? 1 : 0), 13);
        }
      }
      expect(g[12]).toBeCloseTo(Math.abs(det) / 6, 15);
    }
    // volume by the scalar triple product, computed independently
    const u = [1.1, 0.3, -0.4], v = [-0.1, 1.1, 0.3], w = [-0.4, 0.5, 1.1];
    const triple = u[0] * (v[1] * w[2] - v[2] * w[1]) - u[1] * (v[0] * w[2] - v[2] * w[0]) + u[2] * (v[0] * w[1] - v[1] * w[0]);
    tetGeometry(coords, 0, 1, 2, 3, g);
    expect(g[12]).toBeCloseTo(Math.abs(triple) / 6, 14);
  });
});
