/**
 * TWMESH: Tetrawell's compact binary mesh format, for storage in PostgreSQL (bytea) and transfer
 * to the browser. All integers little-endian; every array starts at an 8-byte aligned offset, so
 * a reader can view the arrays in place when the buffer itself is aligned.
 *
 *   offset  size  field
 *   0       6     magic: ASCII "TWMESH"
 *   6       2     format version, UInt16 (= 1)
 *   8       4     number of arrays N, UInt32
 *   12      4     reserved, 0
 *   16      8     total file length in bytes, UInt64 (detects truncation)
 *   24      24·N  array descriptors, one per array:
 *                   +0  UInt16 array code   (which mesh array, table below)
 *                   +2  UInt8  element type (1 UInt8, 2 UInt16, 3 UInt32, 4 Int32, 5 Float32,
 *                                            6 Float64, 7 Int8, 8 Int16)
 *                   +3  UInt8  components per entity (3 for coords, 4 for tets, …)
 *                   +4  UInt32 reserved, 0
 *                   +8  UInt64 number of elements (not bytes)
 *                   +16 UInt64 byte offset of the data from the start of the file
 *   …             the arrays in descriptor order, each padded with zero bytes to a multiple of 8
 *
 *   code  array            type     components
 *   1     coords           Float64  3   (nm)
 *   2     tets             UInt32   4   (positively oriented)
 *   3     tetLevel         UInt8    1
 *   4     tetRegion        UInt8    1
 *   5     parents          UInt32   2   (0xffffffff = none)
 *   6     vertexLevel      UInt8    1
 *   7     boundaryVertex   UInt8    1
 *   8     vertexElectrode  UInt8    1   (optional: only meshes of designs with layers or electrodes;
 *                                       0xff = no electrode; a reader that predates it skips it)
 *
 * Decoders reject a wrong magic, an unknown version, a length that does not match, arrays that
 * run past the end or disagree in size, and indices out of range — each with a plain message.
 * Array codes they do not know are skipped (room for additions within version 1).
 */
import { CoreError } from '../../errors';
import type { TetMesh } from '../types';
import { NO_PARENT } from '../types';
import { HOST_LITTLE_ENDIAN, leBytes } from './bytes';

export const MESH_BINARY_MAGIC = 'TWMESH';
export const MESH_BINARY_VERSION = 1;
const HEADER_BYTES = 24;
const DESCRIPTOR_BYTES = 24;

type ArrayCtor =
  | Uint8ArrayConstructor
  | Uint16ArrayConstructor
  | Uint32ArrayConstructor
  | Int32ArrayConstructor
  | Float32ArrayConstructor
  | Float64ArrayConstructor
  | Int8ArrayConstructor
  | Int16ArrayConstructor;

const DTYPES: Record<number, ArrayCtor> = {
  1: Uint8Array,
  2: Uint16Array,
  3: Uint32Array,
  4: Int32Array,
  5: Float32Array,
  6: Float64Array,
  7: Int8Array,
  8: Int16Array,
};

interface FieldSpec {
  code: number;
  key: keyof TetMesh;
  dtype: number;
  components: number;
  /** written only when the mesh has it; never required by the reader */
  optional?: boolean;
}

/** The arrays of a TetMesh, in file order. */
const FIELDS: FieldSpec[] = [
  { code: 1, key: 'coords', dtype: 6, components: 3 },
  { code: 2, key: 'tets', dtype: 3, components: 4 },
  { code: 3, key: 'tetLevel', dtype: 1, components: 1 },
  { code: 4, key: 'tetRegion', dtype: 1, components: 1 },
  { code: 5, key: 'parents', dtype: 3, components: 2 },
  { code: 6, key: 'vertexLevel', dtype: 1, components: 1 },
  { code: 7, key: 'boundaryVertex', dtype: 1, components: 1 },
  { code: 8, key: 'vertexElectrode', dtype: 1, components: 1, optional: true },
];

const align8 = (n: number) => (n + 7) & ~7;

/** Encode a mesh (its seven arrays) into TWMESH bytes. */
export function encodeMeshBinary(mesh: TetMesh): Uint8Array {
  const arrays = FIELDS.filter((f) => !f.optional || mesh[f.key] !== undefined).map((f) => {
    const a = mesh[f.key] as ArrayLike<number> & ArrayBufferView;
    const Ctor = DTYPES[f.dtype];
    if (!(a instanceof Ctor)) throw new Error(`mesh.${String(f.key)} must be a ${Ctor.name}`);
    if (a.length % f.components !== 0) throw new Error(`mesh.${String(f.key)} length ${a.length} is not a multiple of ${f.components}`);
    return { spec: f, array: a as unknown as InstanceType<ArrayCtor> };
  });
  let offset = HEADER_BYTES + DESCRIPTOR_BYTES * arrays.length;
  const offsets: number[] = [];
  for (const { array } of arrays) {
    offsets.push(offset);
    offset = align8(offset + array.byteLength);
  }
  const total = offset;
  const out = new Uint8Array(total); // zero-filled: padding and reserved fields are 0
  const dv = new DataView(out.buffer);
  for (let i = 0; i < 6; i++) out[i] = MESH_BINARY_MAGIC.charCodeAt(i);
  dv.setUint16(6, MESH_BINARY_VERSION, true);
  dv.setUint32(8, arrays.length, true);
  dv.setBigUint64(16, BigInt(total), true);
  arrays.forEach(({ spec, array }, i) => {
    const d = HEADER_BYTES + DESCRIPTOR_BYTES * i;
    dv.setUint16(d, spec.code, true);
    dv.setUint8(d + 2, spec.dtype);
    dv.setUint8(d + 3, spec.components);
    dv.setBigUint64(d + 8, BigInt(array.length), true);
    dv.setBigUint64(d + 16, BigInt(offsets[i]), true);
    out.set(leBytes(array), offsets[i]);
  });
  return out;
}

