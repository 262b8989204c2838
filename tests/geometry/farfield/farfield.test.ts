import { describe, expect, it } from 'vitest';
import type { Design, Orbital, Vec3 } from '../../../geometry/design/types';
import {
  clearanceFor,
  farFieldCheck,
  harmonicCount,
  irregularHarmonics,
  multipolePotential,
  neglectedEnvelope,
  orbitalMoments,
  regularHarmonics,
} from '../../../geometry/farfield';
import { anisotropicNeglected } from '../../../geometry/farfield/envelope';
import { axialMoment, densityAt, orbitalScale, radialTail, gaussLegendre, legendreP, potentialAt, radialPotential, selfEnergy } from '../../../geometry/density';
import { mulberry32 } from '../../../geometry/arrays';
import { COULOMB_EV_NM, SI_LATTICE_CONSTANT_NM } from '../../../geometry/units';
import { siliconDesign } from '../design-fixtures';

const H: Orbital = { model: 'hydrogenic-1s', radiusNm: 2.5 };
const A: Orbital = { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 };
const G: Orbital = { model: 'gaussian', sigmaNm: 1.5 };

function design(sites: Design['sites'], half: Vec3, boundary: Design['domain']['boundary'], tol = 1e-3): Design {
  return siliconDesign({
    name: 'test',
    sites,
    domain: { center: [0, 0, 0], halfExtentsNm: half, boundary },
    refinement: { order: 2, targetRelError: tol, maxElements: 2_000_000 },
  });
}

/** ∫ρ f by cubature in spherical coordinates about the site (independent of the moment code). */
function cubature(o: Orbital, c: Vec3, f: (x: number, y: number, z: number) => number): number {
  const gr = gaussLegendre(32), gm = gaussLegendre(24);
  const nphi = 24;
  const edges = [0, 2, 6, 15, 40, 80];
  let s = 0;
  for (let p = 0; p + 1 < edges.length; p++) {
    const h = (edges[p + 1] - edges[p]) / 2;
    for (let i = 0; i < gr.nodes.length; i++) {
      const r = edges[p] + h * (gr.nodes[i] + 1);
      for (let j = 0; j < gm.nodes.length; j++) {
        const mu = gm.nodes[j], st = Math.sqrt(1 - mu * mu);
        for (let k = 0; k < nphi; k++) {
          const ph = (2 * Math.PI * k) / nphi;
          const x = c[0] + r * st * Math.cos(ph), y = c[1] + r * st * Math.sin(ph), z = c[2] + r * mu;
          s += h * gr.weights[i] * gm.weights[j] * ((2 * Math.PI) / nphi) * r * r * densityAt(o, c, x, y, z) * f(x, y, z);
        }
      }
    }
  }
  return s;
}

