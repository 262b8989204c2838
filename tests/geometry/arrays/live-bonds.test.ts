/**
 * The bond pairs kept up to date while sites move (geometry/arrays/live-bonds.ts) and the close-
 * pair index (geometry/farfield/close-pairs.ts) against full recomputes.
 *
 * Reference: bondPairs (a fresh Delaunay triangulation by delaunator, then the distance rule) and
 * a brute-force scan of all pairs, O(N²). After every move of a random sequence the kept result
 * must equal the reference exactly (same pairs in the same order). The local path must also be
 * taken: a test that only ever fell back to the full rebuild would prove nothing about it.
 */
import { describe, expect, it } from 'vitest';
import { generateArray, mulberry32 } from '../../../geometry/arrays';
import { bondPairs } from '../../../geometry/arrays/bonds';
import { LiveBondPairs } from '../../../geometry/arrays/live-bonds';
import { CloseSiteIndex } from '../../../geometry/farfield/close-pairs';
import type { Site, Vec3 } from '../../../geometry/design/types';
import { siteToNm, snapToLattice } from '../../../geometry/lattice';
import { SI_LATTICE_CONSTANT_NM } from '../../../geometry/units';

const A = SI_LATTICE_CONSTANT_NM;

function positionsOf(sites: Site[]): Float64Array {
  const pos = new Float64Array(3 * sites.length);
  sites.forEach((s, i) => pos.set(s.position, 3 * i));
  return pos;
}

function samePairs(got: { I: Int32Array; J: Int32Array }, want: { I: Int32Array; J: Int32Array }): boolean {
  return got.I.length === want.I.length && got.I.every((x, t) => x === want.I[t]) && got.J.every((x, t) => x === want.J[t]);
}

describe('bond pairs kept while sites move (live-bonds.ts)', () => {
  const cases = [
    { label: 'triangular 12×10, lattice steps', kind: 'triangular' as const, cluster: 1, step: A, seed: 11, minLocal: 100 },
    { label: 'triangular 12×10, 2-donor clusters, lattice steps', kind: 'triangular' as const, cluster: 2, step: A, seed: 12, minLocal: 60 },
    // steps of up to 3 nm (of 4.5 nm spacing) flip edges next to the moved site without folding its triangles over
    { label: 'triangular 12×10, steps that change the triangulation', kind: 'triangular' as const, cluster: 1, step: 3, seed: 15, minLocal: 1 },
    { label: 'triangular 12×10, long jumps (triangles fold over)', kind: 'triangular' as const, cluster: 1, step: 9, seed: 13, minLocal: 1 },
    // a square array is cocircular everywhere: its diagonals are a toss-up, pruned at 1.2
    { label: 'square 10×10 (cocircular quads), lattice steps', kind: 'square' as const, cluster: 1, step: A, seed: 14, minLocal: 20 },
    // above √2 the distance rule keeps square diagonals, so delaunator's choice between them matters
    { label: 'square 10×10 keeping diagonals (shell factor 1.5), lattice steps', kind: 'square' as const, cluster: 1, step: A, seed: 16, minLocal: 0, shellFactor: 1.5 },
  ];
  for (const c of cases as ((typeof cases)[number] & { shellFactor?: number })[]) {
    it(`${c.label}: equal to a full rebuild after every move`, () => {
      const shellFactor = c.shellFactor ?? 1.2;
      const rnd = mulberry32(c.seed);
      const sites = generateArray({ kind: c.kind, nx: c.kind === 'square' ? 10 : 12, ny: 10, spacingNm: 4.5, latticeConstantNm: A, clusterSize: c.cluster });
      const groups = c.cluster > 1 ? sites.map((s) => s.cluster) : undefined;
      const pos = positionsOf(sites);
      const live = new LiveBondPairs(shellFactor);
      expect(samePairs(live.build(pos, groups), bondPairs(pos, { groups, shellFactor }))).toBe(true);
      let local = 0;
      for (let step = 0; step < 200; step++) {
        // one to three sites move before the pairs are asked for (edits folded into one update)
        const moves = 1 + Math.floor(rnd() * 3);
        let ok = true;
        for (let k = 0; k < moves; k++) {
          const i = Math.floor(rnd() * sites.length);
          const p: Vec3 = [pos[3 * i] + (rnd() - 0.5) * 2 * c.step, pos[3 * i + 1] + (rnd() - 0.5) * 2 * c.step, pos[3 * i + 2]];
          pos.set(siteToNm(snapToLattice(p, A), A), 3 * i);
          if (ok) ok = live.moved(pos, i);
        }
        const got = (ok ? live.pairs() : null) ?? live.build(pos, groups);
        if (live.lastWasLocal) local++;
        expect(samePairs(got, bondPairs(pos, { groups, shellFactor })), `step ${step}`).toBe(true);
      }
      expect(local).toBeGreaterThanOrEqual(c.minLocal);
    });
  }
});

describe('close-pair index (close-pairs.ts)', () => {
  it('after random moves lists exactly the pairs closer than a lattice constant of a brute-force scan, in site order', () => {
    const rnd = mulberry32(21);
    // a dense plane: sites one to three lattice constants apart, so moves make and break close pairs
    const sites: Site[] = [];
    for (let i = 0; i < 150; i++) {
      const p = siteToNm(snapToLattice([(rnd() - 0.5) * 12, (rnd() - 0.5) * 12, 0], A), A);
      sites.push({ id: `s${i}`, species: 'P', position: p, electrons: 1, ...(i % 7 === 0 ? { cluster: `c${i % 3}` } : {}) });
    }
    const index = new CloseSiteIndex(sites, A);
    const brute = () => {
      const coincide: string[] = [];
      const overlap: string[] = [];
      for (let i = 0; i < sites.length; i++) for (let j = i + 1; j < sites.length; j++) {
        const R = Math.hypot(...sites[i].position.map((x, k) => x - sites[j].position[k]));
        if (R < 1e-6) coincide.push(sites[i].id, sites[j].id);
        else if (R < A && !(sites[i].cluster !== undefined && sites[i].cluster === sites[j].cluster)) overlap.push(sites[i].id, sites[j].id);
      }
      return { coincide, overlap };
    };
    let seenOverlap = 0, seenCoincide = 0;
    for (let step = 0; step < 300; step++) {
      const i = Math.floor(rnd() * sites.length);
      const before = sites[i].position;
      // a nearby lattice point, or now and then exactly onto another site
      const position: Vec3 = rnd() < 0.1 ? [...sites[Math.floor(rnd() * sites.length)].position] : siteToNm(snapToLattice([before[0] + (rnd() - 0.5) * 3, before[1] + (rnd() - 0.5) * 3, 0], A), A);
      sites[i] = { ...sites[i], position };
      index.move(i, before, sites);
      const got = { coincide: [] as string[], overlap: [] as string[] };
      index.emit(got.coincide, got.overlap);
      const want = brute();
      expect(got, `step ${step}`).toEqual(want);
      seenOverlap += want.overlap.length;
      seenCoincide += want.coincide.length;
      // a fresh index over the same sites gives the same lists (the full check's path)
      const fresh = { coincide: [] as string[], overlap: [] as string[] };
      new CloseSiteIndex(sites, A).emit(fresh.coincide, fresh.overlap);
      expect(fresh).toEqual(want);
    }
    expect(seenOverlap).toBeGreaterThan(0);
    expect(seenCoincide).toBeGreaterThan(0);
  });
});
