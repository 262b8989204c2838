/**
 * Export tests with an outside reader: files written by geometry/mesh/export are read back by
 * meshio (Debian python3-meshio, via tests/geometry/mesh/read_vtu.py), which decodes the VTK XML
 * and legacy formats on its own (Python base64/zlib/numpy). We check counts, cell types, node
 * order, data arrays and the summed volume it computes against the box volume.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { unzlibSync } from 'fflate';
import { deflateSync } from 'node:zlib';
import {
  decodeMeshBinary,
  encodeMeshBinary,
  MeshBinaryError,
  writeVtkLegacy,
  writeVtu,
  type VtuEncoding,
} from '../../../geometry/mesh/export/index';
import { buildEdges } from '../../../geometry/mesh/edges';
import { p2Connectivity, p2Coords } from '../../../geometry/mesh/p2';
import { computeTetQuality } from '../../../geometry/mesh/quality';
import { kuhnBox, refine, toTetMesh } from '../../../geometry/mesh/index';
import type { TetMesh } from '../../../geometry/mesh/types';
import { kuhnGrid } from './check.fixtures';

const PYTHON = '/usr/bin/python3'; // Debian's python, which sees python3-meshio
const READER = fileURLToPath(new URL('./read_vtu.py', import.meta.url));

interface ReadBack {
  file: string;
  numPoints: number;
  points: number[];
  cells: { type: string; count: number; connectivity: number[] }[];
  pointData: Record<string, number[]>;
  cellData: Record<string, number[]>;
  volume: number;
  minSignedVolume: number;
  maxMidEdgeDeviation: number | null;
}

let dir = '';
let readerMissing: string | null = null;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'tetrawell-export-'));
  try {
    execFileSync(PYTHON, ['-c', 'import meshio, numpy'], { stdio: 'pipe' });
  } catch {
    readerMissing =
      `The outside reader is missing: ${PYTHON} cannot import meshio. Install it with ` +
      '`apt-get install -y python3-meshio` (Debian package) and run the tests again.';
  }
});
afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

/** Write the files and read them with meshio; without meshio every caller FAILS (never skips). */
function readBack(files: Record<string, Uint8Array>): ReadBack[] {
  if (readerMissing) throw new Error(readerMissing);
  const paths = Object.entries(files).map(([name, bytes]) => {
    const p = join(dir, name);
    writeFileSync(p, bytes);
    return p;
  });
  const out = execFileSync(PYTHON, [READER, ...paths], { maxBuffer: 1 << 30, encoding: 'utf8' });
  return JSON.parse(out) as ReadBack[];
}

/** A graded mesher mesh of the box [-1.5, 2.5] × [-1, 1] × [0, 3] around a site at (0.3, 0.2, 1.1). */
function gradedMesh(): TetMesh {
  const bm = kuhnBox({ center: [0.5, 0, 1.5], halfExtents: [2, 1, 1.5], cells: [4, 2, 3] });
  for (let pass = 0; pass < 5; pass++) {
    const marks = new Uint8Array(bm.nTets);
    for (let t = 0; t < bm.nTets; t++) {
      const v = 3 * bm.tets[4 * t];
      if (Math.hypot(bm.coords[v] - 0.3, bm.coords[v + 1] - 0.2, bm.coords[v + 2] - 1.1) < 0.8) marks[t] = 1;
    }
    refine(bm, marks);
  }
  const mesh = toTetMesh(bm);
  // give some tets region 1 so the region array carries information
  for (let t = 0; t < mesh.tetRegion.length; t++) mesh.tetRegion[t] = t % 3 === 0 ? 1 : 0;
  return mesh;
}
const BOX_VOLUME = 4 * 2 * 3;

