/**
 * The studio's host-stack and electrode editing (app/src/features/studio/device/deviceEdit.ts and
 * the editor store): the preset's permittivities, stacks that stay valid under the design contract
 * (server/contracts/design.ts) through add/remove/reorder, the contract's own messages at the
 * edited fields, the plane shortcut, undo of each edit, and that a stack or electrode edit reaches
 * the live far-field worker.
 *
 * Sources: εr of silicon 11.7 and of thermal SiO₂ 3.9 are handbook values (S. M. Sze and K. K. Ng,
 * Physics of Semiconductor Devices, 3rd ed., Wiley 2007, Appendix; from memory, page not checked);
 * εr of vacuum is 1 by definition. The stack rules (touching, bottom to top, only ends unbounded)
 * and the plane rule (spanning the domain's x–y cross-section) are issue 11's contract.
 */
import { describe, expect, it } from 'vitest';
import { designSchema, layerInterfaces, type DesignDocument } from '@contracts/design';
import { createEditorStore } from '../../app/src/features/studio/editorStore';
import {
  addLayerOnTop,
  checkEdit,
  gateBox,
  moveLayerMaterial,
  oxidePreset,
  planeElectrode,
  presetSurfaceNm,
  removeLayer,
  spansCrossSection,
  textToElectrode,
  textToLayer,
  withElectrodes,
  withLayers,
} from '../../app/src/features/studio/device/deviceEdit';
import { diffDesign } from '../../app/src/features/studio/farfield/diffDesign';

const A = 0.5431020511; // Si lattice constant (nm), CODATA 2018

function doc(z = -20): DesignDocument {
  return designSchema.parse({
    format: 'tetrawell-design',
    version: 2,
    name: 'Invented buried pair',
    host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: A },
    sites: [
      { id: 'p1', species: 'P', position: [0, 0, z], electrons: 1 },
      { id: 'p2', species: 'P', position: [8 * A, 0, z], electrons: 1 },
    ],
    domain: { center: [0, 0, -10], halfExtentsNm: [30, 30, 30], boundary: { kind: 'grounded' } },
    refinement: { order: 2, targetRelError: 0.01, maxElements: 100000 },
  });
}

const valid = (d: DesignDocument) => designSchema.safeParse(d).success;

describe('the oxide preset', () => {
  it('is silicon 11.7 below the surface, 5 nm of oxide 3.9, vacuum 1 above (Sze & Ng handbook εr)', () => {
    const layers = oxidePreset(0);
    expect(layers.map((l) => l.epsilonR)).toEqual([11.7, 3.9, 1]);
    expect(layers[0].zMinNm).toBeNull();
    expect(layers[2].zMaxNm).toBeNull();
    expect(layerInterfaces(layers)).toEqual([0, 5]);
    expect(valid(withLayers(doc(), layers))).toBe(true);
  });

  it('keeps the surface at z = 0 under buried sites, and moves it above sites at or over z = 0', () => {
    expect(presetSurfaceNm(doc(-20))).toBe(0);
    const high = doc(0);
    const s = presetSurfaceNm(high);
    expect(s).toBeGreaterThan(0);
    // with the surface there, no site lies on an interface or in the oxide: the contract accepts it
    expect(valid(withLayers(high, oxidePreset(s)))).toBe(true);
    // and at z = 0 the contract refuses the sites on the interface (the reason for moving it)
    expect(valid(withLayers(high, oxidePreset(0)))).toBe(false);
  });
});

