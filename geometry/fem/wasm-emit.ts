/**
 * A tiny WebAssembly emitter: just the opcodes the solver's kernels need (spmv-wasm.ts,
 * block-wasm.ts). Each helper returns the bytes of one instruction or encoding (WebAssembly core
 * specification 1.0 and its fixed-width SIMD extension: opcodes and LEB128 integers).
 */

/** unsigned LEB128 */
export function uleb(v: number): number[] {
  const out: number[] = [];
  do {
    let b = v & 0x7f;
    v >>>= 7;
    if (v !== 0) b |= 0x80;
    out.push(b);
  } while (v !== 0);
  return out;
}

/** signed LEB128 (for i32.const) */
export function sleb(v: number): number[] {
  const out: number[] = [];
  for (;;) {
    const b = v & 0x7f;
    v >>= 7;
    if ((v === 0 && (b & 0x40) === 0) || (v === -1 && (b & 0x40) !== 0)) {
      out.push(b);
      return out;
    }
    out.push(b | 0x80);
  }
}

export const section = (id: number, body: number[]): number[] => [id, ...uleb(body.length), ...body];
export const name = (s: string): number[] => [...uleb(s.length), ...Array.from(s, (c) => c.charCodeAt(0))];

export const I32 = 0x7f;
export const V128 = 0x7b;
export const EMPTY = 0x40; // block type: no result
export const get = (l: number): number[] => [0x20, ...uleb(l)];
export const set = (l: number): number[] => [0x21, ...uleb(l)];
export const tee = (l: number): number[] => [0x22, ...uleb(l)];
export const i32c = (v: number): number[] => [0x41, ...sleb(v)];
export const I32_ADD = 0x6a;
export const I32_SHL = 0x74;
export const I32_LT_U = 0x49;
export const I32_GE_U = 0x4f;
export const F64_ADD = 0xa0;
export const F64_MUL = 0xa2;
/** memory access with alignment log2 and constant offset */
export const i32load = (offset = 0): number[] => [0x28, 2, ...uleb(offset)];
export const f64load = (offset = 0): number[] => [0x2b, 3, ...uleb(offset)];
export const f64store = (offset = 0): number[] => [0x39, 3, ...uleb(offset)];
export const block = [0x02, EMPTY];
export const loop = [0x03, EMPTY];
export const ifThen = [0x04, EMPTY];
export const END = 0x0b;
export const br = (d: number): number[] => [0x0c, ...uleb(d)];
export const brIf = (d: number): number[] => [0x0d, ...uleb(d)];
/** SIMD instructions: prefix 0xfd, then the LEB128 opcode */
export const simd = (op: number, ...imm: number[]): number[] => [0xfd, ...uleb(op), ...imm];
export const v128load = (offset = 0): number[] => simd(0x00, 3, ...uleb(offset)); // alignment hint 8 bytes
export const v128zero = simd(0x0c, ...new Array<number>(16).fill(0));
export const f64x2splat = simd(0x14);
export const f64x2extract = (lane: number): number[] => simd(0x21, lane);
export const f64x2replace = (lane: number): number[] => simd(0x22, lane);
export const f64x2add = simd(0xf0);
export const f64x2mul = simd(0xf2);

export const I32_SUB = 0x6b;
export const I32_MUL = 0x6c;
export const I32_EQZ = 0x45;
export const v128store = (offset = 0): number[] => simd(0x0b, 3, ...uleb(offset)); // alignment hint 8 bytes
export const f64x2sub = simd(0xf1);
export const v128bitselect = simd(0x52);
