/**
 * Meshes of designs with layers and electrodes (issue 11): every tet in one layer and on one side
 * of every electrode face, region ids, electrode vertices, refinement at electrode edges,
 * determinism, and the plain path unchanged. All designs are invented examples.
 */
import { describe, expect, it } from 'vitest';
import type { Design } from '../../../geometry/design/types';
import { meshDesign, kuhnBox, refineUniform, toTetMesh, ELECTRODE_REGION, NO_ELECTRODE, deviceGrid, chooseInitialCells, estimateDesignElements, SizeField, sizeFieldFromDesign } from '../../../geometry/mesh/index';
import { checkMesh } from '../../../geometry/mesh/check';
import { encodeMeshBinary, decodeMeshBinary } from '../../../geometry/mesh/export/binary';
import { electrodeEdgeSegments } from '../../../geometry/mesh/device';
import { MeshError } from '../../../geometry/mesh/errors';
import { siliconOxideVacuum } from '../../fixtures/stacks';

/** Silicon below z = 0, a 2 nm oxide, vacuum above; a gate on the oxide and an in-plane lead. */
export function gatedDesign(order: 1 | 2 = 1): Design {
  return {
    format: 'tetrawell-design',
    version: 2,
    name: 'Gated donor under an oxide (invented)',
    host: {
      material: 'Si',
      epsilonR: 11.7,
      latticeConstantNm: 0.5431020511,
      layers: siliconOxideVacuum(2),
    },
    sites: [{ id: 'd1', species: 'P', position: [0.2, 0.1, -4], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 0.8 } }],
    domain: { center: [0, 0, -2], halfExtentsNm: [12, 12, 10], boundary: { kind: 'grounded' } },
    electrodes: [
      { name: 'gate', minNm: [-3, -3, 2], maxNm: [3, 3, 3.5], voltageV: 0.3 },
      { name: 'lead', minNm: [6, -12, -5], maxNm: [12, 12, -3], voltageV: 0 },
    ],
    refinement: { order, targetRelError: 5e-2, maxElements: 2_000_000 },
  };
}

/** The planes the mesh must respect: layer interfaces and every electrode face, per axis. */
function planes(d: Design): number[][] {
  const out: number[][] = [[], [], [0, 2]];
  for (const e of d.electrodes ?? []) for (let a = 0; a < 3; a++) out[a].push(e.minNm[a], e.maxNm[a]);
  return out;
}

