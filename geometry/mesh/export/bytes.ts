/**
 * Byte helpers shared by the exporters: little-endian views of typed arrays, base64 (RFC 4648)
 * straight into bytes, and concatenation. Portable (no Node Buffer), so the same code runs in the
 * browser; output depends only on the input bytes.
 */

/** True on little-endian hosts (all current x86/ARM); checked once. */
export const HOST_LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

type Numeric = Uint8Array | Int8Array | Uint16Array | Int16Array | Uint32Array | Int32Array | Float32Array | Float64Array;

/**
 * The little-endian bytes of a typed array: a zero-copy view on little-endian hosts, a swapped
 * copy otherwise.
 */
export function leBytes(a: Numeric): Uint8Array {
  const view = new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
  const size = a.BYTES_PER_ELEMENT;
  if (HOST_LITTLE_ENDIAN || size === 1) return view;
  const out = new Uint8Array(view.length);
  for (let i = 0; i < view.length; i += size) for (let k = 0; k < size; k++) out[i + k] = view[i + size - 1 - k];
  return out;
}

const ALPHABET = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';
const ENC = new Uint8Array(64);
for (let i = 0; i < 64; i++) ENC[i] = ALPHABET.charCodeAt(i);
const PAD = 61; // '='

/** Length of the base64 encoding of n bytes (with padding). */
export function base64Length(n: number): number {
  return 4 * Math.ceil(n / 3);
}

/** Base64-encode `src` into `dst` at `offset`; returns the new offset. */
export function base64Into(src: Uint8Array, dst: Uint8Array, offset: number): number {
  const n = src.length;
  const full = n - (n % 3);
  let o = offset;
  for (let i = 0; i < full; i += 3) {
    const v = (src[i] << 16) | (src[i + 1] << 8) | src[i + 2];
    dst[o] = ENC[v >>> 18];
    dst[o + 1] = ENC[(v >>> 12) & 63];
    dst[o + 2] = ENC[(v >>> 6) & 63];
    dst[o + 3] = ENC[v & 63];
    o += 4;
  }
  const rest = n - full;
  if (rest === 1) {
    const v = src[full] << 16;
    dst[o] = ENC[v >>> 18];
    dst[o + 1] = ENC[(v >>> 12) & 63];
    dst[o + 2] = PAD;
    dst[o + 3] = PAD;
    o += 4;
  } else if (rest === 2) {
    const v = (src[full] << 16) | (src[full + 1] << 8);
    dst[o] = ENC[v >>> 18];
    dst[o + 1] = ENC[(v >>> 12) & 63];
    dst[o + 2] = ENC[(v >>> 6) & 63];
    dst[o + 3] = PAD;
    o += 4;
  }
  return o;
}

/** Base64 of `src` as a new byte array. */
export function base64(src: Uint8Array): Uint8Array {
  const out = new Uint8Array(base64Length(src.length));
  base64Into(src, out, 0);
  return out;
}

/** One contiguous byte array from parts. */
export function concatBytes(parts: Uint8Array[]): Uint8Array {
  let n = 0;
  for (const p of parts) n += p.length;
  const out = new Uint8Array(n);
  let o = 0;
  for (const p of parts) {
    out.set(p, o);
    o += p.length;
  }
  return out;
}

const encoder = new TextEncoder();
export function utf8(s: string): Uint8Array {
  return encoder.encode(s);
}
