/**
 * The site table's orbital override editor: values are checked by the document's own contract
 * (siteSchema, radius limits MIN_RADIUS_NM/MAX_RADIUS_NM read from the contract, not copied), a
 * "preset" choice drops the override, and the edit is one undo step in the editor store.
 */
import { describe, expect, it } from 'vitest';
import { designSchema, MAX_RADIUS_NM, siteSchema } from '@contracts/design';
import { createEditorStore } from '../../app/src/features/studio/editorStore';
import { editOrbital, orbitalFieldsOf } from '../../app/src/features/studio/orbitalEdit';

const A = 0.5431020511; // Si lattice constant in nm (CODATA 2018)
const p1 = { id: 'p1', species: 'P' as const, position: [0, 0, 0] as [number, number, number], electrons: 1 };

describe('editOrbital', () => {
  it('builds each model from its fields in nm, and the result passes the contract', () => {
    const h = editOrbital(p1, 'hydrogenic-1s', { size: '2.5', sizeZ: '' });
    expect(h).toEqual({ site: { ...p1, orbital: { model: 'hydrogenic-1s', radiusNm: 2.5 } } });
    const an = editOrbital(p1, 'anisotropic-1s', { size: '2.5', sizeZ: '1.4' });
    expect('site' in an && an.site.orbital).toEqual({ model: 'anisotropic-1s', radiusNm: 2.5, radiusZNm: 1.4 });
    const g = editOrbital(p1, 'gaussian', { size: ' 1.1 ', sizeZ: '' });
    expect('site' in g && g.site.orbital).toEqual({ model: 'gaussian', sigmaNm: 1.1 });
    for (const r of [h, an, g]) expect('site' in r && siteSchema.safeParse(r.site).success).toBe(true);
  });
  it('refuses text, a missing [001] radius and sizes outside the contract, naming the field and unit', () => {
    const t = editOrbital(p1, 'gaussian', { size: 'wide', sizeZ: '' });
    expect('error' in t && t.error).toMatch(/Sigma.*nm/);
    const z = editOrbital(p1, 'anisotropic-1s', { size: '2', sizeZ: '' });
    expect('error' in z && z.error).toMatch(/\[001\].*nm/);
    const big = editOrbital(p1, 'hydrogenic-1s', { size: String(MAX_RADIUS_NM * 2), sizeZ: '' });
    expect('error' in big && big.error).toMatch(/^Radius \(nm\)/);
    const neg = editOrbital(p1, 'anisotropic-1s', { size: '2', sizeZ: '-1' });
    expect('error' in neg && neg.error).toMatch(/^Radius along \[001\] \(nm\)/);
    // the range in plain words with the unit, not the validator's own phrasing
    expect('error' in big && big.error).toBe(`Radius (nm): must be at most ${MAX_RADIUS_NM} nm.`);
    const tiny = editOrbital(p1, 'gaussian', { size: '1e-6', sizeZ: '' });
    expect('error' in tiny && tiny.error).toMatch(/^Sigma \(nm\): must be (at least|more than) [0-9.e-]+ nm\.$/);
  });
  it('"preset" drops the override and the fields read back what was set', () => {
    const withG = { ...p1, orbital: { model: 'gaussian' as const, sigmaNm: 1.1 } };
    expect(orbitalFieldsOf(withG)).toEqual({ model: 'gaussian', fields: { size: '1.1', sizeZ: '' } });
    const r = editOrbital(withG, 'preset', { size: '1.1', sizeZ: '' });
    expect('site' in r && r.site).toEqual(p1);
    expect('site' in r && 'orbital' in r.site).toBe(false);
  });
  it('is one undoable edit in the store', () => {
    const doc = designSchema.parse({
      format: 'tetrawell-design', version: 1, name: 'Orbital bench',
      host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: A },
      sites: [p1],
      domain: { center: [0, 0, 0], halfExtentsNm: [20, 20, 20], boundary: { kind: 'grounded' } },
      refinement: { order: 2, targetRelError: 0.01, maxElements: 100000 },
    });
    const store = createEditorStore(doc);
    const before = store.getState().document;
    const r = editOrbital(before.sites[0], 'gaussian', { size: '1.3', sizeZ: '' });
    if (!('site' in r)) throw new Error(r.error);
    store.getState().updateSite('p1', { orbital: r.site.orbital });
    expect(store.getState().document.sites[0].orbital).toEqual({ model: 'gaussian', sigmaNm: 1.3 });
    store.temporal.getState().undo();
    expect(store.getState().document).toBe(before);
    store.temporal.getState().redo();
    expect(store.getState().document.sites[0].orbital).toEqual({ model: 'gaussian', sigmaNm: 1.3 });
  });
});
