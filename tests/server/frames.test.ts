/**
 * The frames between the server and its design-body process (server/http/frames.ts): whatever pieces the socket
 * cuts the stream into, the reader gives back each frame's type, id and payload exactly, without copying payloads.
 * The reference is the plain reading of the same bytes in one block (header: type, u32 BE id, u32 BE length).
 * No database is needed.
 */
import { describe, expect, it } from 'vitest';
import { FRAME_HEADER_BYTES, frameHeader, frameReader } from '../../server/http/frames';

interface Frame {
  type: number;
  id: number;
  payload: Buffer;
}

/** deterministic pseudo-random numbers (a 32-bit LCG, Numerical Recipes' constants, from memory) */
function lcg(seed: number) {
  let x = seed >>> 0;
  return () => (x = (Math.imul(x, 1664525) + 1013904223) >>> 0) / 2 ** 32;
}

function stream(frames: Frame[]): Buffer {
  return Buffer.concat(frames.flatMap((f) => [frameHeader(f.type, f.id, f.payload.byteLength), f.payload]));
}

function readAll(pieces: Buffer[]): { frames: Frame[]; views: Buffer[] } {
  const frames: Frame[] = [];
  const views: Buffer[] = [];
  let cur: { type: number; id: number; parts: Buffer[] } | null = null;
  const read = frameReader({
    start(type, id) {
      cur = { type, id, parts: [] };
    },
    data(bytes) {
      cur!.parts.push(bytes);
      views.push(bytes);
    },
    end() {
      frames.push({ type: cur!.type, id: cur!.id, payload: Buffer.concat(cur!.parts) });
      cur = null;
    },
  });
  for (const p of pieces) read(p);
  return { frames, views };
}

/** frame by frame: type, id and payload bytes (Buffer.equals: a deep equal of megabytes byte by byte is slow) */
function expectSame(got: Frame[], want: Frame[]) {
  expect(got.length).toBe(want.length);
  for (let i = 0; i < want.length; i++) {
    expect([got[i].type, got[i].id, got[i].payload.byteLength]).toEqual([want[i].type, want[i].id, want[i].payload.byteLength]);
    expect(got[i].payload.equals(want[i].payload)).toBe(true);
  }
}

describe('frames between the server and the design-body process', () => {
  const rnd = lcg(20261202);
  const frames: Frame[] = [];
  for (let i = 0; i < 60; i++) {
    // empty frames (END, ABORT), small JSON-sized ones and pieces up to 70 KiB
    const n = i % 7 === 0 ? 0 : Math.floor(rnd() ** 3 * 70_000);
    const payload = Buffer.alloc(n);
    for (let k = 0; k < n; k++) payload[k] = Math.floor(rnd() * 256);
    frames.push({ type: 1 + (i % 17), id: Math.floor(rnd() * 2 ** 32), payload });
  }
  const bytes = stream(frames);

  it('writes the header as type, id and length (u32 big-endian)', () => {
    const h = frameHeader(16, 0xdeadbeef, 70_000);
    expect(h.byteLength).toBe(FRAME_HEADER_BYTES);
    expect([...h]).toEqual([16, 0xde, 0xad, 0xbe, 0xef, 0x00, 0x01, 0x11, 0x70]);
  });

  it('reads the stream whole, in one piece', () => {
    expectSame(readAll([bytes]).frames, frames);
  });

  it('reads it cut into pieces of every size from 1 byte (headers straddling pieces) to 64 KiB', () => {
    for (const size of [1, 2, 5, FRAME_HEADER_BYTES, FRAME_HEADER_BYTES + 1, 1000, 65_536]) {
      const pieces: Buffer[] = [];
      for (let at = 0; at < bytes.byteLength; at += size) pieces.push(bytes.subarray(at, at + size));
      expectSame(readAll(pieces).frames, frames);
    }
    // and at random cuts
    const pieces: Buffer[] = [];
    for (let at = 0; at < bytes.byteLength; ) {
      const n = 1 + Math.floor(rnd() * 20_000);
      pieces.push(bytes.subarray(at, at + n));
      at += n;
    }
    expectSame(readAll(pieces).frames, frames);
  });

  it('hands payloads out as views of the pieces read, not copies', () => {
    const pieces = [bytes.subarray(0, 100_000), bytes.subarray(100_000)];
    const { views } = readAll(pieces);
    expect(views.length).toBeGreaterThan(0);
    for (const v of views) expect(v.buffer).toBe(bytes.buffer);
  });
});
