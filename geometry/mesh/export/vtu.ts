/**
 * VTK XML UnstructuredGrid (.vtu) writer, following the VTK file-format documentation
 * ("VTK File Formats", XML formats, UnstructuredGrid; cell types 10 = VTK_TETRA, 24 = VTK_QUADRATIC_TETRA).
 *
 * Choices (documented so that readers and tests can rely on them):
 *  - Points are Float64 (nm). Connectivity and offsets are Int32: node counts are bounded by
 *    Uint32 indices anyway, Int32 halves the size against Int64, and every VTK reader accepts
 *    it; a mesh with 2³¹ or more nodes (or connectivity entries) is refused with a clear error.
 *  - header_type="UInt64", byte_order="LittleEndian".
 *  - Default encoding: inline base64 with zlib compression (compressor="vtkZLibDataCompressor").
 *    Each DataArray holds
 *
 *        base64( [nblocks][blockSize][lastPartialSize][csize_1] … [csize_nblocks] )   (UInt64 each)
 *        base64( zlib(block_1) ‖ zlib(block_2) ‖ … )
 *
 *    i.e. the header and the compressed blocks are encoded as two separate base64 runs; blocks
 *    hold blockSize raw bytes except a shorter last one, whose size is lastPartialSize
 *    (0 when the last block is full), as the VTK documentation lays out.
 *  - 'base64' (uncompressed): base64([byte count as UInt64]) then base64(raw bytes).
 *  - 'ascii': whitespace-separated numbers; floats in the shortest form that reads back to the
 *    same double (ECMAScript Number-to-String), so ASCII files also round-trip exactly.
 *  - CellData: RegionId (UInt8), RefinementLevel (UInt8), MeanRatio (Float64, Liu & Joe 1994 mean
 *    ratio: 1 = regular tet). PointData: SizeFieldNm (optional) and caller-named arrays such as a
 *    potential; for order 2 they live on the P2 nodes (a per-vertex array is extended to the edge
 *    midpoints by averaging, i.e. its linear interpolant).
 *
 * Output is a Uint8Array; the same mesh and options give the same bytes (no timestamps, fixed
 * block size and compression level, deterministic zlib).
 */
import { cooperate, COOPERATE_MASK } from '../../cooperate';
import { zlibSync } from 'fflate';
import type { TetMesh } from '../types';
import { buildEdges, type EdgeTable } from '../edges';
import { p2Connectivity, p2Coords, p2ExtendVertexField } from '../p2';
import { computeMeanRatio } from '../quality';
import { base64Into, base64Length, concatBytes, leBytes, utf8 } from './bytes';

export type VtuEncoding = 'zlib' | 'base64' | 'ascii';

export type NumericArray =
  | Uint8Array
  | Int8Array
  | Uint16Array
  | Int16Array
  | Uint32Array
  | Int32Array
  | Float32Array
  | Float64Array;

/** A named data array; `values.length` = components × (number of points or cells). */
export interface NamedArray {
  name: string;
  values: NumericArray | ArrayLike<number>;
  /** components per point/cell (default 1) */
  components?: number;
}

export interface VtuOptions {
  /** 1: linear tetrahedra (type 10); 2: 10-node quadratic tetrahedra (type 24). Default 1. */
  order?: 1 | 2;
  /** Default 'zlib'. */
  encoding?: VtuEncoding;
  /** zlib level 0–9 (default 1: fastest; Float64 coordinates gain little from higher levels) */
  compressionLevel?: number;
  /** raw bytes per compressed block (default 65536) */
  blockSize?: number;
  /**
   * The block compressor: must return a zlib stream (RFC 1950) of its input. Default: fflate's
   * portable `zlibSync`. A Node caller may pass `(raw, level) => zlib.deflateSync(raw, { level })`
   * (native, several times faster); the file format is the same either way.
   */
  deflate?: (raw: Uint8Array, level: number) => Uint8Array;
  /** per-vertex (or per-P2-node) target element size in nm, written as PointData "SizeFieldNm" */
  sizeField?: ArrayLike<number>;
  /** further PointData arrays (e.g. a potential); for order 2 on the P2 nodes */
  pointData?: NamedArray[];
  /** further CellData arrays, one value (× components) per tet */
  cellData?: NamedArray[];
  /** precomputed mean ratio per tet (else computed here) */
  meanRatio?: Float64Array;
  /** precomputed edge table (order 2) */
  edgeTable?: EdgeTable;
}

export const VTK_TETRA = 10;
export const VTK_QUADRATIC_TETRA = 24;
const INT32_MAX = 0x7fffffff;

function vtkTypeName(a: NumericArray): string {
  if (a instanceof Float64Array) return 'Float64';
  if (a instanceof Float32Array) return 'Float32';
  if (a instanceof Int32Array) return 'Int32';
  if (a instanceof Uint32Array) return 'UInt32';
  if (a instanceof Int16Array) return 'Int16';
  if (a instanceof Uint16Array) return 'UInt16';
  if (a instanceof Int8Array) return 'Int8';
  return 'UInt8';
}