describe('stack edits stay valid', () => {
  it('adding on top, removing any layer and moving a material keep a touching stack', () => {
    const d = doc();
    let layers = oxidePreset(0);
    layers = addLayerOnTop(layers, d);
    expect(layers).toHaveLength(4);
    expect(valid(withLayers(d, layers))).toBe(true);
    expect(layers[2].zMaxNm).toBe(10); // vacuum now ends 5 nm above its bottom (z = 5)
    for (let k = 0; k < layers.length; k++) expect(valid(withLayers(d, removeLayer(layers, k))), `remove ${k}`).toBe(true);
    const moved = moveLayerMaterial(layers, 1, 1);
    expect(moved[1].name).toBe('vacuum');
    expect(moved[2].name).toBe('oxide');
    expect(moved[1].zMinNm).toBe(layers[1].zMinNm);
    expect(valid(withLayers(d, moved))).toBe(true);
  });

  it('the first layer of an empty stack fills all space with the host εr', () => {
    const [only] = addLayerOnTop([], doc());
    expect(only).toEqual({ name: 'silicon', epsilonR: 11.7, zMinNm: null, zMaxNm: null });
  });

  it('shows the contract messages at the fields, and a site put on an interface apart', () => {
    const d = doc();
    const gap = oxidePreset(0).map((l, k) => (k === 1 ? { ...l, zMinNm: 1 } : l));
    const found = checkEdit(d, withLayers(d, gap), 'layers');
    expect(found.ok).toBe(false);
    expect(found.fields['host.layers.1.zMinNm']).toMatch(/layer below ends at 0 nm/);
    const low = textToLayer({ name: 'x', epsilonR: '0.5', zMinNm: '', zMaxNm: '' });
    expect(low.zMinNm).toBeNull();
    expect(checkEdit(d, withLayers(d, [low]), 'layers').fields['host.layers.0.epsilonR']).toMatch(/at least 1/);
    const onFace = checkEdit(d, withLayers(d, oxidePreset(-20)), 'layers');
    expect(onFace.fields).toEqual({});
    expect(onFace.other.join(' ')).toMatch(/Site p1 puts the site on the interface/);
  });
});

describe('electrodes', () => {
  it('the plane shortcut spans the domain cross-section and sits on the oxide when there is one', () => {
    const d = withLayers(doc(), oxidePreset(0));
    const top = planeElectrode(d, 'top', []);
    expect(spansCrossSection(top, d)).toBe(true);
    expect(top.minNm[2]).toBe(5);
    expect(top.maxNm[2]).toBe(20); // domain top: −10 + 30
    const back = planeElectrode(d, 'back', [top.name]);
    expect(back.minNm[2]).toBe(-40);
    expect(back.name).not.toBe(top.name);
    expect(valid(withElectrodes(d, [top, back]))).toBe(true);
    expect(spansCrossSection(gateBox(d, []), d)).toBe(false);
  });

  it('refuses an inverted box at its field and a site inside metal apart', () => {
    const d = doc();
    const bad = textToElectrode({ name: 'g', min: ['0', '0', '0'], max: ['1', '1', '-1'], voltageV: '0.3' });
    expect(checkEdit(d, withElectrodes(d, [bad]), 'electrodes').fields['electrodes.0.maxNm.2']).toMatch(/must be above minNm\[2\]/);
    const swallow = { name: 'lead', minNm: [-1, -1, -21] as [number, number, number], maxNm: [1, 1, -19] as [number, number, number], voltageV: 0 };
    const found = checkEdit(d, withElectrodes(d, [swallow]), 'electrodes');
    expect(found.other.join(' ')).toMatch(/Site p1 lies inside electrode "lead"/);
  });
});

describe('store and live check', () => {
  it('each stack, electrode and wall edit is one undo step back to the exact document', () => {
    const store = createEditorStore(doc());
    const d0 = store.getState().document;
    store.getState().setLayers(oxidePreset(0));
    const d1 = store.getState().document;
    store.getState().setElectrodes([planeElectrode(d1, 'top', [])]);
    const d2 = store.getState().document;
    store.getState().setElectrodeWalls('zero-normal-field');
    expect(store.getState().document.domain.electrodeWalls).toBe('zero-normal-field');
    store.getState().setLayers([]);
    expect('layers' in store.getState().document.host).toBe(false);
    const t = store.temporal.getState();
    t.undo();
    t.undo();
    expect(store.getState().document).toBe(d2);
    t.undo();
    expect(store.getState().document).toBe(d1);
    t.undo();
    expect(store.getState().document).toBe(d0);
    expect('electrodes' in d0).toBe(false);
  });

  it('a stack, electrode or wall change reaches the far-field worker (sent whole)', () => {
    const d = doc();
    const layered = withLayers(d, oxidePreset(0));
    expect(diffDesign(d, layered)).toEqual({ kind: 'reset', design: layered });
    const gated = withElectrodes(layered, [planeElectrode(layered, 'top', [])]);
    expect(diffDesign(layered, gated)).toEqual({ kind: 'reset', design: gated });
    const walls = { ...gated, domain: { ...gated.domain, electrodeWalls: 'zero-normal-field' as const } };
    expect(diffDesign(gated, walls)).toEqual({ kind: 'reset', design: walls });
    // an equal copy is still no change
    expect(diffDesign(gated, structuredClone(gated))).toEqual({ kind: 'none' });
  });
});