describe('real solid harmonics (Racah normalisation)', () => {
  const rnd = mulberry32(7);
  it('satisfy the addition theorem Σ_m R_lm(a)R_lm(b) = |a|^l|b|^l P_l(cos γ) (Jackson eq. 3.68 in real form)', () => {
    const ra = new Float64Array(25), rb = new Float64Array(25);
    for (let t = 0; t < 50; t++) {
      const a: Vec3 = [rnd() - 0.5, rnd() - 0.5, rnd() - 0.5];
      const b: Vec3 = [rnd() - 0.5, rnd() - 0.5, rnd() - 0.5];
      regularHarmonics(...a, 4, ra);
      regularHarmonics(...b, 4, rb);
      const na = Math.hypot(...a), nb = Math.hypot(...b);
      const cg = (a[0] * b[0] + a[1] * b[1] + a[2] * b[2]) / (na * nb);
      for (let l = 0; l <= 4; l++) {
        let s = 0;
        for (let m = -l; m <= l; m++) s += ra[l * l + l + m] * rb[l * l + l + m];
        expect(s).toBeCloseTo(na ** l * nb ** l * legendreP(l, cg), 13);
      }
    }
  });
  it('are harmonic (Laplacian by the 5-point 4th-order difference, exact for polynomials of degree ≤ 5)', () => {
    const h = 0.1;
    const f = (x: number, y: number, z: number) => regularHarmonics(x, y, z, 4, new Float64Array(25));
    const p: Vec3 = [0.3, -0.7, 0.5];
    const acc = new Float64Array(25);
    const c = f(...p);
    for (let axis = 0; axis < 3; axis++) {
      const at = (t: number) => f(p[0] + (axis === 0 ? t : 0), p[1] + (axis === 1 ? t : 0), p[2] + (axis === 2 ? t : 0));
      const m2 = at(-2 * h), m1 = at(-h), p1 = at(h), p2 = at(2 * h);
      for (let i = 0; i < 25; i++) acc[i] += (-m2[i] + 16 * m1[i] - 30 * c[i] + 16 * p1[i] - p2[i]) / (12 * h * h);
    }
    for (let i = 0; i < 25; i++) expect(Math.abs(acc[i])).toBeLessThan(1e-10);
  });
  it('expand 1/|x − y| = Σ R_lm(y) I_lm(x) with the truncation error of the Legendre series', () => {
    const y: Vec3 = [0.2, -0.1, 0.15];
    const x: Vec3 = [3, 1, -2];
    const Q = regularHarmonics(...y, 4, new Float64Array(25));
    const exact = 1 / Math.hypot(x[0] - y[0], x[1] - y[1], x[2] - y[2]);
    const approx = multipolePotential(Q, 4, [0, 0, 0], ...x);
    const t = Math.hypot(...y) / Math.hypot(...x);
    expect(Math.abs(approx - exact)).toBeLessThan((t ** 5 / (1 - t)) / Math.hypot(...x));
    expect(irregularHarmonics(2, 0, 0, 0, new Float64Array(1))[0]).toBe(0.5);
  });
});

describe('multipole moments of the densities', () => {
  it('a displaced spherical density has exactly the point-charge moments R_lm(d) (mean-value property; cubature check)', () => {
    const c: Vec3 = [1.2, -0.4, 2.1];
    const Q = orbitalMoments(H, c, [0, 0, 0], 4);
    const tmp = new Float64Array(25);
    for (const idx of [0, 2, 3, 6, 8, 12, 15, 20, 24]) {
      const num = cubature(H, c, (x, y, z) => regularHarmonics(x, y, z, 4, tmp)[idx]);
      expect(Math.abs(Q[idx] - num)).toBeLessThan(1e-7 * Math.max(1, Math.abs(num)));
    }
  });
  it('the anisotropic density about its centre has only the axial moments q_l, and displaced moments match cubature', () => {
    const Q0 = orbitalMoments(A, [0, 0, 0], [0, 0, 0], 4);
    for (let i = 0; i < harmonicCount(4); i++) {
      const l = Math.floor(Math.sqrt(i));
      const m = i - l * l - l;
      const expected = m === 0 ? axialMoment(A, l) : 0;
      expect(Math.abs(Q0[i] - expected)).toBeLessThan(1e-10 * Math.max(1, Math.abs(expected)));
    }
    const c: Vec3 = [0.8, 1.7, -0.6];
    const Q = orbitalMoments(A, c, [0.1, 0.2, 0.3], 4);
    const tmp = new Float64Array(25);
    for (const idx of [1, 5, 6, 10, 13, 18, 20, 22]) {
      const num = cubature(A, c, (x, y, z) => regularHarmonics(x - 0.1, y - 0.2, z - 0.3, 4, tmp)[idx]);
      expect(Math.abs(Q[idx] - num)).toBeLessThan(1e-7 * Math.max(1, Math.abs(num)));
    }
  });
});