function isTyped(v: unknown): v is NumericArray {
  return ArrayBuffer.isView(v) && !(v instanceof DataView);
}

function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

type Deflate = (raw: Uint8Array, level: number) => Uint8Array;
/** The portable default compressor: fflate's zlib (RFC 1950) stream, deterministic for a given level. */
const fflateDeflate: Deflate = (raw, level) => zlibSync(raw, { level: level as 0 | 1 | 2 | 3 | 4 | 5 | 6 | 7 | 8 | 9 });

/** Encoded body of one DataArray (the bytes between the tags). */
function encodeBody(a: NumericArray, encoding: VtuEncoding, level: number, blockSize: number, perLine: number, deflate: Deflate): Uint8Array {
  if (encoding === 'ascii') return asciiBody(a, perLine);
  const raw = leBytes(a);
  if (encoding === 'base64') {
    const head = new Uint8Array(8);
    new DataView(head.buffer).setBigUint64(0, BigInt(raw.length), true);
    const out = new Uint8Array(base64Length(8) + base64Length(raw.length));
    base64Into(raw, out, base64Into(head, out, 0));
    return out;
  }
  const nBlocks = Math.ceil(raw.length / blockSize);
  const blocks: Uint8Array[] = new Array(nBlocks);
  let cTotal = 0;
  for (let b = 0; b < nBlocks; b++) {
    const chunk = raw.subarray(b * blockSize, Math.min(raw.length, (b + 1) * blockSize));
    cooperate();
    blocks[b] = deflate(chunk, level);
    cTotal += blocks[b].length;
  }
  const head = new Uint8Array(8 * (3 + nBlocks));
  const dv = new DataView(head.buffer);
  dv.setBigUint64(0, BigInt(nBlocks), true);
  dv.setBigUint64(8, BigInt(blockSize), true);
  dv.setBigUint64(16, BigInt(raw.length % blockSize), true);
  for (let b = 0; b < nBlocks; b++) dv.setBigUint64(24 + 8 * b, BigInt(blocks[b].length), true);
  const payload = concatBytes(blocks);
  const out = new Uint8Array(base64Length(head.length) + base64Length(cTotal));
  base64Into(payload, out, base64Into(head, out, 0));
  return out;
}

/** ASCII body: `perLine` values per line (one point, one cell). */
function asciiBody(a: NumericArray, perLine: number): Uint8Array {
  const lines: string[] = new Array(Math.ceil(a.length / perLine));
  const row: string[] = new Array(perLine);
  if (a.length % perLine !== 0) throw new Error(`array length ${a.length} is not a multiple of ${perLine}`);
  for (let i = 0, l = 0; i < a.length; i += perLine, l++) {
    if ((l & COOPERATE_MASK) === 0) cooperate();
    for (let k = 0; k < perLine; k++) row[k] = String(a[i + k]);
    lines[l] = row.join(' ');
  }
  return utf8(lines.join('\n'));
}

interface Part {
  name: string;
  values: NumericArray;
  components: number;
  /** values per line in ASCII (default: components) */
  perLine?: number;
}

function toTyped(arr: NamedArray, expectedTuples: number, where: string): Part {
  const components = arr.components ?? 1;
  const values = isTyped(arr.values) ? arr.values : Float64Array.from(arr.values as ArrayLike<number>);
  if (values.length !== components * expectedTuples) {
    throw new Error(`${where} array "${arr.name}" has ${values.length} values, expected ${components} × ${expectedTuples}`);
  }
  return { name: arr.name, values, components };
}

