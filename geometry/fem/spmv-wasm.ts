/**
 * y = A x with a WebAssembly SIMD kernel, for the solver's inner loop.
 *
 * Why: the product is bound by memory traffic (12 bytes per nonzero), and plain JS loses time on
 * bounds checks and scalar loads of the values. The kernel loads two values at once (one v128
 * load) and multiplies them by the two gathered x entries in one f64x2 multiply.
 *
 * Same bits as the JS spmv (geometry/fem/csr.ts), on purpose: lane 0 of the accumulator is the JS
 * accumulator s0 (entries rowPtr[i], rowPtr[i]+2, …, plus the odd tail), lane 1 is s1 (entries
 * rowPtr[i]+1, +3, …), and y[i] = lane0 + lane1. WebAssembly never fuses a multiply into an add,
 * so every rounding step matches; results do not depend on which kernel ran.
 *
 * Memory: the matrix lives inside one WebAssembly memory (the arena), copied in once by
 * prepareSpmv. The arena is shared by all prepared matrices of this thread and belongs to the
 * most recently prepared one; calling an older one copies its matrix back in first (correct,
 * just slower). The arena grows to the largest matrix seen and is kept for reuse (a memory
 * cannot shrink); a matrix that does not fit (4 GB limit of wasm32) uses the JS kernel.
 * A long-lived worker calls releaseSpmvMemory() after each job: an arena grown past
 * SPMV_KEEP_BYTES is dropped (instance and memory, for the garbage collector to return) and the
 * next prepareSpmv instantiates a fresh one-page arena. A matrix prepared before the drop still
 * works: it loads itself into whichever arena is current.
 *
 *   arena layout (byte offsets, each part 16-byte aligned)
 *   ┌──────────────┬────────────┬────────────┬─────────┬─────────┐
 *   │ rowPtr u32   │ cols u32   │ vals f64   │ x f64   │ y f64   │
 *   │ 4(n+1)       │ 4 nnz      │ 8 nnz      │ 8 n     │ 8 n     │
 *   └──────────────┴────────────┴────────────┴─────────┴─────────┘
 *
 * Where WebAssembly or its SIMD extension is missing, prepareSpmv returns the JS kernel.
 * The module is assembled below from a handful of opcodes (no binary is shipped).
 */
import { type Csr, spmv } from './csr';
import {
  uleb, section, name, I32, V128, get, set, tee, i32c, I32_ADD, I32_SHL, I32_LT_U, I32_GE_U, F64_ADD, F64_MUL, i32load, f64load,
  f64store, block, loop, ifThen, END, br, brIf, v128load, v128zero, f64x2splat, f64x2extract, f64x2replace, f64x2add, f64x2mul,
} from './wasm-emit';

/** A prepared product y = A x, bound to one matrix. `kernel` says which code runs it. */
export type PreparedSpmv = ((x: Float64Array, y: Float64Array) => void) & { readonly kernel: 'wasm-simd' | 'js' };

/**
 * The kernel, in pseudo-code (locals: pr = &rowPtr[i], pc = &cols[k], pv = &vals[k],
 * pe = &cols[rowPtr[i+1]], py = &y[i], acc = (s0, s1)):
 *
 *   spmv(n, rowPtrOff, colsOff, valsOff, xOff, yOff)
 *     if n == 0 return
 *     k0 = rowPtr[0]; pc = colsOff + 4 k0; pv = valsOff + 8 k0; pr = rowPtrOff; py = yOff
 *     do {
 *       pe = colsOff + 4 rowPtr[i+1]; acc = (0, 0)
 *       while (pc + 4 < pe) {                       // two entries left: k + 1 < end
 *         acc += v128(vals[k], vals[k+1]) * (x[cols[k]], x[cols[k+1]])
 *         pc += 8; pv += 16
 *       }
 *       if (pc < pe) { s0 += vals[k] * x[cols[k]]; pc += 4; pv += 8 }   // odd tail, as in JS
 *       y[i] = s0 + s1; pr += 4; py += 8
 *     } while (py < yOff + 8 n)
 */
