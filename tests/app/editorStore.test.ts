/**
 * The workspace's editor store: every edit is one undo step, and undo/redo hand back the exact
 * document (deep-equal, and the very same object), including array builds and imports.
 * Reference for the lattice: diamond Si with a = 0.5431020511 nm (CODATA 2018); the generator is
 * our own geometry/arrays, checked here only for the count a 3 × 3 grid must give (plain counting).
 */
import { describe, expect, it } from 'vitest';
import { designSchema, type DesignDocument } from '@contracts/design';
import { createEditorStore, freeId } from '../../app/src/features/studio/editorStore';
import { generateArray } from '../../geometry/arrays';

const A = 0.5431020511;

function doc(): DesignDocument {
  return designSchema.parse({
    format: 'tetrawell-design',
    version: 1,
    name: 'Undo bench',
    host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: A },
    sites: [
      { id: 'p1', species: 'P', position: [0, 0, 0], electrons: 1 },
      { id: 'p2', species: 'As', position: [4 * A, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 1.1 } },
    ],
    domain: { center: [0, 0, 0], halfExtentsNm: [20, 20, 20], boundary: { kind: 'grounded' } },
    refinement: { order: 2, targetRelError: 0.01, maxElements: 100000 },
  });
}

const clone = <T,>(x: T): T => JSON.parse(JSON.stringify(x)) as T;

describe('editor store history', () => {
  it('undoes and redoes a sequence of edits back to the exact documents', () => {
    const store = createEditorStore(doc());
    const snapshots: DesignDocument[] = [store.getState().document];
    const copies: DesignDocument[] = [clone(store.getState().document)];
    const record = () => {
      snapshots.push(store.getState().document);
      copies.push(clone(store.getState().document));
    };
    const s = () => store.getState();
    s().placeSite('Sb', [A / 4, A / 4, A / 4]);
    record();
    s().moveSites({ p1: [A, A, 0] });
    record();
    s().updateSite('p2', { orbital: undefined, electrons: 2 });
    record();
    s().putSites(generateArray({ kind: 'square', nx: 3, ny: 3, spacingNm: 8 * A, latticeConstantNm: A }), 'replace');
    record();
    expect(s().document.sites).toHaveLength(9); // 3 × 3 grid: nine sites
    s().setDomain({ center: [0, 0, 0], halfExtentsNm: [5, 6, 7], boundary: { kind: 'multipole', order: 2 } });
    record();
    s().deleteSites(['s5']);
    record();
    s().putSites([{ id: 's1', species: 'B', position: [0, 0, 3 * A], electrons: 0 }], 'add');
    record();
    // the clashing imported id got a suffix rather than a duplicate
    expect(new Set(s().document.sites.map((x) => x.id)).size).toBe(s().document.sites.length);

    for (let k = snapshots.length - 2; k >= 0; k--) {
      store.temporal.getState().undo();
      expect(s().document).toBe(snapshots[k]);
      expect(s().document).toEqual(copies[k]);
    }
    expect(store.temporal.getState().pastStates).toHaveLength(0);
    for (let k = 1; k < snapshots.length; k++) {
      store.temporal.getState().redo();
      expect(s().document).toBe(snapshots[k]);
      expect(s().document).toEqual(copies[k]);
    }
    // every state stays a valid design document
    for (const d of snapshots) expect(designSchema.safeParse(d).success).toBe(true);
  });

  it('does not record selection changes as edits, and a load starts a fresh history', () => {
    const store = createEditorStore(doc());
    store.getState().select(['p1']);
    store.getState().select(['p2'], 'toggle');
    expect(store.getState().selection).toEqual(['p1', 'p2']);
    expect(store.temporal.getState().pastStates).toHaveLength(0);
    store.getState().deleteSites(['p1']);
    expect(store.getState().selection).toEqual(['p2']);
    expect(store.temporal.getState().pastStates).toHaveLength(1);
    const fresh = { ...doc(), name: 'Theirs' };
    store.getState().load(fresh);
    expect(store.getState().document).toBe(fresh);
    expect(store.getState().savedDocument).toBe(fresh);
    expect(store.temporal.getState().pastStates).toHaveLength(0);
  });

  it('drops the orbital key (back to the species preset) and renames selections with the site', () => {
    const store = createEditorStore(doc());
    store.getState().select(['p2']);
    store.getState().updateSite('p2', { orbital: undefined, id: 'q2' });
    const q2 = store.getState().document.sites.find((x) => x.id === 'q2')!;
    expect('orbital' in q2).toBe(false);
    expect(store.getState().selection).toEqual(['q2']);
  });

  it('names placed donors with the smallest free number', () => {
    expect(freeId(new Set(['d1', 'd2', 'd4']))).toBe('d3');
    expect(freeId(new Set())).toBe('d1');
  });
});