/** Write a mesh as a VTK XML UnstructuredGrid file. */
export function writeVtu(mesh: TetMesh, options: VtuOptions = {}): Uint8Array {
  const order = options.order ?? 1;
  const encoding = options.encoding ?? 'zlib';
  const level = options.compressionLevel ?? 1;
  const blockSize = options.blockSize ?? 65536;
  const deflate = options.deflate ?? fflateDeflate;
  if (order !== 1 && order !== 2) throw new Error(`order must be 1 or 2 (got ${order})`);
  if (!(Number.isInteger(level) && level >= 0 && level <= 9)) throw new Error('compressionLevel must be an integer 0–9');
  if (!(Number.isInteger(blockSize) && blockSize >= 1024)) throw new Error('blockSize must be an integer ≥ 1024');
  const nV = mesh.coords.length / 3;
  const m = mesh.tets.length >> 2;
  if (m === 0) throw new Error('cannot export an empty mesh (no tetrahedra)');

  // points and connectivity
  let points: Float64Array;
  let conn: Uint32Array;
  let et: EdgeTable | undefined;
  if (order === 2) {
    et = options.edgeTable ?? buildEdges(mesh.tets, nV);
    points = p2Coords(mesh, et);
    conn = p2Connectivity(mesh, et);
  } else {
    points = mesh.coords;
    conn = mesh.tets;
  }
  const nPoints = points.length / 3;
  const nodesPerCell = order === 2 ? 10 : 4;
  if (nPoints > INT32_MAX || conn.length > INT32_MAX) {
    throw new Error(`mesh too large for Int32 connectivity (${nPoints} points, ${conn.length} entries)`);
  }
  // Uint32 indices below 2³¹ have the same bytes as Int32: reinterpret without copying
  const connectivity = new Int32Array(conn.buffer, conn.byteOffset, conn.length);
  const offsets = new Int32Array(m);
  for (let t = 0; t < m; t++) offsets[t] = (t + 1) * nodesPerCell;
  const types = new Uint8Array(m).fill(order === 2 ? VTK_QUADRATIC_TETRA : VTK_TETRA);

  // point data
  const pointParts: Part[] = [];
  const onPoints = (arr: NamedArray): Part => {
    const comps = arr.components ?? 1;
    if (order === 2 && et && arr.values.length === comps * nV) {
      return { name: arr.name, values: p2ExtendVertexField(arr.values, et, nV, comps), components: comps };
    }
    return toTyped(arr, nPoints, 'PointData');
  };
  if (options.sizeField) pointParts.push(onPoints({ name: 'SizeFieldNm', values: options.sizeField }));
  for (const arr of options.pointData ?? []) pointParts.push(onPoints(arr));

  // cell data
  const cellParts: Part[] = [];
  if (mesh.tetRegion) cellParts.push(toTyped({ name: 'RegionId', values: mesh.tetRegion }, m, 'CellData'));
  if (mesh.tetLevel) cellParts.push(toTyped({ name: 'RefinementLevel', values: mesh.tetLevel }, m, 'CellData'));
  const meanRatio = options.meanRatio ?? computeMeanRatio(mesh);
  cellParts.push(toTyped({ name: 'MeanRatio', values: meanRatio }, m, 'CellData'));
  for (const arr of options.cellData ?? []) cellParts.push(toTyped(arr, m, 'CellData'));

  const names = new Set<string>();
  for (const p of [...pointParts, ...cellParts]) {
    const key = (pointParts.includes(p) ? 'p:' : 'c:') + p.name;
    if (names.has(key)) throw new Error(`duplicate data array name "${p.name}"`);
    names.add(key);
  }

  const format = encoding === 'ascii' ? 'ascii' : 'binary';
  const out: Uint8Array[] = [];
  const text = (s: string) => out.push(utf8(s));
  const dataArray = (indent: string, p: Part) => {
    const comps = p.components > 1 ? ` NumberOfComponents="${p.components}"` : '';
    text(`${indent}<DataArray type="${vtkTypeName(p.values)}" Name="${escapeXml(p.name)}"${comps} format="${format}">\n`);
    out.push(encodeBody(p.values, encoding, level, blockSize, p.perLine ?? p.components, deflate));
    text(`\n${indent}</DataArray>\n`);
  };

  const compressor = encoding === 'zlib' ? ' compressor="vtkZLibDataCompressor"' : '';
  text('<?xml version="1.0"?>\n');
  text(
    `<!-- Tetrawell tetrahedral mesh: lengths in nm, ${order === 2 ? '10-node quadratic' : 'linear'} tetrahedra. ` +
      'A model mesh: quantities derived from it are estimates to be confirmed by your own validated methods. -->\n',
  );
  text(`<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" header_type="UInt64"${compressor}>\n`);
  text('  <UnstructuredGrid>\n');
  text(`    <Piece NumberOfPoints="${nPoints}" NumberOfCells="${m}">\n`);
  if (pointParts.length) {
    text(`      <PointData Scalars="${escapeXml(pointParts[0].name)}">\n`);
    for (const p of pointParts) dataArray('        ', p);
    text('      </PointData>\n');
  }
  text(`      <CellData Scalars="${escapeXml(cellParts[0].name)}">\n`);
  for (const p of cellParts) dataArray('        ', p);
  text('      </CellData>\n');
  text('      <Points>\n');
  dataArray('        ', { name: 'Points', values: points, components: 3 });
  text('      </Points>\n');
  text('      <Cells>\n');
  dataArray('        ', { name: 'connectivity', values: connectivity, components: 1, perLine: nodesPerCell });
  dataArray('        ', { name: 'offsets', values: offsets, components: 1 });
  dataArray('        ', { name: 'types', values: types, components: 1 });
  text('      </Cells>\n');
  text('    </Piece>\n');
  text('  </UnstructuredGrid>\n');
  text('</VTKFile>\n');
  return concatBytes(out);
}
