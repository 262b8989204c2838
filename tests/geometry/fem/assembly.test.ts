import { describe, expect, it } from 'vitest';
import { uniformBox, gradedBox } from './multigrid-fixture';
import { buildSpace } from '../../../geometry/fem/space';
import {
  applyDirichlet, applyDirichletRhs, assembleLoad, assembleMass, assembleStiffness, assembleSystem, feIntegrate, integrate, interpolate,
} from '../../../geometry/fem/assemble';
import { asymmetry, diagonal, spmv } from '../../../geometry/fem/csr';
import { pcg } from '../../../geometry/fem/pcg';
import { multigridPreconditioner } from '../../../geometry/fem/multigrid';

const coarse = uniformBox(2, 0.5, 3); // [0,1]³, 384 tets
const graded = gradedBox(2, 0.5, [0.31, 0.57, 0.44], 0.03, 0.6);

function maxAbsInterior(r: Float64Array, boundary: Uint8Array): number {
  let w = 0;
  for (let i = 0; i < r.length; i++) if (!boundary[i]) w = Math.max(w, Math.abs(r[i]));
  return w;
}

describe('stiffness assembly', () => {
  for (const order of [1, 2] as const) {
    it(`P${order}: symmetric, rows sum to zero, positive diagonal`, () => {
      for (const mesh of [coarse, graded]) {
        const space = buildSpace(mesh, order);
        const A = assembleStiffness(space, [11.7]);
        expect(asymmetry(A)).toBeLessThan(1e-12);
        // constants are in the kernel of the Neumann stiffness: ∇1 = 0
        const ones = new Float64Array(space.nDofs).fill(1);
        const r = new Float64Array(space.nDofs);
        spmv(A, ones, r);
        const scale = Math.max(...diagonal(A));
        for (const v of r) expect(Math.abs(v)).toBeLessThan(1e-12 * scale);
        for (const d of diagonal(A)) expect(d).toBeGreaterThan(0);
      }
    });

    it(`P${order}: patch test — linear fields give zero residual at interior dofs`, () => {
      // Galerkin orthogonality for u ∈ V_h with Δu = 0: (∇u, ∇φ_i) = 0 for interior φ_i (Green's formula).
      for (const mesh of [coarse, graded]) {
        const space = buildSpace(mesh, order);
        const A = assembleStiffness(space, [2.5]);
        const u = interpolate(space, (x, y, z) => 0.7 + 2 * x - 1.3 * y + 0.4 * z);
        const r = new Float64Array(space.nDofs);
        spmv(A, u, r);
        expect(maxAbsInterior(r, space.boundaryDof)).toBeLessThan(1e-12);
      }
    });
  }

  it('Dirichlet-lifted stiffness is positive definite: xᵀAx > 0 for interior vectors', () => {
    for (const order of [1, 2] as const) {
      const space = buildSpace(graded, order);
      const { A } = applyDirichlet(assembleStiffness(space, [11.7]), new Float64Array(space.nDofs), space.boundaryDof);
      let seed = 7;
      for (let trial = 0; trial < 5; trial++) {
        const x = Float64Array.from({ length: space.nDofs }, () => ((seed = (seed * 16807) % 2147483647) / 2147483647) - 0.5);
        const Ax = new Float64Array(space.nDofs);
        spmv(A, x, Ax);
        expect(x.reduce((s, v, i) => s + v * Ax[i], 0)).toBeGreaterThan(0);
      }
    }
  });

  it('boundary dofs are exactly the nodes on the box surface (P1 and P2)', () => {
    for (const order of [1, 2] as const) {
      const space = buildSpace(graded, order);
      for (let i = 0; i < space.nDofs; i++) {
        let onSurface = false;
        for (let k = 0; k < 3; k++) {
          const c = space.dofCoords[3 * i + k];
          if (c === 0 || c === 1) onSurface = true;
        }
        expect(space.boundaryDof[i]).toBe(onSurface ? 1 : 0);
      }
    }
  });

  it('P2 reproduces a quadratic exactly: −Δu = −6 with u = x² + y² + z²', () => {
    // u is in the P2 space, so the Galerkin solution equals u at every node (Céa's lemma: zero best-approximation error).
    for (const mesh of [coarse, graded]) {
      const space = buildSpace(mesh, 2);
      const exact = (x: number, y: number, z: number): number => x * x + y * y + z * z;
      const { A, b } = assembleSystem(space, [1], { load: () => -6 });
      const g = interpolate(space, exact);
      const sys = applyDirichlet(A, b, space.boundaryDof, g);
      const res = pcg(sys.A, sys.b, null, { preconditioner: multigridPreconditioner(space, sys.A), tol: 1e-14 });
      let worst = 0;
      for (let i = 0; i < space.nDofs; i++) worst = Math.max(worst, Math.abs(res.x[i] - g[i]));
      expect(worst).toBeLessThan(1e-11);
    }
  });

  it('P1 does not reproduce the same quadratic (the previous check can fail)', () => {
    const space = buildSpace(coarse, 1);
    const exact = (x: number, y: number, z: number): number => x * x + y * y + z * z;
    const { A, b } = assembleSystem(space, [1], { load: () => -6 });
    const sys = applyDirichlet(A, b, space.boundaryDof, interpolate(space, exact));
    const res = pcg(sys.A, sys.b, null, { tol: 1e-14 });
    let worst = 0;
    for (let i = 0; i < space.nDofs; i++) worst = Math.max(worst, Math.abs(res.x[i] - exact(space.dofCoords[3 * i], space.dofCoords[3 * i + 1], space.dofCoords[3 * i + 2])));
    expect(worst).toBeGreaterThan(1e-4);
  });

  it('ε per region scales the element contributions', () => {
    const space = buildSpace(coarse, 1);
    const A1 = assembleStiffness(space, [1]);
    const A2 = assembleStiffness(space, [11.7]);
    for (let k = 0; k < A1.vals.length; k++) expect(A2.vals[k]).toBeCloseTo(11.7 * A1.vals[k], 12);
    expect(() => assembleStiffness(space, [0])).toThrow(/permittivity/);
  });
});

