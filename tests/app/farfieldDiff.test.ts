/**
 * The document diff behind the live far-field check (app/src/features/studio/farfield/diffDesign.ts):
 * which changes it sends, and that a session fed only those changes holds the same design as the
 * editor (round trip over random edits, compared field by field; common practice for a diff).
 */
import { describe, expect, it } from 'vitest';
import type { DesignDocument } from '@contracts/design';
import { diffDesign } from '../../app/src/features/studio/farfield/diffDesign';
import { createFarFieldSession, farFieldCheck } from '../../geometry/farfield';
import { generateArray, mulberry32 } from '../../geometry/arrays';
import type { Site } from '../../geometry/design/types';

const a = 0.5431020511; // CODATA 2018 lattice constant of Si (nm)

function doc(n = 4): DesignDocument {
  return {
    format: 'tetrawell-design',
    version: 1,
    name: 'Invented chain',
    host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: a },
    sites: generateArray({ kind: 'chain', nx: n, spacingNm: 4.3, latticeConstantNm: a }),
    domain: { center: [0, 0, 0], halfExtentsNm: [20, 12, 12], boundary: { kind: 'multipole', order: 2 } },
    refinement: { order: 2, targetRelError: 1e-3, maxElements: 100_000 },
  };
}

describe('diffDesign', () => {
  it('sends the first document whole, and nothing for the same document again', () => {
    const d = doc();
    expect(diffDesign(null, d)).toEqual({ kind: 'reset', design: d });
    expect(diffDesign(d, d)).toEqual({ kind: 'none' });
    // a deep copy with equal fields is no change either
    expect(diffDesign(d, structuredClone(d))).toEqual({ kind: 'none' });
  });

  it('a moved site is the only site sent; the rest stay behind', () => {
    const d = doc();
    const sites = d.sites.slice();
    sites[2] = { ...sites[2], position: [sites[2].position[0] + a, sites[2].position[1], 0] };
    expect(diffDesign(d, { ...d, sites })).toEqual({ kind: 'changes', changes: { upserted: [sites[2]] } });
  });

  it('orbital, electrons, species and cluster count as changes of the site', () => {
    const d = doc();
    const variants: Partial<Site>[] = [{ electrons: 2 }, { species: 'As' }, { cluster: 'c1' }, { orbital: { model: 'gaussian', sigmaNm: 1.5 } }];
    for (const v of variants) {
      const sites = d.sites.slice();
      sites[1] = { ...sites[1], ...v };
      const r = diffDesign(d, { ...d, sites });
      expect(r.kind === 'changes' && r.changes.upserted?.map((s) => s.id)).toEqual([sites[1].id]);
    }
    // the same orbital written out again is not a change
    const withOrbital = { ...d, sites: d.sites.map((s) => ({ ...s, orbital: { model: 'hydrogenic-1s' as const, radiusNm: 2.5 } })) };
    expect(diffDesign(withOrbital, structuredClone(withOrbital))).toEqual({ kind: 'none' });
  });

  it('removal, appending and reordering: order is sent only when appending does not give it', () => {
    const d = doc(5);
    const removed = { ...d, sites: d.sites.filter((_, i) => i !== 1) };
    expect(diffDesign(d, removed)).toEqual({ kind: 'changes', changes: { removed: [d.sites[1].id] } });
    const added: Site = { id: 'new', species: 'P', electrons: 1, position: [0, 4 * a, 0] };
    expect(diffDesign(d, { ...d, sites: [...d.sites, added] })).toEqual({ kind: 'changes', changes: { upserted: [added] } });
    const inserted = { ...d, sites: [d.sites[0], added, ...d.sites.slice(1)] };
    expect(diffDesign(d, inserted)).toEqual({ kind: 'changes', changes: { upserted: [added], order: inserted.sites.map((s) => s.id) } });
    const swapped = { ...d, sites: [d.sites[1], d.sites[0], ...d.sites.slice(2)] };
    expect(diffDesign(d, swapped)).toEqual({ kind: 'changes', changes: { order: swapped.sites.map((s) => s.id) } });
  });

  it('the domain box, refinement, host and name are sent when they differ', () => {
    const d = doc();
    const domain = { ...d.domain, halfExtentsNm: [18, 12, 12] as [number, number, number] };
    expect(diffDesign(d, { ...d, domain })).toEqual({ kind: 'changes', changes: { domain } });
    const boundary = { ...d, domain: { ...d.domain, boundary: { kind: 'multipole' as const, order: 4 } } };
    expect(diffDesign(d, boundary)).toEqual({ kind: 'changes', changes: { domain: boundary.domain } });
    const refinement = { ...d.refinement, targetRelError: 1e-2 };
    expect(diffDesign(d, { ...d, refinement })).toEqual({ kind: 'changes', changes: { refinement } });
    const host = { ...d.host, epsilonR: 11.68 };
    expect(diffDesign(d, { ...d, host, name: 'renamed' })).toEqual({ kind: 'changes', changes: { host, name: 'renamed' } });
  });

  it('a document whose ids repeat is sent whole', () => {
    const d = doc();
    const dup = { ...d, sites: [...d.sites, { ...d.sites[0], position: [0, 8 * a, 0] as [number, number, number] }] };
    expect(diffDesign(d, dup).kind).toBe('reset');
  });

  it('round trip: a session fed only the diffs holds the editor\'s design and gives its report', () => {
    const rnd = mulberry32(9);
    let d = doc(6);
    const first = diffDesign(null, d);
    if (first.kind !== 'reset') throw new Error('expected reset');
    const session = createFarFieldSession(first.design);
    let serial = 0;
    for (let step = 0; step < 200; step++) {
      const sites = d.sites.slice();
      const r = rnd();
      const i = Math.floor(rnd() * sites.length);
      if (sites.length && r < 0.35) sites[i] = { ...sites[i], position: [sites[i].position[0] + (rnd() - 0.5) * 2, sites[i].position[1] + (rnd() - 0.5) * 2, 0] };
      else if (r < 0.5) sites.splice(Math.floor(rnd() * (sites.length + 1)), 0, { id: `n${serial++}`, species: 'P', electrons: 1, position: [rnd() * 10 - 5, rnd() * 10 - 5, 0] });
      else if (sites.length > 1 && r < 0.65) sites.splice(i, 1);
      else if (sites.length > 1 && r < 0.75) sites.reverse();
      else if (sites.length && r < 0.85) sites[i] = { ...sites[i], electrons: (sites[i].electrons + 1) % 3 };
      const next: DesignDocument =
        r >= 0.85 ? { ...d, domain: { ...d.domain, halfExtentsNm: [10 + rnd() * 20, 10 + rnd() * 10, 12] } } : { ...d, sites };
      const diff = diffDesign(d, next);
      if (diff.kind === 'reset') throw new Error('no reset expected for unique ids');
      const report = diff.kind === 'changes' ? session.applyChanges(diff.changes) : session.report();
      d = next;
      expect(session.design()).toEqual(d);
      expect(report.worstRelBound).toEqual(farFieldCheck(d).worstRelBound);
    }
  });
});
