/**
 * The layered far-field check with multipole walls beyond order 0 (issue 11): the bound of
 * geometry/farfield/layered.ts must cover the true wall error of the boundary values the solver
 * uses (geometry/fem/boundary.ts layeredBoundaryValues, same order), for the anisotropic envelope,
 * whose quadrupole and hexadecapole do not vanish.
 *
 * The true potential in two dielectric half-spaces comes from Jackson, Classical Electrodynamics
 * 3rd ed., §4.4: in the source's medium (1/ε₁)[ψ(x − p) + q′ ψ(x − p′)], q′ = (ε₁ − ε₂)/(ε₁ + ε₂),
 * p′ the mirror point; in the other medium (2/(ε₁ + ε₂)) ψ(x − p). ψ is the density's own exact
 * potential (the registry's ellipsoid potential, geometry/density), and the mirrored anisotropic
 * density is the same density (it is symmetric in z), so this needs no multipole algebra.
 * Sampling the walls finds a lower estimate of the true maximum: a bound below it is wrong.
 */
import { describe, expect, it } from 'vitest';
import type { Boundary, Design, Orbital, Vec3 } from '../../../geometry/design/types';
import { layeredContext, layeredSiteBound, siteImage, siteProfile } from '../../../geometry/farfield/layered';
import { neglectedEnvelope } from '../../../geometry/farfield/envelope';
import { layeredBoundaryValues } from '../../../geometry/fem/boundary';
import { planarStack } from '../../../geometry/host';
import { potentialAt } from '../../../geometry/density';
import { siliconDesign } from '../design-fixtures';

const EPS_SI = 11.7; // Sze & Ng appendix, from memory
const EPS_VAC = 1;
const ORB: Orbital = { model: 'anisotropic-1s', radiusNm: 1.5, radiusZNm: 0.8 };
const SITE: Vec3 = [0.3, -0.2, -6.5];
const CENTER: Vec3 = [0, 0, -3.5];
const HALF: Vec3 = [8, 8, 8];
const LAYERS = [
  { name: 'silicon', epsilonR: EPS_SI, zMinNm: null, zMaxNm: 0 },
  { name: 'vacuum', epsilonR: EPS_VAC, zMinNm: 0, zMaxNm: null },
];

function design(boundary: Boundary): Design {
  const d = siliconDesign({
    name: 'Invented buried donor under a bare surface',
    host: { epsilonR: EPS_SI },
    sites: [{ id: 's', species: 'P', position: SITE, electrons: 1, orbital: ORB }],
    domain: { center: CENTER, halfExtentsNm: HALF, boundary },
    refinement: { order: 2, targetRelError: 1e-3, maxElements: 1_000_000 },
  });
  d.host.layers = LAYERS;
  return d;
}

function exactPotential(p: Vec3): number {
  const psi = (src: Vec3) => potentialAt(ORB, src, p[0], p[1], p[2]);
  if (p[2] < 0) return (psi(SITE) + ((EPS_SI - EPS_VAC) / (EPS_SI + EPS_VAC)) * psi([SITE[0], SITE[1], -SITE[2]])) / EPS_SI;
  return (2 / (EPS_SI + EPS_VAC)) * psi(SITE);
}

/** Wall points: a 24 × 24 grid per face and fine lines through each face's point nearest the site. */
function wallPoints(): Float64Array {
  const pts: number[] = [];
  for (let axis = 0; axis < 3; axis++)
    for (const sgn of [-1, 1]) {
      const u = (axis + 1) % 3, v = (axis + 2) % 3;
      const add = (a: number, b: number) => {
        const p = [0, 0, 0];
        p[axis] = CENTER[axis] + sgn * HALF[axis];
        p[u] = Math.min(CENTER[u] + HALF[u], Math.max(CENTER[u] - HALF[u], a));
        p[v] = Math.min(CENTER[v] + HALF[v], Math.max(CENTER[v] - HALF[v], b));
        if (Math.abs(p[2]) < 1e-3) p[2] = -1e-3; // not on the interface
        pts.push(p[0], p[1], p[2]);
      };
      const n = 24;
      for (let i = 0; i <= n; i++) for (let j = 0; j <= n; j++) add(CENTER[u] - HALF[u] + (2 * HALF[u] * i) / n, CENTER[v] - HALF[v] + (2 * HALF[v] * j) / n);
      for (let t = -60; t <= 60; t++) {
        add(SITE[u] + t / 20, SITE[v]);
        add(SITE[u], SITE[v] + t / 20);
      }
    }
  return Float64Array.from(pts);
}

describe('layered multipole bound ≥ true wall error of the same order (anisotropic envelope, Jackson §4.4)', () => {
  const stack = planarStack(LAYERS).stack!;
  const pts = wallPoints();
  const np = pts.length / 3;
  const exact = new Float64Array(np);
  for (let i = 0; i < np; i++) exact[i] = exactPotential([pts[3 * i], pts[3 * i + 1], pts[3 * i + 2]]);

  const rows = [0, 2, 4].map((order) => {
    const boundary: Boundary = { kind: 'multipole', order };
    const w = layeredBoundaryValues(stack, SITE, pts, new Uint8Array(np).fill(1), { orbital: ORB, boundary });
    let err = 0;
    for (let i = 0; i < np; i++) err = Math.max(err, Math.abs(w.g![i] - exact[i]));
    const d = design(boundary);
    const ctx = layeredContext({ epsilonR: EPS_SI, layers: d.host.layers, domain: d.domain }, [SITE[2]]);
    const img = siteImage(ctx, { position: SITE, orbital: ORB });
    const b = layeredSiteBound(ctx, SITE, siteProfile(ORB, boundary), neglectedEnvelope(ORB, boundary), boundary, img.leak);
    return { order, err, bound: b };
  });

  for (const r of rows)
    it(`order ${r.order}: rigorous, covers the sampled error, and within 3× of it`, () => {
      expect(r.bound.kind).toBe('rigorous');
      expect(r.bound.delta).toBeGreaterThanOrEqual(r.err);
      expect(r.bound.delta).toBeLessThan(3 * r.err);
    });

  it('raising the order lowers both the true wall error and the bound (check and solver keep the same orders)', () => {
    expect(rows[1].err).toBeLessThan(0.5 * rows[0].err);
    expect(rows[2].err).toBeLessThan(rows[1].err);
    expect(rows[1].bound.delta).toBeLessThan(0.5 * rows[0].bound.delta);
    expect(rows[2].bound.delta).toBeLessThan(rows[1].bound.delta);
  });
});