describe('determinism', () => {
  it('two builds of the same space and system give byte-identical arrays; inputs are not modified', () => {
    const bytes = (a: ArrayBufferView): Buffer => Buffer.from(a.buffer, a.byteOffset, a.byteLength);
    const make = (): { s: ReturnType<typeof buildSpace>; A: ReturnType<typeof assembleSystem>['A']; b: Float64Array } => {
      const s = buildSpace(gradedBox(2, 0.5, [0.31, 0.57, 0.44], 0.03, 0.6), 2);
      const { A, b } = assembleSystem(s, [11.7], { load: (x, y, z) => Math.exp(-x - 2 * y - 3 * z) });
      return { s, A, b };
    };
    const one = make();
    const two = make();
    for (const k of ['dofCoords', 'tetDofs', 'boundaryDof', 'edges', 'tetEdges'] as const) {
      expect(bytes(one.s[k]).equals(bytes(two.s[k]))).toBe(true);
    }
    for (const k of ['rowPtr', 'cols', 'vals'] as const) expect(bytes(one.A[k]).equals(bytes(two.A[k]))).toBe(true);
    expect(bytes(one.b).equals(bytes(two.b))).toBe(true);
    const valsBefore = Buffer.from(bytes(one.A.vals));
    const bBefore = Buffer.from(bytes(one.b));
    applyDirichlet(one.A, one.b, one.s.boundaryDof, new Float64Array(one.s.nDofs).fill(2));
    expect(bytes(one.A.vals).equals(valsBefore)).toBe(true);
    expect(bytes(one.b).equals(bBefore)).toBe(true);
  });
});

