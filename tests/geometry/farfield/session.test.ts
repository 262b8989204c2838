/**
 * The resident far-field session (geometry/farfield/session.ts) against the full check.
 *
 * Invariant test: after every edit of a random sequence, the session's report equals
 * farFieldCheck on the resulting document — every number within 1e-12 relative, every string,
 * null and list order exactly. The reference here is the full check itself (its physics is
 * tested against analytic results in farfield.test.ts); what this file guards is that no cached
 * value outlives the edit that should have refreshed it.
 */
import { describe, expect, it } from 'vitest';
import type { Design, Orbital, Site, Vec3 } from '../../../geometry/design/types';
import { createFarFieldSession, farFieldCheck, type FarFieldChanges, type FarFieldReport } from '../../../geometry/farfield';
import { generateArray, mulberry32 } from '../../../geometry/arrays';
import { siteToNm, snapToLattice } from '../../../geometry/lattice';
import { SI_LATTICE_CONSTANT_NM } from '../../../geometry/units';
import { siliconDesign } from '../design-fixtures';

const A = SI_LATTICE_CONSTANT_NM;
const ORBITALS: (Orbital | undefined)[] = [
  undefined,
  { model: 'gaussian', sigmaNm: 1.5 },
  { model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 },
  { model: 'hydrogenic-1s', radiusNm: 2.0 },
];