function kernelBody(): number[] {
  // params 0..5: n, rowPtrOff, colsOff, valsOff, xOff, yOff; locals 6..10 i32: pr, pc, pv, pe, yEnd; 11 v128: acc
  const [N, RP, CP, VP, XP, YP] = [0, 1, 2, 3, 4, 5];
  const [PR, PC, PV, PE, YEND] = [6, 7, 8, 9, 10];
  const ACC = 11;
  /** f64 x[cols at address pc + off] on the stack */
  const gatherX = (off: number): number[] => [...get(XP), ...get(PC), ...i32load(off), ...i32c(3), I32_SHL, I32_ADD, ...f64load()];
  const code: number[] = [
    ...block,
    ...get(N), ...i32c(0), 0x46 /* i32.eq */, ...brIf(0),
    // pc = colsOff + 4·rowPtr[0]; pv = valsOff + 8·rowPtr[0]
    ...get(CP), ...get(RP), ...i32load(), ...i32c(2), I32_SHL, I32_ADD, ...set(PC),
    ...get(VP), ...get(RP), ...i32load(), ...i32c(3), I32_SHL, I32_ADD, ...set(PV),
    ...get(RP), ...set(PR),
    ...get(YP), ...get(N), ...i32c(3), I32_SHL, I32_ADD, ...set(YEND),
    ...loop, // rows
    // pe = colsOff + 4·rowPtr[i+1]
    ...get(CP), ...get(PR), ...i32load(4), ...i32c(2), I32_SHL, I32_ADD, ...set(PE),
    ...v128zero, ...set(ACC),
    ...block, ...loop, // pairs
    ...get(PC), ...i32c(4), I32_ADD, ...get(PE), I32_GE_U, ...brIf(1),
    ...get(ACC),
    ...get(PV), ...v128load(),
    ...gatherX(0), ...f64x2splat, ...gatherX(4), ...f64x2replace(1),
    ...f64x2mul, ...f64x2add, ...set(ACC),
    ...get(PC), ...i32c(8), I32_ADD, ...set(PC),
    ...get(PV), ...i32c(16), I32_ADD, ...set(PV),
    ...br(0),
    END, END,
    // odd tail into lane 0
    ...get(PC), ...get(PE), I32_LT_U, ...ifThen,
    ...get(ACC),
    ...get(ACC), ...f64x2extract(0), ...get(PV), ...f64load(), ...gatherX(0), F64_MUL, F64_ADD,
    ...f64x2replace(0), ...set(ACC),
    ...get(PC), ...i32c(4), I32_ADD, ...set(PC),
    ...get(PV), ...i32c(8), I32_ADD, ...set(PV),
    END,
    // y[i] = s0 + s1
    ...get(YP), ...get(ACC), ...f64x2extract(0), ...get(ACC), ...f64x2extract(1), F64_ADD, ...f64store(),
    ...get(PR), ...i32c(4), I32_ADD, ...set(PR),
    ...get(YP), ...i32c(8), I32_ADD, ...tee(YP), ...get(YEND), I32_LT_U, ...brIf(0),
    END, // rows
    END, // outer block
    END, // function
  ];
  const locals = [2, ...uleb(5), I32, 1, V128];
  const body = [...locals, ...code];
  return [...uleb(body.length), ...body];
}

/** The module: imports memory env.mem, exports spmv(n, rowPtrOff, colsOff, valsOff, xOff, yOff). */
export function spmvModuleBytes(): Uint8Array<ArrayBuffer> {
  const bytes = [
    0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00, // "\0asm", version 1
    ...section(1, [1, 0x60, 6, I32, I32, I32, I32, I32, I32, 0]), // type 0: (i32 ×6) → ()
    ...section(2, [1, ...name('env'), ...name('mem'), 0x02, 0x00, 1]), // import memory, min 1 page
    ...section(3, [1, 0]), // one function of type 0
    ...section(7, [1, ...name('spmv'), 0x00, 0]), // export it
    ...section(10, [1, ...kernelBody()]),
  ];
  return new Uint8Array(bytes);
}

// ---- the arena --------------------------------------------------------------------------------

type Kernel = (n: number, rp: number, cp: number, vp: number, xp: number, yp: number) => void;

interface Arena {
  memory: WebAssembly.Memory;
  kernel: Kernel;
  /** the prepared matrix that currently occupies the arena */
  owner: object | null;
}

const PAGE = 65536;
const MAX_PAGES = 65536; // wasm32: 4 GB
let arena: Arena | null | undefined; // undefined: not tried yet; null: unavailable

