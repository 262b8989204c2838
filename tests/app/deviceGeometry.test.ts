/**
 * What the canvas draws of a device (app/src/features/studio/canvas/deviceGeometry.ts): layers and
 * electrodes clipped to the domain box, and the merged buffers (one draw call for all slabs, one
 * for all boxes). Checks are plain geometry: a box has 6 faces of 2 triangles (36 vertices) and
 * 12 edges (24 segment ends); its clipped volume is the product of the clipped spans; the sum of
 * the triangles' signed volumes against the origin is the box volume (divergence theorem), which
 * holds only if every face is wound outward.
 */
import { describe, expect, it } from 'vitest';
import type { DesignDocument } from '@contracts/design';
import { boxEdges, boxTriangles, electrodeBoxes, layerSlabs, voltText } from '../../app/src/features/studio/canvas/deviceGeometry';
import { oxidePreset } from '../../app/src/features/studio/device/deviceEdit';

const doc: DesignDocument = {
  format: 'tetrawell-design',
  version: 2,
  name: 'Invented gate stack',
  host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431020511, layers: oxidePreset(0) },
  sites: [{ id: 'p1', species: 'P', position: [0, 0, -20], electrons: 1 }],
  domain: { center: [0, 0, -10], halfExtentsNm: [30, 20, 25], boundary: { kind: 'grounded' } },
  electrodes: [
    { name: 'top', minNm: [-100, -100, 5], maxNm: [100, 100, 40], voltageV: 0.5 },
    { name: 'lead', minNm: [10, -3, -21], maxNm: [50, 3, -19], voltageV: -0.25 },
    { name: 'far', minNm: [100, 100, 100], maxNm: [101, 101, 101], voltageV: 0 },
  ],
  refinement: { order: 2, targetRelError: 0.01, maxElements: 100000 },
};

/** Σ over triangles of p0 · (p1 × p2) / 6: the enclosed volume for an outward-wound closed surface. */
function signedVolume(pos: Float32Array, from: number, to: number): number {
  let v = 0;
  for (let t = from; t < to; t += 9) {
    const [a, b, c, d, e, f, g, h, i] = pos.subarray(t, t + 9);
    v += (a * (e * i - f * h) - b * (d * i - f * g) + c * (d * h - e * g)) / 6;
  }
  return v;
}

describe('device shapes on the canvas', () => {
  it('clips the layers to the domain box (z from −35 to 15 nm here)', () => {
    const s = layerSlabs(doc);
    expect(s.map((x) => x.name)).toEqual(['silicon', 'oxide', 'vacuum']);
    expect(s.map((x) => [x.lo[2], x.hi[2]])).toEqual([[-35, 0], [0, 5], [5, 15]]);
    expect(s[0].lo.slice(0, 2)).toEqual([-30, -20]);
    expect(s[0].hi.slice(0, 2)).toEqual([30, 20]);
    // a layer wholly above the box is left out
    const high = { ...doc, host: { ...doc.host, layers: oxidePreset(20) } };
    expect(layerSlabs(high).map((x) => x.name)).toEqual(['silicon']);
  });

  it('clips the electrodes to the box and leaves out those outside it', () => {
    const b = electrodeBoxes(doc);
    expect(b.map((x) => x.name)).toEqual(['top', 'lead']);
    expect(b[0].lo).toEqual([-30, -20, 5]);
    expect(b[0].hi).toEqual([30, 20, 15]);
    expect(b[1].lo).toEqual([10, -3, -21]);
    expect(b[1].hi).toEqual([30, 3, -19]);
  });

  it('merges every box into one buffer: 36 vertices a box, closed and wound outward', () => {
    const b = electrodeBoxes(doc);
    const { positions, colors } = boxTriangles(b, (k) => [k, 0, 1]);
    expect(positions.length).toBe(b.length * 36 * 3);
    expect(colors[3 * 36]).toBe(1); // the second box's first vertex carries its own colour
    b.forEach((box, k) => {
      const vol = (box.hi[0] - box.lo[0]) * (box.hi[1] - box.lo[1]) * (box.hi[2] - box.lo[2]);
      expect(signedVolume(positions, k * 108, (k + 1) * 108)).toBeCloseTo(vol, 6);
    });
    expect(boxEdges(b).length).toBe(b.length * 24 * 3);
  });

  it('writes voltages with their sign and unit', () => {
    expect(voltText(0.5)).toBe('+0.5 V');
    expect(voltText(-0.25)).toBe('−0.25 V');
    expect(voltText(0)).toBe('0 V');
  });
});