describe('neglected-field envelopes', () => {
  it('grounded spherical envelope is the exact potential; multipole leaves only the penetrating tail 1/d − φ(d)', () => {
    for (const o of [H, G]) {
      const g = neglectedEnvelope(o, { kind: 'grounded' });
      const m = neglectedEnvelope(o, { kind: 'multipole', order: 2 });
      for (const d of [1, 4, 9]) {
        expect(g(d)).toBeCloseTo(radialPotential(o, d) as number, 14);
        // the reference 1/d − φ(d) cancels to ~e^{−2d/a} of 1/d, losing digits: 1e-6 is its own accuracy
        expect(Math.abs(m(d) / (1 / d - (radialPotential(o, d) as number)) - 1)).toBeLessThan(1e-6);
      }
    }
  });
  it('anisotropic envelope bounds |φ − truncated expansion| on a fine angular and radial sampling', () => {
    for (const L of [-1, 0, 2, 4]) {
      const env = neglectedEnvelope(A, L < 0 ? { kind: 'grounded' } : { kind: 'multipole', order: L });
      const q = new Float64Array(5);
      for (let l = 0; l <= 4; l += 2) q[l] = axialMoment(A, l);
      for (const d of [0.7, 2.3, 6.1, 15, 40, 130]) {
        let worst = 0;
        for (const r of [d, d * 1.03, d * 1.3, d * 2]) {
          for (let t = 0; t <= 512; t++) worst = Math.max(worst, anisotropicNeglected(A, L, q, r, Math.cos((Math.PI / 2) * (t / 512))));
        }
        expect(env(d)).toBeGreaterThanOrEqual(worst * (1 - 1e-9));
        // and not wildly loose near the table (the step in radius costs at most the grid ratio)
        if (d < 100) expect(env(d)).toBeLessThan(worst * 1.5 + 1e-300);
      }
    }
  });
  it('clearanceFor inverts the envelope: grounded hydrogenic needs d = 8a/(5 tol) (from φ ≈ 1/d and U = 5/(8a))', () => {
    const tol = 1e-3;
    const d = clearanceFor(neglectedEnvelope(H, { kind: 'grounded' }), tol * selfEnergy(H));
    expect(d / ((8 * 2.5) / (5 * tol)) - 1).toBeLessThan(1e-8);
    expect(d / ((8 * 2.5) / (5 * tol)) - 1).toBeGreaterThan(-1e-8);
  });
});