describe('mass, load and integrals', () => {
  for (const order of [1, 2] as const) {
    it(`P${order}: 1ᵀ M 1 = volume, Σ load of f = 1 is the volume, ∫ of a cubic is exact`, () => {
      const space = buildSpace(graded, order);
      const M = assembleMass(space);
      const ones = new Float64Array(space.nDofs).fill(1);
      const Mo = new Float64Array(space.nDofs);
      spmv(M, ones, Mo);
      expect(Mo.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12); // the unit cube
      expect(assembleLoad(space, () => 1).reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
      // ∫_[0,1]³ x y² z³ = 1/2 · 1/3 · 1/4 (Fubini)
      expect(integrate(space, (x, y, z) => x * y * y * z * z * z, 6)).toBeCloseTo(1 / 24, 13);
      expect(asymmetry(M)).toBeLessThan(1e-15);
    });
  }

  it('feIntegrate recovers the value and gradient of an interpolated P2 quadratic', () => {
    const space = buildSpace(coarse, 2);
    const u = interpolate(space, (x, y, z) => x * x - y * z);
    // ∫ |∇u|² = ∫ 4x² + z² + y² = 4/3 + 1/3 + 1/3 over [0,1]³
    const energy = feIntegrate(space, u, 2, (_x, _y, _z, _uh, gx, gy, gz) => gx * gx + gy * gy + gz * gz);
    expect(energy).toBeCloseTo(2, 12);
    const mean = feIntegrate(space, u, 2, (_x, _y, _z, uh) => uh);
    expect(mean).toBeCloseTo(1 / 3 - 1 / 4, 12);
  });
});

describe('Dirichlet lifting', () => {
  it('keeps symmetry, gives unit boundary rows and moves the known values to the right-hand side', () => {
    const space = buildSpace(coarse, 2);
    const { A, b } = assembleSystem(space, [3], { load: (x) => x });
    const g = interpolate(space, (x, y) => x + 2 * y);
    const sys = applyDirichlet(A, b, space.boundaryDof, g);
    expect(asymmetry(sys.A)).toBe(0);
    // for the exact discrete solution x: A x = b on interior rows, x = g on the boundary
    // (starting from x0 = g keeps the boundary values bit-exact: their residual rows stay zero)
    const res = pcg(sys.A, sys.b, g, { tol: 1e-13 });
    for (let i = 0; i < space.nDofs; i++) if (space.boundaryDof[i]) expect(res.x[i]).toBe(g[i]);
    const Ax = new Float64Array(space.nDofs);
    spmv(A, res.x, Ax);
    let worst = 0;
    for (let i = 0; i < space.nDofs; i++) if (!space.boundaryDof[i]) worst = Math.max(worst, Math.abs(Ax[i] - b[i]));
    expect(worst).toBeLessThan(1e-9 * Math.max(...b.map(Math.abs)));
    // the right-hand-side-only lifting gives the same vector
    const rhs = applyDirichletRhs(A, b, space.boundaryDof, g);
    for (let i = 0; i < space.nDofs; i++) expect(rhs[i]).toBe(sys.b[i]);
  });
});

describe('convergence on a smooth manufactured solution', () => {
  // u = sin πx sin πy sin πz on [0,1]³, −Δu = 3π² u, u = 0 on the boundary.
  // Source: standard a-priori estimates for Lagrange elements of degree p (Ciarlet, The Finite Element
  // Method for Elliptic Problems, 1978, Thm 3.2.2 and §3.2 Aubin–Nitsche): |u − u_h|_1 = O(h^p),
  // ‖u − u_h‖_0 = O(h^(p+1)). Three uniform bisection generations halve h.
  const PI = Math.PI;
  const u = (x: number, y: number, z: number): number => Math.sin(PI * x) * Math.sin(PI * y) * Math.sin(PI * z);
  const grad = (x: number, y: number, z: number): [number, number, number] => [
    PI * Math.cos(PI * x) * Math.sin(PI * y) * Math.sin(PI * z),
    PI * Math.sin(PI * x) * Math.cos(PI * y) * Math.sin(PI * z),
    PI * Math.sin(PI * x) * Math.sin(PI * y) * Math.cos(PI * z),
  ];
  function errors(order: 1 | 2, times: number): { h1: number; l2: number } {
    const mesh = uniformBox(1, 1, times);
    const space = buildSpace(mesh, order);
    const { A, b } = assembleSystem(space, [1], { load: (x, y, z) => 3 * PI * PI * u(x, y, z), degree: 2 * order + 3 });
    const sys = applyDirichlet(A, b, space.boundaryDof);
    const res = pcg(sys.A, sys.b, null, { preconditioner: multigridPreconditioner(space, sys.A), tol: 1e-12 });
    const h1 = feIntegrate(space, res.x, 2 * order + 3, (x, y, z, _uh, gx, gy, gz) => {
      const [ex, ey, ez] = grad(x, y, z);
      return (gx - ex) ** 2 + (gy - ey) ** 2 + (gz - ez) ** 2;
    });
    const l2 = feIntegrate(space, res.x, 2 * order + 3, (x, y, z, uh) => (uh - u(x, y, z)) ** 2);
    return { h1: Math.sqrt(h1), l2: Math.sqrt(l2) };
  }
  for (const [order, levels] of [[1, [9, 12]], [2, [6, 9]]] as const) {
    it(`P${order}: observed orders ${order} in H1 and ${order + 1} in L2`, () => {
      const [a, b] = levels.map((t) => errors(order, t));
      const rateH1 = Math.log2(a.h1 / b.h1);
      const rateL2 = Math.log2(a.l2 / b.l2);
      expect(rateH1).toBeGreaterThan(order - 0.15);
      expect(rateH1).toBeLessThan(order + 0.3);
      expect(rateL2).toBeGreaterThan(order + 1 - 0.2);
      expect(rateL2).toBeLessThan(order + 1 + 0.4);
    });
  }
});