describe('device meshes', () => {
  const d = gatedDesign();
  const r = meshDesign(d);
  const m = r.mesh;
  const nT = m.tets.length / 4;
  const nV = m.coords.length / 3;

  it('is a valid conforming mesh filling the box (checkMesh: orientation, shared faces, volume)', () => {
    const c = checkMesh(m);
    expect(c.problems).toEqual([]);
    expect(c.ok).toBe(true);
    expect(c.volumeRelError).toBeLessThan(1e-12);
  });

  it('no tet straddles a layer interface or an electrode face plane (vertices strictly on both sides)', () => {
    const p = planes(d);
    let straddles = 0;
    for (let t = 0; t < nT; t++) {
      for (let a = 0; a < 3; a++) {
        for (const c of p[a]) {
          let below = false, above = false;
          for (let i = 0; i < 4; i++) {
            const x = m.coords[3 * m.tets[4 * t + i] + a];
            if (x < c) below = true;
            if (x > c) above = true;
          }
          if (below && above) straddles++;
        }
      }
    }
    expect(straddles).toBe(0);
  });

  it('region ids: every vertex of a layer tet lies in that layer (closed); electrode tets lie in the electrode box', () => {
    const layers = d.host.layers!;
    const counts = new Map<number, number>();
    let wrong = 0;
    for (let t = 0; t < nT; t++) {
      const reg = m.tetRegion[t];
      counts.set(reg, (counts.get(reg) ?? 0) + 1);
      for (let i = 0; i < 4; i++) {
        const v = m.tets[4 * t + i];
        const x = m.coords[3 * v], y = m.coords[3 * v + 1], z = m.coords[3 * v + 2];
        if (reg === ELECTRODE_REGION) {
          const inside = (d.electrodes ?? []).some((e) => x >= e.minNm[0] && x <= e.maxNm[0] && y >= e.minNm[1] && y <= e.maxNm[1] && z >= e.minNm[2] && z <= e.maxNm[2]);
          if (!inside) wrong++;
        } else {
          const l = layers[reg];
          if (!(z >= (l.zMinNm ?? -Infinity) && z <= (l.zMaxNm ?? Infinity))) wrong++;
        }
      }
    }
    expect(wrong).toBe(0);
    // all three layers inside the box and both electrodes are present
    expect([...counts.keys()].sort((a, b) => a - b)).toEqual([0, 1, 2, ELECTRODE_REGION]);
    // the electrode tets fill the electrodes' volume exactly (gate 6·6·1.5, lead 6·24·2)
    let vol = 0;
    for (let t = 0; t < nT; t++) if (m.tetRegion[t] === ELECTRODE_REGION) vol += tetVolume(m.coords, m.tets, t);
    expect(vol).toBeCloseTo(6 * 6 * 1.5 + 6 * 24 * 2, 9);
  });

  it('vertexElectrode marks exactly the vertices in or on an electrode box', () => {
    const ve = m.vertexElectrode!;
    expect(ve).toBeInstanceOf(Uint8Array);
    expect(ve.length).toBe(nV);
    const es = d.electrodes!;
    let tagged = 0;
    let wrong = 0;
    for (let v = 0; v < nV; v++) {
      const x = m.coords[3 * v], y = m.coords[3 * v + 1], z = m.coords[3 * v + 2];
      const k = es.findIndex((e) => x >= e.minNm[0] && x <= e.maxNm[0] && y >= e.minNm[1] && y <= e.maxNm[1] && z >= e.minNm[2] && z <= e.maxNm[2]);
      if (ve[v] !== (k < 0 ? NO_ELECTRODE : k)) wrong++;
      if (k >= 0) tagged++;
    }
    expect(wrong).toBe(0);
    expect(tagged).toBeGreaterThan(0);
  });

  it('refines towards electrode edges: tets touching an edge are no longer than h_E = hmax/4 (common practice), far ones may be', () => {
    const seg = electrodeEdgeSegments(d);
    // the gate has 12 edges inside the domain; the lead spans y and touches the x-max wall: its 2 edges along y at x = 6 remain
    expect(seg.length / 6).toBe(12 + 2);
    const hE = r.sizeField.electrodeEdges!.hNm;
    expect(hE).toBeCloseTo(r.sizeField.hmaxNm / 4, 12);
    let near = 0, maxNear = 0;
    for (let t = 0; t < nT; t++) {
      let lo = [Infinity, Infinity, Infinity], hi = [-Infinity, -Infinity, -Infinity];
      for (let i = 0; i < 4; i++) {
        const v = m.tets[4 * t + i];
        lo = lo.map((x, a) => Math.min(x, m.coords[3 * v + a]));
        hi = hi.map((x, a) => Math.max(x, m.coords[3 * v + a]));
      }
      let touches = false;
      for (let k = 0; k < seg.length && !touches; k += 6) {
        let gap2 = 0;
        for (let a = 0; a < 3; a++) {
          const g = Math.max(0, lo[a] - Math.max(seg[k + a], seg[k + 3 + a]), Math.min(seg[k + a], seg[k + 3 + a]) - hi[a]);
          gap2 += g * g;
        }
        touches = gap2 === 0;
      }
      if (!touches) continue;
      near++;
      maxNear = Math.max(maxNear, longestEdge(m.coords, m.tets, t));
    }
    expect(near).toBeGreaterThan(0);
    expect(maxNear).toBeLessThanOrEqual(hE * (1 + 1e-12));
  });

  it('the element estimate made before meshing is within ±30 % of the mesh (the bound estimate.ts promises)', () => {
    expect(r.estimate / nT).toBeGreaterThan(0.7);
    expect(r.estimate / nT).toBeLessThan(1.3);
  });

  it('is deterministic: the same design gives the same bytes, vertexElectrode included (TWMESH round trip)', () => {
    const again = meshDesign(gatedDesign()).mesh;
    const a = encodeMeshBinary(m);
    const b = encodeMeshBinary(again);
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(true);
    const back = decodeMeshBinary(a);
    expect(Buffer.from(back.vertexElectrode!).equals(Buffer.from(m.vertexElectrode!))).toBe(true);
    expect(Buffer.from(back.tetRegion).equals(Buffer.from(m.tetRegion))).toBe(true);
  });

  it('bisecting further keeps every child in its parent\'s layer (children are subsets of the parent)', () => {
    const bm = meshDesign({ ...d, refinement: { ...d.refinement, targetRelError: 0.3 } }, { keepBisectionMesh: true }).bisectionMesh!;
    const before = bm.nTets;
    const fine = toTetMesh(refineUniform(bm, 2));
    let wrong = 0;
    for (let t = 0; t < fine.tets.length / 4; t++) {
      const reg = fine.tetRegion[t];
      if (reg === ELECTRODE_REGION) continue;
      const l = d.host.layers![reg];
      for (let i = 0; i < 4; i++) {
        const z = fine.coords[3 * fine.tets[4 * t + i] + 2];
        if (!(z >= (l.zMinNm ?? -Infinity) && z <= (l.zMaxNm ?? Infinity))) wrong++;
      }
    }
    expect(wrong).toBe(0);
    expect(fine.tets.length / 4).toBeGreaterThanOrEqual(4 * before);
  });
});