describe('far-field check', () => {
  it('centred spherical charge, grounded cube of half-width L: bound = e²/(4πε0 εr L) (Jackson ch. 2: exact shift in the inscribed grounded sphere, which bounds the cube by domain monotonicity)', () => {
    for (const L of [20, 50]) {
      const r = farFieldCheck(design([{ id: 'd1', species: 'P', position: [0, 0, 0], electrons: 1 }], [L, L, L], { kind: 'grounded' }));
      const jackson = COULOMB_EV_NM / (11.7 * L);
      // Newton: the spherical density's potential at L is at most 1/L, short of it by the tail (1 + L/a)e^{−2L/a}/L
      const tail = (1 + L / 2.5) * Math.exp((-2 * L) / 2.5);
      expect(r.sites[0].uBoundEv as number).toBeLessThanOrEqual(jackson);
      expect(r.sites[0].uBoundEv as number).toBeGreaterThanOrEqual(jackson * (1 - tail * 1.000001));
      expect(r.sites[0].uRelBound).toBeCloseTo((8 * 2.5) / (5 * L), 6);
      expect(r.warnings.map((w) => w.code)).toContain('boundary-too-close');
    }
  });
  it('the boundary-too-close words name the boundary in plain English (common practice: wording, not a number)', () => {
    const one: Design['sites'] = [{ id: 'd1', species: 'P', position: [0, 0, 0], electrons: 1 }];
    const mp = farFieldCheck(design(one, [5, 5, 5], { kind: 'multipole', order: 2 }));
    const wmp = mp.warnings.find((w) => w.code === 'boundary-too-close');
    expect(wmp?.message).toMatch(/^The multipole boundary \(order 2\) is too close/);
    const gr = farFieldCheck(design(one, [5, 5, 5], { kind: 'grounded' }));
    expect(gr.warnings.find((w) => w.code === 'boundary-too-close')?.message).toMatch(/^The grounded boundary is too close/);
    // the JSON field keeps its compact form (the CLI's --json contract)
    expect(mp.boundary).toBe('multipole(order 2)');
  });
  it('the recommended half-extents meet the tolerance (bound and density cut) and 1% less does not (monotone search)', () => {
    const sites: Design['sites'] = [
      { id: 'a', species: 'P', position: [-3.258612, 0, 0], electrons: 1 },
      { id: 'b', species: 'P', position: [3.258612, 0, 0], electrons: 1, orbital: A },
      { id: 'c', species: 'As', position: [0, 4.0732654, 1.0862041], electrons: 1, orbital: G },
    ];
    for (const boundary of [{ kind: 'grounded' as const }, { kind: 'multipole' as const, order: 2 }]) {
      const first = farFieldCheck(design(sites, [12, 12, 12], boundary, 1e-3));
      const rec = first.recommendedHalfExtentsNm;
      const ok = farFieldCheck(design(sites, rec, boundary, 1e-3));
      expect(ok.worstRelBound as number).toBeLessThanOrEqual(1e-3 * (1 + 1e-6));
      expect(ok.warnings.map((w) => w.code)).not.toContain('boundary-too-close');
      expect(ok.warnings.map((w) => w.code)).not.toContain('density-cut');
      const smaller = farFieldCheck(design(sites, rec.map((h) => h * 0.99) as Vec3, boundary, 1e-3));
      // the density criterion is the rigorous ball bound: tail beyond the clearance ≤ tol/10
      const orb = [H, A, G];
      const failed =
        (smaller.worstRelBound as number) > 1e-3 ||
        smaller.sites.some((s, i) => radialTail(orb[i].model, s.clearanceNm / orbitalScale(orb[i])) > 1e-4);
      expect(failed).toBe(true);
    }
  });
  it('pair bounds: grounded uses min(δi, δj), multipole max(δi, δj); relative to the closed-form V', () => {
    const sites: Design['sites'] = [
      { id: 'a', species: 'P', position: [0, 0, 0], electrons: 1 },
      { id: 'b', species: 'P', position: [10.862041, 0, 0], electrons: 1 },
    ];
    const g = farFieldCheck(design(sites, [40, 40, 40], { kind: 'grounded' }));
    const p = g.pairs[0];
    expect(p.vBoundEv).toBe(Math.min(g.sites[0].uBoundEv as number, g.sites[1].uBoundEv as number));
    // hydrogen-molecule Coulomb integral at w = R/a (see density tests), over εr
    const w = 10.862041 / 2.5;
    const J = (1 - Math.exp(-2 * w) * (1 + (11 * w) / 8 + (3 * w * w) / 4 + w ** 3 / 6)) / 10.862041;
    expect(p.vEv).toBeCloseTo((COULOMB_EV_NM * J) / 11.7, 12);
    expect(p.vRelBound).toBeCloseTo((p.vBoundEv as number) / p.vEv, 12);
    const m = farFieldCheck(design(sites, [40, 40, 40], { kind: 'multipole', order: 4 }));
    expect(m.pairs[0].vBoundEv).toBe(Math.max(m.sites[0].uBoundEv as number, m.sites[1].uBoundEv as number));
    // multipole bounds of spherical densities are the exponentially small tail: far below grounded
    expect(m.worstRelBound as number).toBeLessThan(1e-8 * (g.worstRelBound as number));
  });
  it('flags a site outside the box, a cut density, overlapping and coinciding sites, with stable codes', () => {
    const sites: Design['sites'] = [
      { id: 'in', species: 'P', position: [0, 0, 0], electrons: 1 },
      { id: 'near', species: 'P', position: [0.2715510, 0.2715510, 0], electrons: 1 },
      { id: 'out', species: 'P', position: [30, 0, 0], electrons: 1 },
      { id: 'edge', species: 'P', position: [0, 0, 9.5], electrons: 0 },
      { id: 'twin', species: 'P', position: [0, 0, 9.5], electrons: 1 },
    ];
    const r = farFieldCheck(design(sites, [10, 10, 10], { kind: 'grounded' }));
    const byCode = new Map(r.warnings.map((w) => [w.code, w]));
    expect(byCode.get('site-outside-domain')?.siteIds).toEqual(['out']);
    expect(byCode.get('density-cut')?.siteIds).toContain('edge');
    expect(byCode.get('sites-overlap')?.siteIds.sort()).toEqual(['in', 'near']);
    expect(byCode.get('sites-coincide')?.siteIds.sort()).toEqual(['edge', 'twin']);
    expect(byCode.get('no-electrons')?.siteIds).toEqual(['edge']);
    expect(r.sites.find((s) => s.id === 'out')?.uBoundEv).toBeNull();
    expect(r.worstRelBound).toBeNull();
    expect(JSON.parse(JSON.stringify(r)).sites.length).toBe(5);
  });
  it('warns on orbital sizes below a/100 (a = 0.5431020511 nm, CODATA 2018 Si lattice parameter) or above 100 nm, per site, with the reason', () => {
    const a = SI_LATTICE_CONSTANT_NM;
    const sites: Design['sites'] = [
      { id: 'ok', species: 'P', position: [0, 0, 0], electrons: 1 },
      { id: 'just-below', species: 'P', position: [5, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 0.99 * (a / 100) } },
      { id: 'just-above', species: 'P', position: [-5, 0, 0], electrons: 1, orbital: { model: 'hydrogenic-1s', radiusNm: 1.01 * (a / 100) } },
      { id: 'flat', species: 'P', position: [0, 5, 0], electrons: 1, orbital: { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1e-4 } },
      { id: 'huge', species: 'P', position: [0, -5, 0], electrons: 1, orbital: { model: 'hydrogenic-1s', radiusNm: 101 } },
    ];
    const r = farFieldCheck(design(sites, [30, 30, 30], { kind: 'multipole', order: 2 }));
    const byCode = new Map(r.warnings.map((w) => [w.code, w]));
    expect(byCode.get('orbital-too-small')?.siteIds).toEqual(['just-below', 'flat']);
    expect(byCode.get('orbital-too-small')?.message).toMatch(/hundredth of the lattice constant \(0\.00543 nm; smallest 0\.000100 nm\)/);
    expect(byCode.get('orbital-too-large')?.siteIds).toEqual(['huge']);
    expect(byCode.get('orbital-too-large')?.severity).toBe('warning');
    // the default plaquette sizes (2.5 nm, Kohn & Luttinger, from memory) raise neither
    const plain = farFieldCheck(design([sites[0]], [30, 30, 30], { kind: 'multipole', order: 2 }));
    expect(plain.warnings.map((w) => w.code)).not.toContain('orbital-too-small');
    expect(plain.warnings.map((w) => w.code)).not.toContain('orbital-too-large');
  });
  it('the element-count hook may report a lower bound ("more than N"): the report says so and the budget warning reads "more than"', () => {
    const sites: Design['sites'] = [{ id: 'd1', species: 'P', position: [0, 0, 0], electrons: 1 }];
    const d = design(sites, [20, 20, 20], { kind: 'multipole', order: 2 });
    const r = farFieldCheck(d, { estimateElements: () => ({ elements: 3_000_001, atLeast: true }) });
    expect(r.elementsEstimate).toBe(3_000_001);
    expect(r.elementsEstimateIsLowerBound).toBe(true);
    expect(r.warnings.find((w) => w.code === 'element-budget')?.message).toMatch(/would need more than 3000001 elements/);
    expect(farFieldCheck(d, { estimateElements: () => 10 }).elementsEstimateIsLowerBound).toBe(false);
  });
  it('overlap and coincidence flags equal a brute-force scan of all pairs on a lattice plane with defects (every pair, O(N²))', () => {
    const a = SI_LATTICE_CONSTANT_NM;
    const rnd = mulberry32(42);
    const sites: Design['sites'] = [];
    // a plane of sites sharing x and y values (the case a sweep along x handles badly), a few moved
    // within a lattice constant of a neighbour, a few doubled, some in one cluster
    for (let i = 0; i < 40; i++)
      for (let j = 0; j < 40; j++) {
        const p: Vec3 = [2 * a * i - 40 * a, 2 * a * j - 40 * a, 0];
        const r = rnd();
        if (r < 0.05) p[0] += a * (1.1 + 0.8 * rnd()); // 0.1a to 0.9a from the next site along x
        else if (r < 0.1) {
          p[1] += 1.5 * a; // 0.5a along y and 0.8a along z from the next one: 0.94a
          p[2] += 0.8 * a;
        }
        sites.push({ id: `s${i}-${j}`, species: 'P', position: p, electrons: 1, cluster: r > 0.97 ? 'c' : undefined });
        if (r > 0.99) sites.push({ id: `t${i}-${j}`, species: 'P', position: [...p], electrons: 1 });
      }
    // in a shuffled order (Fisher–Yates), so no pair is found only because of how sites were listed
    for (let i = sites.length - 1; i > 0; i--) {
      const k = Math.floor(rnd() * (i + 1));
      [sites[i], sites[k]] = [sites[k], sites[i]];
    }
    const r = farFieldCheck(design(sites, [60, 60, 20], { kind: 'multipole', order: 2 }));
    const coincide = new Set<string>();
    const overlap = new Set<string>();
    for (let i = 0; i < sites.length; i++)
      for (let j = i + 1; j < sites.length; j++) {
        const R = Math.hypot(...[0, 1, 2].map((k) => sites[i].position[k] - sites[j].position[k]));
        if (R < 1e-6) coincide.add(sites[i].id).add(sites[j].id);
        else if (R < a && !(sites[i].cluster !== undefined && sites[i].cluster === sites[j].cluster)) overlap.add(sites[i].id).add(sites[j].id);
      }
    const byCode = new Map(r.warnings.map((w) => [w.code, w]));
    expect(overlap.size).toBeGreaterThan(10);
    expect(coincide.size).toBeGreaterThan(0);
    expect(new Set(byCode.get('sites-overlap')?.siteIds)).toEqual(overlap);
    expect(new Set(byCode.get('sites-coincide')?.siteIds)).toEqual(coincide);
  });
  it('cluster members are not flagged as overlapping; large arrays check bond-graph pairs only', () => {
    const a = SI_LATTICE_CONSTANT_NM;
    const sites: Design['sites'] = [
      { id: 'c1a', species: 'P', position: [0, 0, 0], electrons: 1, cluster: 'c1' },
      { id: 'c1b', species: 'P', position: [a / 4, a / 4, a / 4], electrons: 1, cluster: 'c1' },
    ];
    const r = farFieldCheck(design(sites, [30, 30, 30], { kind: 'multipole', order: 2 }));
    expect(r.warnings.map((w) => w.code)).not.toContain('sites-overlap');
    const many: Design['sites'] = [];
    for (let i = 0; i < 100; i++) many.push({ id: `s${i}`, species: 'P', position: [(i - 49.5) * 3 * a, 0, 0], electrons: 1 });
    const big = farFieldCheck(design(many, [200, 40, 40], { kind: 'multipole', order: 2 }));
    expect(big.pairs.length).toBe(99);
    expect(big.warnings.map((w) => w.code)).toContain('pairs-limited');
  });
  it('is deterministic and passes the element-count hook the recommended box', () => {
    const sites: Design['sites'] = [{ id: 'd1', species: 'Bi', position: [0, 0, 0], electrons: 1, orbital: A }];
    const seen: Vec3[] = [];
    const d = design(sites, [20, 20, 20], { kind: 'multipole', order: 0 });
    const r1 = farFieldCheck(d, { moments: true, estimateElements: (h) => (seen.push(h), 3_000_000) });
    const r2 = farFieldCheck(d, { moments: true });
    expect(JSON.stringify({ ...r1, elementsEstimate: null, warnings: [] })).toBe(JSON.stringify({ ...r2, warnings: [] }));
    expect(seen[0]).toEqual(r1.recommendedHalfExtentsNm);
    expect(r1.warnings.map((w) => w.code)).toContain('element-budget');
    expect(r1.moments?.values[6]).toBeCloseTo(1.4 ** 2 - 2.5 ** 2, 10);
    // the potential of the anisotropic site far away matches its order-4 expansion (sanity of the chain)
    const Q = orbitalMoments(A, [0, 0, 0], [0, 0, 0], 4);
    const x: Vec3 = [20, 5, 30];
    expect(Math.abs(multipolePotential(Q, 4, [0, 0, 0], ...x) / potentialAt(A, [0, 0, 0], ...x) - 1)).toBeLessThan(1e-6);
  });
  it('reports per-site and array moments to order 4 about a chosen centre: spherical densities have point-charge moments', () => {
    // Newton's shell theorem (any electrostatics text, e.g. Jackson ch. 4): outside itself a spherically
    // symmetric charge acts as a point charge at its centre, so its moments about c are those of a
    // point charge at d = site − c: Q_10 = d_z, Q_11c = d_x, Q_20 = (3d_z² − d²)/2 (Racah-normalised
    // real solid harmonics, standard table; from memory).
    const sites: Design['sites'] = [
      { id: 'g', species: 'P', position: [1.5, -2, 0.5], electrons: 2, orbital: { model: 'gaussian', sigmaNm: 1.1 } },
      { id: 'h', species: 'As', position: [-3, 1, -1], electrons: 1, orbital: { model: 'hydrogenic-1s', radiusNm: 2.2 } },
    ];
    const c: Vec3 = [0.5, 0.5, -0.5];
    const r = farFieldCheck(design(sites, [30, 30, 30], { kind: 'multipole', order: 2 }), { moments: true, momentsCenter: c });
    expect(r.moments?.center).toEqual(c);
    expect(r.moments?.sites.map((m) => m.id)).toEqual(['g', 'h']);
    for (const [k, s] of sites.entries()) {
      const q = r.moments!.sites[k].values;
      expect(q).toHaveLength(25);
      const [dx, dy, dz] = [0, 1, 2].map((i) => s.position[i] - c[i]);
      expect(q[0]).toBeCloseTo(1, 12); // unit charge
      expect(q[1]).toBeCloseTo(dy, 12);
      expect(q[2]).toBeCloseTo(dz, 12);
      expect(q[3]).toBeCloseTo(dx, 12);
      expect(q[6]).toBeCloseTo((3 * dz * dz - (dx * dx + dy * dy + dz * dz)) / 2, 12);
    }
    // the array's moments are the electron-weighted sum of the sites'
    for (let i = 0; i < 25; i++) expect(r.moments!.values[i]).toBeCloseTo(2 * r.moments!.sites[0].values[i] + r.moments!.sites[1].values[i], 10);
  });
  it('says which pair values are closed forms and which are point-charge values', () => {
    // Two equal 1s densities at R: J = (1/R)[1 − e^{−2w}(1 + 11w/8 + 3w²/4 + w³/6)], w = R/a (the
    // hydrogen-molecule Coulomb integral, any quantum-chemistry text); no closed form is used for
    // the anisotropic envelope, so its V is the point-charge e²/(4πε R). e²/4πε0 from CODATA 2018.
    const H: Orbital = { model: 'hydrogenic-1s', radiusNm: 2.5 };
    const R = 4.4;
    const r = farFieldCheck(
      design(
        [
          { id: 'h1', species: 'P', position: [-R / 2, 0, 0], electrons: 1, orbital: H },
          { id: 'h2', species: 'P', position: [R / 2, 0, 0], electrons: 1, orbital: H },
          { id: 'x', species: 'P', position: [0, 6, 0], electrons: 1, orbital: A },
        ],
        [30, 30, 30],
        { kind: 'multipole', order: 2 },
      ),
    );
    const byPair = new Map(r.pairs.map((p) => [`${p.a}-${p.b}`, p]));
    const hh = byPair.get('h1-h2')!;
    const w = R / 2.5;
    const J = (1 - Math.exp(-2 * w) * (1 + (11 * w) / 8 + (3 * w * w) / 4 + (w * w * w) / 6)) / R;
    expect(hh.vModel).toBe('closed-form');
    expect(hh.vEv).toBeCloseTo((1.439964547 / 11.7) * J, 12);
    const hx = byPair.get('h1-x')!;
    expect(hx.vModel).toBe('point-charge');
    expect(hx.vEv).toBeCloseTo(1.439964547 / 11.7 / hx.distanceNm, 12);
  });
});