/** Error thrown by decodeMeshBinary (a CoreError, code 'bad-mesh-bytes'); `message` says what is wrong. */
export class MeshBinaryError extends CoreError<'bad-mesh-bytes'> {
  constructor(message: string) {
    super('bad-mesh-bytes', message);
    this.name = 'MeshBinaryError';
  }
}

function readU64(dv: DataView, at: number): number {
  const v = dv.getBigUint64(at, true);
  if (v > BigInt(Number.MAX_SAFE_INTEGER)) throw new MeshBinaryError(`value ${v} at byte ${at} is too large`);
  return Number(v);
}

/** Decode TWMESH bytes into a TetMesh (fresh, aligned arrays; the input is not retained). */
export function decodeMeshBinary(bytes: Uint8Array): TetMesh {
  if (bytes.length < HEADER_BYTES) throw new MeshBinaryError(`not a TWMESH file: ${bytes.length} bytes is shorter than the ${HEADER_BYTES}-byte header`);
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let magic = '';
  for (let i = 0; i < 6; i++) magic += String.fromCharCode(bytes[i]);
  if (magic !== MESH_BINARY_MAGIC) throw new MeshBinaryError(`not a TWMESH file: the first bytes are not "${MESH_BINARY_MAGIC}"`);
  const version = dv.getUint16(6, true);
  if (version !== MESH_BINARY_VERSION) throw new MeshBinaryError(`unsupported TWMESH version ${version} (this reader knows version ${MESH_BINARY_VERSION})`);
  const n = dv.getUint32(8, true);
  const total = readU64(dv, 16);
  if (bytes.length < total) throw new MeshBinaryError(`truncated TWMESH data: the header announces ${total} bytes, only ${bytes.length} present`);
  if (bytes.length > total) throw new MeshBinaryError(`TWMESH data has ${bytes.length - total} unexpected trailing bytes (header announces ${total})`);
  if (HEADER_BYTES + DESCRIPTOR_BYTES * n > total) throw new MeshBinaryError(`TWMESH header lists ${n} arrays but the file is too short for their descriptors`);

  const found = new Map<number, ArrayLike<number>>();
  for (let i = 0; i < n; i++) {
    const d = HEADER_BYTES + DESCRIPTOR_BYTES * i;
    const code = dv.getUint16(d, true);
    const dtype = dv.getUint8(d + 2);
    const components = dv.getUint8(d + 3);
    const length = readU64(dv, d + 8);
    const offset = readU64(dv, d + 16);
    const spec = FIELDS.find((f) => f.code === code);
    if (!spec) continue; // unknown array code: skipped by design
    if (found.has(code)) throw new MeshBinaryError(`array ${String(spec.key)} appears twice`);
    if (dtype !== spec.dtype || components !== spec.components) {
      throw new MeshBinaryError(`array ${String(spec.key)} has element type ${dtype} × ${components}, expected ${spec.dtype} × ${spec.components}`);
    }
    const Ctor = DTYPES[dtype];
    const byteLength = length * Ctor.BYTES_PER_ELEMENT;
    if (offset % 8 !== 0 || offset < HEADER_BYTES + DESCRIPTOR_BYTES * n || offset + byteLength > total) {
      throw new MeshBinaryError(`array ${String(spec.key)} (${byteLength} bytes at offset ${offset}) lies outside the data or is misaligned`);
    }
    if (length % components !== 0) throw new MeshBinaryError(`array ${String(spec.key)} length ${length} is not a multiple of ${components}`);
    const arr = new Ctor(length);
    const dst = new Uint8Array(arr.buffer);
    dst.set(bytes.subarray(offset, offset + byteLength));
    if (!HOST_LITTLE_ENDIAN && Ctor.BYTES_PER_ELEMENT > 1) dst.set(leBytes(arr)); // swap back to host order
    found.set(code, arr);
  }
  for (const f of FIELDS) if (!f.optional && !found.has(f.code)) throw new MeshBinaryError(`TWMESH data lacks the ${String(f.key)} array`);

  const mesh = Object.fromEntries(FIELDS.filter((f) => found.has(f.code)).map((f) => [f.key, found.get(f.code)])) as unknown as TetMesh;
  const nV = mesh.coords.length / 3;
  const m = mesh.tets.length / 4;
  const expect = (key: keyof TetMesh, len: number) => {
    const got = (mesh[key] as ArrayLike<number>).length;
    if (got !== len) throw new MeshBinaryError(`array ${String(key)} has ${got} entries, expected ${len}`);
  };
  expect('tetLevel', m);
  expect('tetRegion', m);
  expect('parents', 2 * nV);
  expect('vertexLevel', nV);
  expect('boundaryVertex', nV);
  if (mesh.vertexElectrode) expect('vertexElectrode', nV);
  for (let i = 0; i < mesh.tets.length; i++) {
    if (mesh.tets[i] >= nV) throw new MeshBinaryError(`tet ${Math.floor(i / 4)} refers to vertex ${mesh.tets[i]}, but there are ${nV}`);
  }
  for (let i = 0; i < mesh.parents.length; i++) {
    const p = mesh.parents[i];
    if (p !== NO_PARENT && p >= nV) throw new MeshBinaryError(`vertex ${i >> 1} has parent ${p}, but there are ${nV} vertices`);
  }
  return mesh;
}