describe('device grid', () => {
  it('puts grid lines at every interface and face and keeps cells near the plain spacing', () => {
    const d = gatedDesign();
    const cells = chooseInitialCells(d.domain.halfExtentsNm, 2);
    const g = deviceGrid(d, cells)!;
    const p = planes(d);
    for (let a = 0; a < 3; a++) {
      const lines = Array.from(g.lines[a]);
      for (const c of p[a]) if (c > d.domain.center[a] - d.domain.halfExtentsNm[a] && c < d.domain.center[a] + d.domain.halfExtentsNm[a]) expect(lines).toContain(c);
      // no cell longer than 1.5× the plain spacing (round(L/s) cells per interval; common practice)
      const s = (2 * d.domain.halfExtentsNm[a]) / cells[a];
      for (let i = 1; i < lines.length; i++) expect(lines[i] - lines[i - 1]).toBeLessThanOrEqual(1.5 * s + 1e-12);
    }
  });

  it('a design whose layers put no interface inside the box meshes byte for byte like the plain design', () => {
    const plain: Design = { ...gatedDesign(), electrodes: undefined, host: { ...gatedDesign().host, layers: undefined } };
    const layered: Design = {
      ...plain,
      host: { ...plain.host, layers: [{ name: 'silicon', epsilonR: 11.7, zMinNm: null, zMaxNm: 50 }, { name: 'oxide', epsilonR: 3.9, zMinNm: 50, zMaxNm: null }] },
    };
    expect(deviceGrid(layered, [2, 2, 2])).toBeNull();
    const a = encodeMeshBinary(meshDesign(plain).mesh);
    const b = encodeMeshBinary(meshDesign(layered).mesh);
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(true);
    expect(estimateDesignElements(plain).estimate).toBe(estimateDesignElements(layered).estimate);
  });

  it('kuhnBox refuses grid lines that do not run from the box min to the box max in increasing order', () => {
    expect(() => kuhnBox({ center: [0, 0, 0], halfExtents: [1, 1, 1], cells: [2, 1, 1], lines: [[-1, 0.5, 0.2], [-1, 1], [-1, 1]] })).toThrow(MeshError);
    expect(() => kuhnBox({ center: [0, 0, 0], halfExtents: [1, 1, 1], cells: [2, 1, 1], lines: [[-1, 0, 0.9], [-1, 1], [-1, 1]] })).toThrow(MeshError);
    const ok = kuhnBox({ center: [0, 0, 0], halfExtents: [1, 1, 1], cells: [2, 1, 1], lines: [[-1, 0.7, 1], [-1, 1], [-1, 1]] });
    expect(checkMesh(toTetMesh(ok)).ok).toBe(true);
  });
});