function getArena(): Arena | null {
  if (arena !== undefined) return arena;
  arena = null;
  try {
    if (typeof WebAssembly === 'undefined') return null;
    const bytes = spmvModuleBytes();
    if (!WebAssembly.validate(bytes)) return null; // no SIMD
    const memory = new WebAssembly.Memory({ initial: 1 });
    // synchronous compilation is fine here: the module is a few hundred bytes
    const instance = new WebAssembly.Instance(new WebAssembly.Module(bytes), { env: { mem: memory } });
    arena = { memory, kernel: instance.exports.spmv as Kernel, owner: null };
  } catch {
    arena = null;
  }
  return arena;
}

/** True when this runtime runs the WebAssembly SIMD kernel. */
export function wasmSpmvAvailable(): boolean {
  return getArena() !== null;
}

const align16 = (v: number): number => Math.ceil(v / 16) * 16;

/**
 * An arena larger than this is dropped by releaseSpmvMemory (32 MiB: about 2.5 million nonzeros;
 * common practice: keep what a typical solve needs, return what one big matrix grew).
 */
export const SPMV_KEEP_BYTES = 32 * 1024 * 1024;

/** Bytes of this thread's arena now (0 when none is instantiated). */
export function spmvArenaBytes(): number {
  return arena ? arena.memory.buffer.byteLength : 0;
}

/**
 * Hand back the WebAssembly memory grown for a big matrix: drop the arena when it is larger than
 * `keepBytes`; the next prepared product instantiates a fresh, small one. True when dropped.
 */
export function releaseSpmvMemory(keepBytes: number = SPMV_KEEP_BYTES): boolean {
  if (!arena || arena.memory.buffer.byteLength <= keepBytes) return false;
  arena = undefined;
  return true;
}

/** Grow the arena to hold `size` bytes; false when the runtime refuses the memory. */
function ensureSize(a: Arena, size: number): boolean {
  const have = a.memory.buffer.byteLength / PAGE;
  const need = Math.ceil(size / PAGE);
  if (need <= have) return true;
  try {
    a.memory.grow(need - have);
    return true;
  } catch {
    return false;
  }
}

/**
 * Bind y = A x to the matrix A: its arrays are copied into the arena now, and each call copies
 * x in and y out (16 bytes per row, small next to 12 per nonzero). A must not change afterwards
 * (prepare again after changing its values). Identical bits to spmv(A, x, y).
 */
export function prepareSpmv(A: Csr, options: { kernel?: 'auto' | 'js' } = {}): PreparedSpmv {
  const js = Object.assign((x: Float64Array, y: Float64Array) => spmv(A, x, y), { kernel: 'js' as const });
  const a = options.kernel === 'js' ? null : getArena();
  const n = A.n;
  const nnz = A.rowPtr[n] - A.rowPtr[0];
  if (!a || n === 0) return js;
  const rp = 0;
  const cp = align16(rp + 4 * (n + 1));
  const vp = align16(cp + 4 * A.cols.length);
  const xp = align16(vp + 8 * A.vals.length);
  const yp = align16(xp + 8 * n);
  const size = align16(yp + 8 * n);
  if (size > MAX_PAGES * PAGE || nnz > A.cols.length) return js;
  if (!ensureSize(a, size)) return js; // the runtime refused the memory: stay on the JS kernel
  const token = {};
  /** copy A into the current arena (after another matrix took it, or after a release) */
  const load = (into: Arena): boolean => {
    if (!ensureSize(into, size)) return false;
    const buf = into.memory.buffer;
    new Uint32Array(buf, rp, n + 1).set(A.rowPtr);
    new Uint32Array(buf, cp, A.cols.length).set(A.cols);
    new Float64Array(buf, vp, A.vals.length).set(A.vals);
    into.owner = token;
    return true;
  };
  load(a);
  const run = (x: Float64Array, y: Float64Array): void => {
    const cur = getArena();
    // another matrix took the arena meanwhile, or it was released: load again (or the same bits in JS)
    if (!cur || (cur.owner !== token && !load(cur))) return spmv(A, x, y);
    const buf = cur.memory.buffer;
    new Float64Array(buf, xp, n).set(x.subarray(0, n));
    cur.kernel(n, rp, cp, vp, xp, yp);
    y.set(new Float64Array(buf, yp, n));
  };
  return Object.assign(run, { kernel: 'wasm-simd' as const });
}
