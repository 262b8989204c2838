/**
 * How revision files are kept in PostgreSQL: the file is cut into pieces of CHUNK_BYTES of the
 * original and each piece is zlib-compressed on its own (fflate, RFC 1950). A download then
 * reads, inflates and sends one piece at a time: the server never holds a whole mesh.
 *
 * Pure functions (fflate only), used in the job worker thread (packing) and the HTTP process
 * (unpacking one piece).
 */
import { cooperate } from '../../geometry/cooperate';
import { zlibSync, unzlibSync } from 'fflate';

/** 1 MiB of the original file per stored piece (common practice: large enough to compress well, small enough to stream). */
export const CHUNK_BYTES = 1 << 20;

export interface PackedFile {
  name: string;
  contentType: string;
  /** size of the file as downloaded */
  bytes: number;
  /** compressed pieces, in order */
  chunks: Uint8Array[];
}

export const CONTENT_TYPES: Record<string, string> = {
  'mesh.vtu': 'application/xml',
  'mesh.vtk': 'text/plain; charset=us-ascii',
  'mesh.twmesh': 'application/octet-stream',
  'results.json': 'application/json',
  'results.csv': 'text/csv; charset=utf-8',
  'potential.f64': 'application/octet-stream',
};

export function packFile(name: string, bytes: Uint8Array, chunkBytes = CHUNK_BYTES): PackedFile {
  const chunks: Uint8Array[] = [];
  // an empty file is one empty piece, so every stored file has at least one
  const n = Math.max(1, Math.ceil(bytes.length / chunkBytes));
  for (let k = 0; k < n; k++) {
    // a job thread gives way between pieces while requests are being served (geometry/cooperate.ts)
    cooperate();
    chunks.push(zlibSync(bytes.subarray(k * chunkBytes, Math.min(bytes.length, (k + 1) * chunkBytes)), { level: 6 }));
  }
  return { name, contentType: CONTENT_TYPES[name] ?? 'application/octet-stream', bytes: bytes.length, chunks };
}

export function unpackChunk(stored: Uint8Array): Uint8Array {
  return unzlibSync(stored);
}

export const storedSize = (f: PackedFile): number => f.chunks.reduce((s, c) => s + c.length, 0);