describe('VTK XML (.vtu) export read by meshio', () => {
  const mesh = gradedMesh();
  const nV = mesh.coords.length / 3;
  const m = mesh.tets.length / 4;
  const et = buildEdges(mesh.tets, nV);
  const nE = et.edges.length / 2;
  const size = Float64Array.from({ length: nV }, (_, i) => 0.1 + Math.abs(mesh.coords[3 * i]));
  // a made-up nodal field on the P2 nodes, to check named PointData arrays
  const p2x = p2Coords(mesh, et);
  const potential = Float64Array.from({ length: nV + nE }, (_, i) => 1 / (0.05 + Math.hypot(p2x[3 * i] - 0.3, p2x[3 * i + 1] - 0.2, p2x[3 * i + 2] - 1.1)));
  const meanRatio = computeTetQuality(mesh).meanRatio;

  const cases: [string, 1 | 2, VtuEncoding, number | undefined][] = [
    ['linear-zlib.vtu', 1, 'zlib', undefined],
    ['linear-ascii.vtu', 1, 'ascii', undefined],
    ['linear-base64.vtu', 1, 'base64', undefined],
    ['quadratic-zlib.vtu', 2, 'zlib', 1024], // small blocks: many-block headers
    ['quadratic-ascii.vtu', 2, 'ascii', undefined],
  ];

  for (const [name, order, encoding, blockSize] of cases) {
    it(`${name}: counts, cell type, node order, data and summed volume agree`, () => {
      const bytes = writeVtu(mesh, {
        order,
        encoding,
        blockSize,
        sizeField: size,
        pointData:
          order === 2
            ? [
                { name: 'PotentialPerNm', values: potential },
                // a 3-component per-vertex array, extended to the mid-edge nodes by the writer
                { name: 'PositionCopy', values: mesh.coords, components: 3 },
              ]
            : [],
      });
      const [r] = readBack({ [name]: bytes });
      const nPoints = order === 2 ? nV + nE : nV;
      expect(r.numPoints).toBe(nPoints);
      expect(r.cells).toHaveLength(1);
      expect(r.cells[0].type).toBe(order === 2 ? 'tetra10' : 'tetra');
      expect(r.cells[0].count).toBe(m);
      // node order: our tets (or P2 connectivity) exactly, and Float64 points exactly
      const conn = order === 2 ? p2Connectivity(mesh, et) : mesh.tets;
      expect(r.cells[0].connectivity).toEqual(Array.from(conn));
      expect(r.points).toEqual(Array.from(order === 2 ? p2x : mesh.coords));
      if (order === 2) expect(r.maxMidEdgeDeviation).toBe(0); // nodes 4..9 at the VTK-order edge midpoints
      // volume computed by numpy from the file; positive orientation survives the round trip
      expect(Math.abs(r.volume - BOX_VOLUME) / BOX_VOLUME).toBeLessThan(1e-12);
      expect(r.minSignedVolume).toBeGreaterThan(0);
      expect(r.cellData.RegionId).toEqual(Array.from(mesh.tetRegion));
      expect(r.cellData.RefinementLevel).toEqual(Array.from(mesh.tetLevel));
      expect(r.cellData.MeanRatio).toEqual(Array.from(meanRatio));
      if (order === 1) expect(r.pointData.SizeFieldNm).toEqual(Array.from(size));
      else {
        expect(r.pointData.SizeFieldNm.slice(0, nV)).toEqual(Array.from(size));
        expect(r.pointData.SizeFieldNm).toHaveLength(nV + nE);
        expect(r.pointData.PotentialPerNm).toEqual(Array.from(potential));
        expect(r.pointData.PositionCopy).toEqual(Array.from(p2x));
      }
    });
  }

  it('a caller-supplied compressor (Node zlib) gives a file meshio reads identically', () => {
    const [a, b] = readBack({
      'fflate.vtu': writeVtu(mesh, { sizeField: size }),
      'nodezlib.vtu': writeVtu(mesh, { sizeField: size, deflate: (raw, level) => deflateSync(raw, { level }) }),
    });
    expect(b.cells[0].connectivity).toEqual(a.cells[0].connectivity);
    expect(b.points).toEqual(a.points);
    expect(b.pointData.SizeFieldNm).toEqual(a.pointData.SizeFieldNm);
    expect(b.cellData.MeanRatio).toEqual(a.cellData.MeanRatio);
  });

  it('legacy .vtk (linear and quadratic) is read by meshio with the same cells and volume', () => {
    const [a, b] = readBack({
      'linear.vtk': writeVtkLegacy(mesh, { sizeField: size }),
      'quadratic.vtk': writeVtkLegacy(mesh, { order: 2, pointData: [{ name: 'PotentialPerNm', values: potential }] }),
    });
    expect(a.numPoints).toBe(nV);
    expect(a.cells[0].type).toBe('tetra');
    expect(a.cells[0].connectivity).toEqual(Array.from(mesh.tets));
    expect(a.points).toEqual(Array.from(mesh.coords));
    expect(a.pointData.SizeFieldNm).toEqual(Array.from(size));
    expect(a.cellData.RegionId).toEqual(Array.from(mesh.tetRegion));
    expect(Math.abs(a.volume - BOX_VOLUME) / BOX_VOLUME).toBeLessThan(1e-12);
    expect(b.numPoints).toBe(nV + nE);
    expect(b.cells[0].type).toBe('tetra10');
    expect(b.cells[0].connectivity).toEqual(Array.from(p2Connectivity(mesh, et)));
    expect(b.maxMidEdgeDeviation).toBe(0);
    expect(b.pointData.PotentialPerNm).toEqual(Array.from(potential));
    expect(Math.abs(b.volume - BOX_VOLUME) / BOX_VOLUME).toBeLessThan(1e-12);
  });

  it('the zlib block header follows the VTK layout [nblocks][blockSize][lastPartial][csize…]', () => {
    const text = new TextDecoder().decode(writeVtu(kuhnGrid(3, 3, 3), { blockSize: 1024 }));
    const body = /Name="Points" NumberOfComponents="3" format="binary">\n(\S+)\n/.exec(text)![1];
    const first = Buffer.from(body.slice(0, 12), 'base64'); // 12 base64 characters hold the first UInt64
    const nBlocks = Number(new DataView(first.buffer, first.byteOffset, 8).getBigUint64(0, true));
    const headChars = 4 * Math.ceil((8 * (3 + nBlocks)) / 3);
    const head = Buffer.from(body.slice(0, headChars), 'base64');
    const hv = new DataView(head.buffer, head.byteOffset, head.byteLength);
    const raw = 64 * 3 * 8; // 4³ points × 3 × Float64
    expect(nBlocks).toBe(Math.ceil(raw / 1024));
    expect(Number(hv.getBigUint64(8, true))).toBe(1024);
    expect(Number(hv.getBigUint64(16, true))).toBe(raw % 1024);
    // decompress with fflate's inflater block by block and compare with the coordinates
    const data = Buffer.from(body.slice(headChars), 'base64');
    let at = 0;
    const parts: Uint8Array[] = [];
    for (let b = 0; b < nBlocks; b++) {
      const c = Number(hv.getBigUint64(24 + 8 * b, true));
      parts.push(unzlibSync(data.subarray(at, at + c)));
      at += c;
    }
    expect(at).toBe(data.length);
    const joined = Buffer.concat(parts);
    expect(joined.equals(Buffer.from(kuhnGrid(3, 3, 3).coords.buffer))).toBe(true);
  });

  it('is deterministic: two meshing runs give byte-identical files', () => {
    const a = writeVtu(gradedMesh(), { order: 2, sizeField: size });
    const b = writeVtu(gradedMesh(), { order: 2, sizeField: size });
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(true);
    expect(Buffer.from(writeVtkLegacy(gradedMesh())).equals(Buffer.from(writeVtkLegacy(gradedMesh())))).toBe(true);
  });

  it('refuses bad input with plain messages', () => {
    expect(() => writeVtu(mesh, { pointData: [{ name: 'phi', values: new Float64Array(3) }] })).toThrow(/phi.*expected/);
    expect(() => writeVtu(mesh, { order: 3 as 1 })).toThrow(/order/);
    const empty = { ...mesh, tets: new Uint32Array(0), tetLevel: new Uint8Array(0), tetRegion: new Uint8Array(0) };
    expect(() => writeVtu(empty)).toThrow(/empty mesh/);
    expect(() => writeVtkLegacy(mesh, { pointData: [{ name: 'has space', values: size }] })).toThrow(/name/);
  });
});