function tetVolume(c: Float64Array, tets: Uint32Array, t: number): number {
  const p = [0, 1, 2, 3].map((i) => 3 * tets[4 * t + i]);
  const u = [0, 1, 2].map((k) => c[p[1] + k] - c[p[0] + k]);
  const v = [0, 1, 2].map((k) => c[p[2] + k] - c[p[0] + k]);
  const w = [0, 1, 2].map((k) => c[p[3] + k] - c[p[0] + k]);
  return (u[0] * (v[1] * w[2] - v[2] * w[1]) - u[1] * (v[0] * w[2] - v[2] * w[0]) + u[2] * (v[0] * w[1] - v[1] * w[0])) / 6;
}

function longestEdge(c: Float64Array, tets: Uint32Array, t: number): number {
  let L = 0;
  for (let i = 0; i < 4; i++) {
    for (let j = i + 1; j < 4; j++) {
      const a = 3 * tets[4 * t + i], b = 3 * tets[4 * t + j];
      L = Math.max(L, Math.hypot(c[a] - c[b], c[a + 1] - c[b + 1], c[a + 2] - c[b + 2]));
    }
  }
  return L;
}

describe('electrode-edge size and grading given directly', () => {
  const d = gatedDesign(2);
  const seg = electrodeEdgeSegments(d);
  /** distance from a point to the nearest edge segment (segments are axis-aligned boxes) */
  const edgeDist = (x: number, y: number, z: number): number => {
    let best = Infinity;
    for (let k = 0; k < seg.length; k += 6) {
      const p = [x, y, z];
      let q = 0;
      for (let a = 0; a < 3; a++) {
        const g = Math.max(0, p[a] - Math.max(seg[k + a], seg[k + 3 + a]), Math.min(seg[k + a], seg[k + 3 + a]) - p[a]);
        q += g * g;
      }
      best = Math.min(best, Math.sqrt(q));
    }
    return best;
  };

  it('electrodeEdgeNm and electrodeEdgeExponent set h_E and β_E; β_E = 1 gives h = min(hmax, max(h_E, d)) (the rule of ElectrodeEdgeSpec)', () => {
    const { spec, params } = sizeFieldFromDesign(d, { electrodeEdgeNm: 0.5, electrodeEdgeExponent: 1, h0Nm: 100 });
    expect(params.electrodeEdges!.hNm).toBe(0.5);
    expect(params.electrodeEdges!.exponent).toBe(1);
    expect(params.electrodeEdges!.rule).toContain('0.5 nm (given)');
    const f = new SizeField(spec);
    for (const [x, y, z] of [[3, 3, 2], [3.2, 3, 2], [4, 0, 2], [5, 5, 5], [0, 0, 8], [9, 9, -9]]) {
      const dist = edgeDist(x, y, z);
      expect(f.valueAt(x, y, z)).toBeCloseTo(Math.min(params.hmaxNm, Math.max(0.5, dist)), 12);
    }
  });

  it('defaults are unchanged (h_E = hmax/4, β_E = 3/4 for P2) and an exponent above 1 or a size ≤ 0 is refused', () => {
    const base = sizeFieldFromDesign(d).params.electrodeEdges!;
    expect(base.hNm).toBeCloseTo(sizeFieldFromDesign(d).params.hmaxNm / 4, 12);
    expect(base.exponent).toBeCloseTo(0.75, 12);
    expect(() => sizeFieldFromDesign(d, { electrodeEdgeExponent: 1.5 })).toThrow(MeshError);
    expect(() => sizeFieldFromDesign(d, { electrodeEdgeNm: 0 })).toThrow(MeshError);
  });

  it('a smaller given h_E refines only near the edges: tets touching an edge are no longer than it, and the mesh stays valid', () => {
    const r = meshDesign(d, { electrodeEdgeNm: 0.4, electrodeEdgeExponent: 1 });
    const m = r.mesh;
    expect(checkMesh(m).ok).toBe(true);
    let maxNear = 0;
    const nT = m.tets.length / 4;
    for (let t = 0; t < nT; t++) {
      let touches = false;
      for (let i = 0; i < 4 && !touches; i++) {
        const v = 3 * m.tets[4 * t + i];
        touches = edgeDist(m.coords[v], m.coords[v + 1], m.coords[v + 2]) === 0;
      }
      if (touches) maxNear = Math.max(maxNear, longestEdge(m.coords, m.tets, t));
    }
    expect(maxNear).toBeGreaterThan(0);
    expect(maxNear).toBeLessThanOrEqual(0.4 * (1 + 1e-12));
  });
});