/** Deep comparison: numbers within `rel` relative (absolute below 1e-300), everything else exactly. */
function diffs(a: unknown, b: unknown, path: string, rel: number, out: string[]): void {
  if (out.length > 5) return;
  if (typeof a === 'number' && typeof b === 'number') {
    if (a === b || (Number.isNaN(a) && Number.isNaN(b))) return;
    const scale = Math.max(Math.abs(a), Math.abs(b));
    if (!(Math.abs(a - b) <= rel * scale)) out.push(`${path}: ${a} vs ${b}`);
    return;
  }
  if (Array.isArray(a) || Array.isArray(b)) {
    if (!Array.isArray(a) || !Array.isArray(b) || a.length !== b.length) {
      out.push(`${path}: length ${Array.isArray(a) ? a.length : typeof a} vs ${Array.isArray(b) ? b.length : typeof b}`);
      return;
    }
    a.forEach((x, i) => diffs(x, b[i], `${path}[${i}]`, rel, out));
    return;
  }
  if (a && b && typeof a === 'object' && typeof b === 'object') {
    const ka = Object.keys(a).filter((k) => (a as Record<string, unknown>)[k] !== undefined).sort();
    const kb = Object.keys(b).filter((k) => (b as Record<string, unknown>)[k] !== undefined).sort();
    if (ka.join() !== kb.join()) {
      out.push(`${path}: keys ${ka.join()} vs ${kb.join()}`);
      return;
    }
    for (const k of ka) diffs((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`, rel, out);
    return;
  }
  if (a !== b) out.push(`${path}: ${String(a)} vs ${String(b)}`);
}

function expectSame(session: FarFieldReport, full: FarFieldReport, step: string): void {
  const out: string[] = [];
  diffs(session, full, 'report', 1e-12, out);
  expect(out, step).toEqual([]);
}

function startDesign(kind: 'square' | 'triangular' | 'chain', nx: number, ny: number, clusterSize: number, boundary: Design['domain']['boundary']): Design {
  const sites = generateArray({ kind, nx, ny, spacingNm: 4.3, latticeConstantNm: A, clusterSize });
  return siliconDesign({
    name: 'invariant',
    sites,
    domain: { center: [0, 0, 0], halfExtentsNm: [4.3 * nx, 4.3 * Math.max(ny, 1), 12], boundary },
    refinement: { order: 2, targetRelError: 1e-3, maxElements: 2_000_000 },
  });
}

/** One random edit, applied to the document (immutably) and described as changes. */
function randomEdit(d: Design, rnd: () => number, serial: number): { next: Design; changes: FarFieldChanges; label: string } {
  const pick = <T,>(xs: readonly T[]) => xs[Math.floor(rnd() * xs.length)];
  const n = d.sites.length;
  const r = rnd();
  const sites = d.sites.slice();
  const index = Math.floor(rnd() * n);
  if (n > 0 && r < 0.3) {
    // move a site to a nearby lattice point (or, 1 in 4, off the lattice)
    const s = sites[index];
    const p = s.position;
    let q: Vec3 = [p[0] + (rnd() - 0.5) * 6, p[1] + (rnd() - 0.5) * 6, p[2] + (rnd() - 0.5) * 2];
    if (rnd() < 0.75) q = siteToNm(snapToLattice(q, A), A);
    const moved: Site = { ...s, position: q };
    sites[index] = moved;
    return { next: { ...d, sites }, changes: { upserted: [moved] }, label: `move ${s.id}` };
  }
  if (n > 0 && r < 0.4) {
    // a move onto another site (two sites at one position)
    const other = sites[Math.floor(rnd() * n)];
    const moved: Site = { ...sites[index], position: [...other.position] };
    sites[index] = moved;
    return { next: { ...d, sites }, changes: { upserted: [moved] }, label: `stack ${moved.id} on ${other.id}` };
  }
  if (n > 0 && r < 0.5) {
    const s = sites[index];
    const orbital = pick(ORBITALS);
    const changed: Site = { ...s, electrons: pick([0, 1, 2]), species: pick(['P', 'As', 'B'] as const) };
    if (orbital) changed.orbital = orbital;
    else delete changed.orbital;
    if (rnd() < 0.2) changed.cluster = rnd() < 0.5 ? undefined : `c${Math.floor(rnd() * 3)}`;
    if (changed.cluster === undefined) delete changed.cluster;
    sites[index] = changed;
    return { next: { ...d, sites }, changes: { upserted: [changed] }, label: `edit ${s.id}` };
  }
  if (r < 0.6) {
    const base = n > 0 ? sites[index].position : [0, 0, 0];
    const added: Site = { id: `new${serial}`, species: 'P', electrons: 1, position: siteToNm(snapToLattice([base[0] + 3 + rnd() * 4, base[1] + rnd() * 4, base[2]], A), A) };
    sites.push(added);
    return { next: { ...d, sites }, changes: { upserted: [added] }, label: `add ${added.id}` };
  }
  if (n > 0 && r < 0.68) {
    const [gone] = sites.splice(index, 1);
    return { next: { ...d, sites }, changes: { removed: [gone.id] }, label: `remove ${gone.id}` };
  }
  if (n > 1 && r < 0.74) {
    const j = Math.floor(rnd() * n);
    [sites[index], sites[j]] = [sites[j], sites[index]];
    return { next: { ...d, sites }, changes: { order: sites.map((s) => s.id) }, label: `swap ${index} ${j}` };
  }
  if (r < 0.88) {
    const h = d.domain.halfExtentsNm;
    const k = Math.floor(rnd() * 3);
    const half: Vec3 = [h[0], h[1], h[2]];
    half[k] = Math.max(0.5, half[k] * (0.7 + rnd() * 0.6));
    const center: Vec3 = rnd() < 0.3 ? [rnd() - 0.5, rnd() - 0.5, 0] : d.domain.center;
    const boundary = rnd() < 0.2 ? pick([{ kind: 'grounded' }, { kind: 'multipole', order: 0 }, { kind: 'multipole', order: 2 }, { kind: 'multipole', order: 4 }] as const) : d.domain.boundary;
    const domain = { center, halfExtentsNm: half, boundary };
    return { next: { ...d, domain }, changes: { domain }, label: `box ${half.map((x) => x.toFixed(2)).join('×')} ${boundary.kind}` };
  }
  if (r < 0.95) {
    const refinement = { ...d.refinement, targetRelError: pick([1e-2, 1e-3, 3e-4]), maxElements: pick([1e5, 2e6]) };
    return { next: { ...d, refinement }, changes: { refinement }, label: `tolerance ${refinement.targetRelError}` };
  }
  const host = { ...d.host, epsilonR: pick([11.7, 11.68, 12]) };
  return { next: { ...d, host }, changes: { host }, label: `host εr ${host.epsilonR}` };
}

/** One to three sites moved by up to 2.5 nm, to lattice points, sent as one update (edits folded while the worker was busy). */
function randomMoves(d: Design, rnd: () => number): { next: Design; changes: FarFieldChanges; label: string } {
  const sites = d.sites.slice();
  const upserted = new Map<string, Site>();
  const count = 1 + Math.floor(rnd() * 3);
  for (let k = 0; k < count && sites.length; k++) {
    const index = Math.floor(rnd() * sites.length);
    const p = sites[index].position;
    const moved: Site = { ...sites[index], position: siteToNm(snapToLattice([p[0] + (rnd() - 0.5) * 5, p[1] + (rnd() - 0.5) * 5, p[2]], A), A) };
    sites[index] = moved;
    upserted.set(moved.id, moved);
  }
  return { next: { ...d, sites }, changes: { upserted: [...upserted.values()] }, label: `move ${[...upserted.keys()].join(', ')}` };
}

const estimate = (h: Vec3) => Math.round(10 * h[0] * h[1] * h[2]);

describe('far-field session (invariant: equal to the full check after every edit)', () => {
  const cases: { label: string; design: () => Design; steps: number; seed: number; moments?: boolean; moves?: boolean }[] = [
    { label: 'all pairs, 3×3 square, multipole 2, with moments', design: () => startDesign('square', 3, 3, 1, { kind: 'multipole', order: 2 }), steps: 120, seed: 1, moments: true },
    { label: 'all pairs, chain of 2-donor clusters, grounded', design: () => startDesign('chain', 6, 1, 2, { kind: 'grounded' }), steps: 120, seed: 2 },
    { label: 'bond graph, 10×9 triangular, multipole 4', design: () => startDesign('triangular', 10, 9, 1, { kind: 'multipole', order: 4 }), steps: 80, seed: 3 },
    // 64 sites: adding one crosses the all-pairs limit (64) into bond-graph pairs, removing one goes back
    { label: 'crossing the all-pairs limit, 8×8 square, grounded, with moments', design: () => startDesign('square', 8, 8, 1, { kind: 'grounded' }), steps: 120, seed: 4, moments: true },
    // mostly moves, some folded into one update: the bond pairs follow moved sites without a new
    // triangulation when they can (live-bonds.ts), the close pairs follow them in their index
    { label: 'bond graph, 14×12 triangular, mostly moves (local bond updates)', design: () => startDesign('triangular', 14, 12, 1, { kind: 'multipole', order: 2 }), steps: 150, seed: 5, moves: true },
    { label: 'bond graph, 10×10 square of 2-donor clusters, mostly moves', design: () => startDesign('square', 10, 10, 2, { kind: 'grounded' }), steps: 100, seed: 6, moves: true },
  ];
  for (const c of cases) {
    it(c.label, () => {
      const rnd = mulberry32(c.seed);
      let d = c.design();
      const session = createFarFieldSession(d, { moments: c.moments, estimateElements: (h) => estimate(h) });
      expectSame(session.report(), farFieldCheck(d, { moments: c.moments }), 'initial');
      for (let step = 0; step < c.steps; step++) {
        const e = c.moves && rnd() < 0.8 ? randomMoves(d, rnd) : randomEdit(d, rnd, step);
        d = e.next;
        const label = `step ${step}: ${e.label}`;
        expectSame(session.applyChanges(e.changes), farFieldCheck(d, { moments: c.moments }), label);
        // the element estimate and its budget warning, as the full check gives them
        if (step % 10 === 0) expectSame(session.reportWithElements(), farFieldCheck(d, { moments: c.moments, estimateElements: estimate }), `${label} (with elements)`);
      }
      expect(session.design().sites.map((s) => s.id)).toEqual(d.sites.map((s) => s.id));
    });
  }

  it('keeps its own copy: mutating the document the caller sent does not change the resident design', () => {
    const d = startDesign('square', 2, 2, 1, { kind: 'multipole', order: 2 });
    const session = createFarFieldSession(d);
    const before = session.report().sites[0].clearanceNm;
    d.sites[0].position[0] += 3;
    d.domain.halfExtentsNm[0] = 1;
    expect(session.applyChanges({}).sites[0].clearanceNm).toBe(before);
  });

  it('refuses an order that does not name the same sites', () => {
    const session = createFarFieldSession(startDesign('chain', 3, 1, 1, { kind: 'grounded' }));
    expect(() => session.applyChanges({ order: ['s1', 's2'] })).toThrow(/same sites/);
  });
});