describe('TWMESH binary format', () => {
  const mesh = gradedMesh();
  const keys = ['coords', 'tets', 'tetLevel', 'tetRegion', 'parents', 'vertexLevel', 'boundaryVertex'] as const;

  it('round-trips every array exactly, also from an unaligned buffer', () => {
    const bytes = encodeMeshBinary(mesh);
    const shifted = new Uint8Array(bytes.length + 3);
    shifted.set(bytes, 3);
    for (const input of [bytes, shifted.subarray(3)]) {
      const back = decodeMeshBinary(input);
      for (const k of keys) {
        expect(back[k].constructor).toBe(mesh[k].constructor);
        expect(Buffer.from(back[k].buffer, back[k].byteOffset, back[k].byteLength).equals(Buffer.from(mesh[k].buffer, mesh[k].byteOffset, mesh[k].byteLength))).toBe(true);
      }
    }
    expect(Buffer.from(encodeMeshBinary(gradedMesh())).equals(Buffer.from(bytes))).toBe(true);
  });

  it('follows the documented layout', () => {
    const bytes = encodeMeshBinary(mesh);
    const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    expect(new TextDecoder().decode(bytes.subarray(0, 6))).toBe('TWMESH');
    expect(dv.getUint16(6, true)).toBe(1);
    expect(dv.getUint32(8, true)).toBe(7);
    expect(Number(dv.getBigUint64(16, true))).toBe(bytes.length);
    // first descriptor: coords, Float64 (6), 3 components, at an 8-aligned offset after the descriptors
    expect(dv.getUint16(24, true)).toBe(1);
    expect(dv.getUint8(26)).toBe(6);
    expect(dv.getUint8(27)).toBe(3);
    expect(Number(dv.getBigUint64(32, true))).toBe(mesh.coords.length);
    const off = Number(dv.getBigUint64(40, true));
    expect(off).toBe(24 + 7 * 24);
    expect(dv.getFloat64(off + 8 * 5, true)).toBe(mesh.coords[5]);
    for (let i = 0; i < 7; i++) expect(Number(dv.getBigUint64(24 + 24 * i + 16, true)) % 8).toBe(0);
  });

  it('rejects bad magic, version, truncation, trailing bytes and inconsistent arrays', () => {
    const good = encodeMeshBinary(kuhnGrid(2, 2, 1));
    const edit = (f: (b: Uint8Array, dv: DataView) => void) => {
      const b = good.slice();
      f(b, new DataView(b.buffer));
      return b;
    };
    expect(() => decodeMeshBinary(new Uint8Array(10))).toThrow(MeshBinaryError);
    expect(() => decodeMeshBinary(edit((b) => (b[0] = 88)))).toThrow(/not a TWMESH file/);
    expect(() => decodeMeshBinary(edit((_, dv) => dv.setUint16(6, 2, true)))).toThrow(/unsupported TWMESH version 2/);
    expect(() => decodeMeshBinary(good.subarray(0, good.length - 8))).toThrow(/truncated/);
    const longer = new Uint8Array(good.length + 8);
    longer.set(good);
    expect(() => decodeMeshBinary(longer)).toThrow(/trailing/);
    // tets (2nd descriptor) claiming one element fewer: not a multiple of 4 components
    expect(() => decodeMeshBinary(edit((_, dv) => dv.setBigUint64(24 + 24 + 8, dv.getBigUint64(24 + 24 + 8, true) - 1n, true)))).toThrow(/tets/);
    // a vertex index out of range inside the tets array
    expect(() =>
      decodeMeshBinary(
        edit((_, dv) => {
          const off = Number(dv.getBigUint64(24 + 24 + 16, true));
          dv.setUint32(off, 9999, true);
        }),
      ),
    ).toThrow(/refers to vertex 9999/);
  });
});
