/**
 * Revision file pieces (server/jobs/storage.ts): cut into pieces of the original, each compressed
 * on its own. Checked against Node's own zlib (RFC 1950 reader, an implementation independent of
 * fflate's): every piece inflates with it, and the pieces put back together are the file.
 */
import { inflateSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { packFile, storedSize, unpackChunk } from '../../server/jobs/storage';

function sample(n: number): Uint8Array {
  // deterministic bytes with some structure (compressible) and some noise
  const out = new Uint8Array(n);
  let x = 12345;
  for (let i = 0; i < n; i++) {
    x = (1103515245 * x + 12345) >>> 0; // the ANSI C example generator (from memory; any LCG will do)
    out[i] = i % 7 === 0 ? x >>> 24 : i & 0xff;
  }
  return out;
}

describe('packFile', () => {
  it('cuts into ceil(n / piece) pieces that Node zlib inflates back to the file', () => {
    const bytes = sample(250_001);
    const packed = packFile('mesh.vtu', bytes, 65_536);
    expect(packed.chunks.length).toBe(Math.ceil(250_001 / 65_536));
    expect(packed.bytes).toBe(250_001);
    expect(packed.contentType).toBe('application/xml');
    const back = Buffer.concat(packed.chunks.map((c) => inflateSync(c)));
    expect(Buffer.compare(back, Buffer.from(bytes))).toBe(0);
    // and our own reader agrees piece by piece
    const ours = Buffer.concat(packed.chunks.map((c) => Buffer.from(unpackChunk(c))));
    expect(Buffer.compare(ours, Buffer.from(bytes))).toBe(0);
    expect(storedSize(packed)).toBeLessThan(bytes.length);
  });

  it('an empty file is one empty piece; a file of exactly one piece is one piece', () => {
    const empty = packFile('results.csv', new Uint8Array(0), 1024);
    expect(empty.chunks.length).toBe(1);
    expect(inflateSync(empty.chunks[0]).length).toBe(0);
    expect(packFile('mesh.twmesh', sample(1024), 1024).chunks.length).toBe(1);
    expect(packFile('mesh.twmesh', sample(1025), 1024).chunks.length).toBe(2);
  });
});
