/**
 * The matrix passes of the solver for k right-hand sides at once (issue 11, "Speed"): y = A x,
 * and the two Gauss–Seidel passes of the P2 multigrid smoother (multigrid.ts), on k vectors stored
 * interleaved (entry i of column j at X[i·k + j]), so the matrix is streamed once for k columns.
 *
 * Why: every pass is bound by memory traffic: 12 bytes per nonzero of the matrix for a few flops.
 * With k columns the matrix costs 12/k bytes per nonzero and column, and the k entries of x a
 * nonzero gathers are contiguous (one cache line for k = 8).
 *
 * Same bits, column by column, as the single-vector code: each column keeps the accumulators of
 * the single code in the same order (spmv: entries rowPtr[i], +2, … in s0, +1, +3, … in s1, an odd
 * tail in s0, y = s0 + s1; see csr.ts), and the columns never mix. A SIMD lane is one column, and
 * WebAssembly never fuses a multiply into an add, so the WebAssembly kernels give the same bits as
 * the JS ones here, which give the same bits as csr.ts spmv and multigrid.ts's sweeps.
 *
 * The WebAssembly module is emitted for one k (even; the caller pads), with k/2 f64x2 accumulators
 * per accumulator of the scalar code held in locals. Each prepared matrix has its own memory:
 *
 *   ┌────────────┬──────────┬──────────┬────────────┬──────────┬──────────────────────────────┐
 *   │ rowPtr u32 │ cols u32 │ vals f64 │ diagPos u32│ dinv f64 │ vector slots f64, n·k each   │
 *   └────────────┴──────────┴──────────┴────────────┴──────────┴──────────────────────────────┘
 *
 * Callers get their block vectors from `vector()` (views into that memory, so the kernels read and
 * write them in place); any other Float64Array works too and is copied in and out.
 * Where WebAssembly SIMD is missing (or kernel 'js' is asked for) the JS loops run, same bits.
 */
import type { Csr } from './csr';
import {
  section, name, I32, V128, get, set, tee, i32c, I32_ADD, I32_SHL, I32_SUB, I32_MUL, I32_EQZ, I32_LT_U, I32_GE_U, i32load,
  f64load, block, loop, ifThen, END, br, brIf, v128load, v128store, v128zero, v128bitselect, f64x2splat, f64x2add, f64x2sub, f64x2mul,
  uleb,
} from './wasm-emit';

/** Block operations bound to one matrix and one width k. */
export interface BlockKernels {
  readonly n: number;
  readonly k: number;
  readonly kernel: 'wasm-simd' | 'js';
  /** Y = A X */
  spmv(X: Float64Array, Y: Float64Array): void;
  /**
   * One forward Gauss–Seidel sweep for A X = B from X = 0, then Out = B − A X: the sweep sees only
   * the strictly lower part, and the residual is −(strictly upper part)·X (multigrid.ts).
   */
  gsForwardFromZeroWithResidual(B: Float64Array, X: Float64Array, Out: Float64Array): void;
  /** One backward Gauss–Seidel sweep for A X = B, in place on X. */
  gsBackward(B: Float64Array, X: Float64Array): void;
  /** out[j] = Σ_i U[i,j]·V[i,j], summed over i in order (pcg.ts's dot, per column) */
  dots(U: Float64Array, V: Float64Array, out: Float64Array): void;
  /**
   * PCG's update of the columns with active[j] = 1 (the others keep their bits): X += α P,
   * R −= α Q, and rr[j] = Σ_i R[i,j]² of the new R.
   */
  update(alpha: Float64Array, active: Uint8Array, X: Float64Array, P: Float64Array, R: Float64Array, Q: Float64Array, rr: Float64Array): void;
  /** PCG's new direction of the active columns: P = Z + β P. */
  direction(beta: Float64Array, active: Uint8Array, Z: Float64Array, P: Float64Array): void;
  /**
   * Block vector number `slot` (n·k, 0 ≤ slot < slots), which the kernels use in place. The same
   * slot gives the same storage every time: its users agree on who owns which (BLOCK_SLOTS).
   */
  vector(slot: number): Float64Array;
}

export interface BlockKernelOptions {
  /** 'auto' (WebAssembly SIMD where available, the default) or 'js'; same bits either way */
  kernel?: 'auto' | 'js';
  /** block vectors handed out by vector() (default BLOCK_SLOTS) */
  slots?: number;
}

/** Slots of block vectors: 0–5 block PCG's (b, x, r, z, p, q), 6 the P2 preconditioner's residual. */
export const BLOCK_SLOTS = 7;

/** Positions of the diagonal entries and their inverses (the Gauss–Seidel passes need both). */
function diagonalParts(A: Csr): { diagPos: Uint32Array; dinv: Float64Array } {
  const { n, rowPtr, cols, vals } = A;
  const dinv = new Float64Array(n);
  const diagPos = new Uint32Array(n);
  for (let i = 0; i < n; i++) {
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      if (cols[p] === i) {
        dinv[i] = 1 / vals[p];
        diagPos[i] = p;
      }
    }
    if (!(dinv[i] > 0)) throw new Error(`matrix row ${i} has no positive diagonal`);
  }
  return { diagPos, dinv };
}

// ---- JS kernels: the scalar code with one accumulator per column ------------------------------

function jsKernels(A: Csr, k: number, slots: number, diagPos: Uint32Array, dinv: Float64Array): BlockKernels {
  const { n, rowPtr, cols, vals } = A;
  const s0 = new Float64Array(k), s1 = new Float64Array(k);
  const vectors: Float64Array[] = [];
  return {
    n, k, kernel: 'js',
    spmv(X, Y) {
      let p = rowPtr[0];
      for (let i = 0; i < n; i++) {
        const end = rowPtr[i + 1];
        s0.fill(0);
        s1.fill(0);
        for (; p + 1 < end; p += 2) {
          const v0 = vals[p], c0 = cols[p] * k, v1 = vals[p + 1], c1 = cols[p + 1] * k;
          for (let j = 0; j < k; j++) {
            s0[j] += v0 * X[c0 + j];
            s1[j] += v1 * X[c1 + j];
          }
        }
        if (p < end) {
          const v0 = vals[p], c0 = cols[p] * k;
          for (let j = 0; j < k; j++) s0[j] += v0 * X[c0 + j];
          p++;
        }
        const o = i * k;
        for (let j = 0; j < k; j++) Y[o + j] = s0[j] + s1[j];
      }
    },
    gsForwardFromZeroWithResidual(B, X, Out) {
      for (let i = 0; i < n; i++) {
        const o = i * k;
        for (let j = 0; j < k; j++) s0[j] = B[o + j];
        for (let p = rowPtr[i], end = diagPos[i]; p < end; p++) {
          const v = vals[p], c = cols[p] * k;
          for (let j = 0; j < k; j++) s0[j] -= v * X[c + j];
        }
        const d = dinv[i];
        for (let j = 0; j < k; j++) X[o + j] = s0[j] * d;
      }
      for (let i = 0; i < n; i++) {
        s0.fill(0);
        for (let p = diagPos[i] + 1, end = rowPtr[i + 1]; p < end; p++) {
          const v = vals[p], c = cols[p] * k;
          for (let j = 0; j < k; j++) s0[j] -= v * X[c + j];
        }
        const o = i * k;
        for (let j = 0; j < k; j++) Out[o + j] = s0[j];
      }
    },
    gsBackward(B, X) {
      for (let i = n - 1; i >= 0; i--) {
        const o = i * k;
        for (let j = 0; j < k; j++) s0[j] = B[o + j];
        s1.fill(0);
        let p = rowPtr[i];
        const end = rowPtr[i + 1];
        for (; p + 1 < end; p += 2) {
          const v0 = vals[p], c0 = cols[p] * k, v1 = vals[p + 1], c1 = cols[p + 1] * k;
          for (let j = 0; j < k; j++) {
            s0[j] -= v0 * X[c0 + j];
            s1[j] -= v1 * X[c1 + j];
          }
        }
        if (p < end) {
          const v0 = vals[p], c0 = cols[p] * k;
          for (let j = 0; j < k; j++) s0[j] -= v0 * X[c0 + j];
        }
        const d = dinv[i];
        for (let j = 0; j < k; j++) X[o + j] += (s0[j] + s1[j]) * d;
      }
    },
    dots(U, V, out) {
      s0.fill(0);
      for (let i = 0, o = 0; i < n; i++, o += k) for (let j = 0; j < k; j++) s0[j] += U[o + j] * V[o + j];
      out.set(s0);
    },
    update(alpha, active, X, P, R, Q, rr) {
      s0.fill(0);
      for (let i = 0, o = 0; i < n; i++, o += k) {
        for (let j = 0; j < k; j++) {
          if (!active[j]) continue;
          const a = alpha[j];
          X[o + j] += a * P[o + j];
          const ri = R[o + j] - a * Q[o + j];
          R[o + j] = ri;
          s0[j] += ri * ri;
        }
      }
      rr.set(s0);
    },
    direction(beta, active, Z, P) {
      for (let i = 0, o = 0; i < n; i++, o += k) for (let j = 0; j < k; j++) if (active[j]) P[o + j] = Z[o + j] + beta[j] * P[o + j];
    },
    vector(slot) {
      if (!(slot >= 0 && slot < slots)) throw new Error(`block kernels: no vector slot ${slot} (${slots} slots)`);
      return (vectors[slot] ??= new Float64Array(n * k));
    },
  };
}

// ---- the WebAssembly module for one k ----------------------------------------------------------

/** Row pointers of row i: pc = colsOff + 4·start, pv = valsOff + 8·start, pe = colsOff + 4·end. */
const rowStart = (CP: number, VP: number, startAddr: number[], PC: number, PV: number): number[] => [
  ...get(CP), ...startAddr, ...i32c(2), I32_SHL, I32_ADD, ...set(PC),
  ...get(VP), ...startAddr, ...i32c(3), I32_SHL, I32_ADD, ...set(PV),
];

function fn(params: number, i32Locals: number, v128Locals: number, code: number[]): { type: number[]; body: number[] } {
  const locals = [2, ...uleb(i32Locals), I32, ...uleb(v128Locals), V128];
  const body = [...locals, ...code, END];
  return { type: [0x60, ...uleb(params), ...new Array<number>(params).fill(I32), 0], body: [...uleb(body.length), ...body] };
}

/**
 * The three kernels for width k (k even, H = k/2 lanes of f64x2), in the scalar code's pseudo-code:
 *   spmv(n, rp, cp, vp, xp, yp)                      rows: s0, s1 over pairs; tail in s0; y = s0 + s1
 *   gsFwd(n, rp, cp, vp, dp, ip, bp, xp, op)         x_i = (b_i − Σ_{p<diag} a x)·dinv_i; then out_i = −Σ_{p>diag} a x
 *   gsBwd(n, rp, cp, vp, ip, bp, xp)                 i = n−1…0: s0 = b_i, s1 = 0 over pairs; x_i += (s0 + s1)·dinv_i
 */
export function blockModuleBytes(k: number): Uint8Array<ArrayBuffer> {
  if (!(k >= 2 && k % 2 === 0)) throw new Error(`block width ${k} must be even and at least 2`);
  const H = k / 2;
  const S = 8 * k; // bytes per row of a block vector
  const lanes = (f: (m: number) => number[]): number[] => Array.from({ length: H }, (_, m) => f(m)).flat();
  /** base = xp + cols[pc + off]·S */
  const gatherBase = (XP: number, PC: number, off: number, BASE: number): number[] => [
    ...get(XP), ...get(PC), ...i32load(off), ...i32c(S), I32_MUL, I32_ADD, ...set(BASE),
  ];
  /** acc[m] = acc[m] ± v·x[base + 16m] for every lane */
  const accumulate = (ACC: number, V: number, BASE: number, op: number[]): number[] =>
    lanes((m) => [...get(ACC + m), ...get(V), ...get(BASE), ...v128load(16 * m), ...f64x2mul, ...op, ...set(ACC + m)]);

  // spmv: params n0 rp1 cp2 vp3 xp4 yp5; i32 pr6 pc7 pv8 pe9 yEnd10 base11; v128 v12, s0 13.., s1 13+H..
  const spmv = (() => {
    const [N, RP, CP, VP, XP, YP, PR, PC, PV, PE, YEND, BASE, V] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12];
    const A0 = 13, A1 = 13 + H;
    const code = [
      ...block,
      ...get(N), I32_EQZ, ...brIf(0),
      ...rowStart(CP, VP, [...get(RP), ...i32load()], PC, PV),
      ...get(RP), ...set(PR),
      ...get(YP), ...get(N), ...i32c(S), I32_MUL, I32_ADD, ...set(YEND),
      ...loop, // rows
      ...get(CP), ...get(PR), ...i32load(4), ...i32c(2), I32_SHL, I32_ADD, ...set(PE),
      ...lanes((m) => [...v128zero, ...set(A0 + m), ...v128zero, ...set(A1 + m)]),
      ...block, ...loop, // pairs
      ...get(PC), ...i32c(4), I32_ADD, ...get(PE), I32_GE_U, ...brIf(1),
      ...get(PV), ...f64load(), ...f64x2splat, ...set(V), ...gatherBase(XP, PC, 0, BASE), ...accumulate(A0, V, BASE, f64x2add),
      ...get(PV), ...f64load(8), ...f64x2splat, ...set(V), ...gatherBase(XP, PC, 4, BASE), ...accumulate(A1, V, BASE, f64x2add),
      ...get(PC), ...i32c(8), I32_ADD, ...set(PC),
      ...get(PV), ...i32c(16), I32_ADD, ...set(PV),
      ...br(0),
      END, END,
      ...get(PC), ...get(PE), I32_LT_U, ...ifThen, // odd tail into s0
      ...get(PV), ...f64load(), ...f64x2splat, ...set(V), ...gatherBase(XP, PC, 0, BASE), ...accumulate(A0, V, BASE, f64x2add),
      ...get(PC), ...i32c(4), I32_ADD, ...set(PC),
      ...get(PV), ...i32c(8), I32_ADD, ...set(PV),
      END,
      ...lanes((m) => [...get(YP), ...get(A0 + m), ...get(A1 + m), ...f64x2add, ...v128store(16 * m)]),
      ...get(PR), ...i32c(4), I32_ADD, ...set(PR),
      ...get(YP), ...i32c(S), I32_ADD, ...tee(YP), ...get(YEND), I32_LT_U, ...brIf(0),
      END, // rows
      END,
    ];
    return fn(6, 6, 1 + 2 * H, code);
  })();

  // gsFwd: params n0 rp1 cp2 vp3 dp4 ip5 bp6 xp7 op8; i32 i9 pc10 pv11 pe12 base13 row14; v128 v15, acc16..
  const gsFwd = (() => {
    const [N, RP, CP, VP, DP, IP, BP, XP, OP, I, PC, PV, PE, BASE, ROW, V] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15];
    const ACC = 16;
    const rowHead = [...get(I), ...get(N), I32_GE_U, ...brIf(1), ...get(I), ...i32c(S), I32_MUL, ...set(ROW)];
    const addrOf = (P: number, off = 0): number[] => [...get(P), ...get(I), ...i32c(2), I32_SHL, I32_ADD, ...i32load(off)];
    const entries = [
      ...block, ...loop,
      ...get(PC), ...get(PE), I32_GE_U, ...brIf(1),
      ...get(PV), ...f64load(), ...f64x2splat, ...set(V), ...gatherBase(XP, PC, 0, BASE), ...accumulate(ACC, V, BASE, f64x2sub),
      ...get(PC), ...i32c(4), I32_ADD, ...set(PC),
      ...get(PV), ...i32c(8), I32_ADD, ...set(PV),
      ...br(0),
      END, END,
    ];
    const code = [
      // pass 1: the lower part from zero
      ...i32c(0), ...set(I),
      ...block, ...loop,
      ...rowHead,
      ...rowStart(CP, VP, addrOf(RP), PC, PV),
      ...get(CP), ...addrOf(DP), ...i32c(2), I32_SHL, I32_ADD, ...set(PE),
      ...lanes((m) => [...get(BP), ...get(ROW), I32_ADD, ...v128load(16 * m), ...set(ACC + m)]),
      ...entries,
      ...get(IP), ...get(I), ...i32c(3), I32_SHL, I32_ADD, ...f64load(), ...f64x2splat, ...set(V),
      ...lanes((m) => [...get(XP), ...get(ROW), I32_ADD, ...get(ACC + m), ...get(V), ...f64x2mul, ...v128store(16 * m)]),
      ...get(I), ...i32c(1), I32_ADD, ...set(I),
      ...br(0),
      END, END,
      // pass 2: the residual, minus the strictly upper part
      ...i32c(0), ...set(I),
      ...block, ...loop,
      ...rowHead,
      // start = diagPos[i] + 1
      ...rowStart(CP, VP, [...addrOf(DP), ...i32c(1), I32_ADD], PC, PV),
      ...get(CP), ...addrOf(RP, 4), ...i32c(2), I32_SHL, I32_ADD, ...set(PE),
      ...lanes((m) => [...v128zero, ...set(ACC + m)]),
      ...entries,
      ...lanes((m) => [...get(OP), ...get(ROW), I32_ADD, ...get(ACC + m), ...v128store(16 * m)]),
      ...get(I), ...i32c(1), I32_ADD, ...set(I),
      ...br(0),
      END, END,
    ];
    return fn(9, 6, 1 + H, code);
  })();

  // gsBwd: params n0 rp1 cp2 vp3 ip4 bp5 xp6; i32 i7 pc8 pv9 pe10 base11 row12; v128 v13, s0 14.., s1 14+H..
  const gsBwd = (() => {
    const [N, RP, CP, VP, IP, BP, XP, I, PC, PV, PE, BASE, ROW, V] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13];
    const A0 = 14, A1 = 14 + H;
    const rpAt = (off: number): number[] => [...get(RP), ...get(I), ...i32c(2), I32_SHL, I32_ADD, ...i32load(off)];
    const code = [
      ...get(N), ...set(I),
      ...block, ...loop,
      ...get(I), I32_EQZ, ...brIf(1),
      ...get(I), ...i32c(1), I32_SUB, ...set(I),
      ...get(I), ...i32c(S), I32_MUL, ...set(ROW),
      ...rowStart(CP, VP, rpAt(0), PC, PV),
      ...get(CP), ...rpAt(4), ...i32c(2), I32_SHL, I32_ADD, ...set(PE),
      ...lanes((m) => [...get(BP), ...get(ROW), I32_ADD, ...v128load(16 * m), ...set(A0 + m), ...v128zero, ...set(A1 + m)]),
      ...block, ...loop, // pairs
      ...get(PC), ...i32c(4), I32_ADD, ...get(PE), I32_GE_U, ...brIf(1),
      ...get(PV), ...f64load(), ...f64x2splat, ...set(V), ...gatherBase(XP, PC, 0, BASE), ...accumulate(A0, V, BASE, f64x2sub),
      ...get(PV), ...f64load(8), ...f64x2splat, ...set(V), ...gatherBase(XP, PC, 4, BASE), ...accumulate(A1, V, BASE, f64x2sub),
      ...get(PC), ...i32c(8), I32_ADD, ...set(PC),
      ...get(PV), ...i32c(16), I32_ADD, ...set(PV),
      ...br(0),
      END, END,
      ...get(PC), ...get(PE), I32_LT_U, ...ifThen, // odd tail into s0
      ...get(PV), ...f64load(), ...f64x2splat, ...set(V), ...gatherBase(XP, PC, 0, BASE), ...accumulate(A0, V, BASE, f64x2sub),
      END,
      ...get(IP), ...get(I), ...i32c(3), I32_SHL, I32_ADD, ...f64load(), ...f64x2splat, ...set(V),
      // x_i = x_i + (s0 + s1)·dinv_i
      ...lanes((m) => [
        ...get(XP), ...get(ROW), I32_ADD,
        ...get(XP), ...get(ROW), I32_ADD, ...v128load(16 * m),
        ...get(A0 + m), ...get(A1 + m), ...f64x2add, ...get(V), ...f64x2mul, ...f64x2add,
        ...v128store(16 * m),
      ]),
      ...br(0),
      END, END,
    ];
    return fn(7, 6, 1 + 2 * H, code);
  })();

  /** a loop over the n rows of block vectors: ROW runs from 0 to n·S in steps of S */
  const rows = (N: number, ROW: number, END_: number, body: number[]): number[] => [
    ...i32c(0), ...set(ROW),
    ...get(N), ...i32c(S), I32_MUL, ...set(END_),
    ...block, ...loop,
    ...get(ROW), ...get(END_), I32_GE_U, ...brIf(1),
    ...body,
    ...get(ROW), ...i32c(S), I32_ADD, ...set(ROW),
    ...br(0),
    END, END,
  ];
  const at = (P: number, ROW: number, m: number): number[] => [...get(P), ...get(ROW), I32_ADD, ...v128load(16 * m)];

  // dots: params n0 up1 vp2 op3; i32 row4 end5; v128 acc6..
  const dots = (() => {
    const [N, UP, VP, OP, ROW, E] = [0, 1, 2, 3, 4, 5];
    const ACC = 6;
    const code = [
      ...lanes((m) => [...v128zero, ...set(ACC + m)]),
      ...rows(N, ROW, E, lanes((m) => [...get(ACC + m), ...at(UP, ROW, m), ...at(VP, ROW, m), ...f64x2mul, ...f64x2add, ...set(ACC + m)])),
      ...lanes((m) => [...get(OP), ...get(ACC + m), ...v128store(16 * m)]),
    ];
    return fn(4, 2, H, code);
  })();

  // update: params n0 xp1 pp2 rp3 qp4 ap5 mp6 op7; i32 row8 end9; v128 alpha10.., mask10+H.., rr10+2H.., t10+3H
  const update = (() => {
    const [N, XP, PP, RP, QP, AP, MP, OP, ROW, E] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9];
    const AL = 10, MK = 10 + H, RR = 10 + 2 * H, T = 10 + 3 * H;
    const body = lanes((m) => [
      // x = select(x + α p, x)
      ...get(XP), ...get(ROW), I32_ADD,
      ...at(XP, ROW, m), ...get(AL + m), ...at(PP, ROW, m), ...f64x2mul, ...f64x2add,
      ...at(XP, ROW, m), ...get(MK + m), ...v128bitselect, ...v128store(16 * m),
      // t = r − α q; r = select(t, r); rr += t·t
      ...at(RP, ROW, m), ...get(AL + m), ...at(QP, ROW, m), ...f64x2mul, ...f64x2sub, ...set(T),
      ...get(RP), ...get(ROW), I32_ADD,
      ...get(T), ...at(RP, ROW, m), ...get(MK + m), ...v128bitselect, ...v128store(16 * m),
      ...get(RR + m), ...get(T), ...get(T), ...f64x2mul, ...f64x2add, ...set(RR + m),
    ]);
    const code = [
      ...lanes((m) => [...get(AP), ...v128load(16 * m), ...set(AL + m), ...get(MP), ...v128load(16 * m), ...set(MK + m), ...v128zero, ...set(RR + m)]),
      ...rows(N, ROW, E, body),
      ...lanes((m) => [...get(OP), ...get(RR + m), ...v128store(16 * m)]),
    ];
    return fn(8, 2, 3 * H + 1, code);
  })();

  // direction: params n0 zp1 pp2 bp3 mp4; i32 row5 end6; v128 beta7.., mask7+H..
  const direction = (() => {
    const [N, ZP, PP, BP, MP, ROW, E] = [0, 1, 2, 3, 4, 5, 6];
    const BE = 7, MK = 7 + H;
    const body = lanes((m) => [
      ...get(PP), ...get(ROW), I32_ADD,
      ...at(ZP, ROW, m), ...get(BE + m), ...at(PP, ROW, m), ...f64x2mul, ...f64x2add,
      ...at(PP, ROW, m), ...get(MK + m), ...v128bitselect, ...v128store(16 * m),
    ]);
    const code = [
      ...lanes((m) => [...get(BP), ...v128load(16 * m), ...set(BE + m), ...get(MP), ...v128load(16 * m), ...set(MK + m)]),
      ...rows(N, ROW, E, body),
    ];
    return fn(5, 2, 2 * H, code);
  })();

  const fns = [spmv, gsFwd, gsBwd, dots, update, direction];
  const bytes = [
    0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00, // "\0asm", version 1
    ...section(1, [fns.length, ...fns.flatMap((f) => f.type)]),
    ...section(2, [1, ...name('env'), ...name('mem'), 0x02, 0x00, 1]), // import memory, min 1 page
    ...section(3, [fns.length, ...fns.map((_, i) => i)]),
    ...section(7, [fns.length, ...['spmv', 'gsFwd', 'gsBwd', 'dots', 'update', 'direction'].flatMap((f, i) => [...name(f), 0x00, i])]),
    ...section(10, [fns.length, ...fns.flatMap((f) => f.body)]),
  ];
  return new Uint8Array(bytes);
}

const modules = new Map<number, WebAssembly.Module | null>();

/** The compiled module for width k, or null where WebAssembly SIMD is missing. */
function moduleFor(k: number): WebAssembly.Module | null {
  if (modules.has(k)) return modules.get(k)!;
  let mod: WebAssembly.Module | null = null;
  try {
    if (typeof WebAssembly !== 'undefined') {
      const bytes = blockModuleBytes(k);
      // synchronous compilation is fine: the module is a few kilobytes
      if (WebAssembly.validate(bytes)) mod = new WebAssembly.Module(bytes);
    }
  } catch {
    mod = null;
  }
  modules.set(k, mod);
  return mod;
}

/** True when this runtime runs the WebAssembly block kernels. */
export function wasmBlockAvailable(): boolean {
  return moduleFor(2) !== null;
}

const PAGE = 65536;
const MAX_BYTES = 4 * 1024 * 1024 * 1024 - PAGE; // wasm32
const align16 = (v: number): number => Math.ceil(v / 16) * 16;

type Fn = (...args: number[]) => void;

/**
 * Bind the block operations to A (which must not change afterwards) for width k. The WebAssembly
 * kernels need k even; an odd k, a matrix too large for a 32-bit memory, or a runtime without SIMD
 * take the JS kernels (same bits).
 */
export function prepareBlockKernels(A: Csr, k: number, options: BlockKernelOptions = {}): BlockKernels {
  if (!(Number.isInteger(k) && k >= 1)) throw new Error(`block width ${k} must be a positive integer`);
  const slots = options.slots ?? BLOCK_SLOTS;
  const { diagPos, dinv } = diagonalParts(A);
  const js = (): BlockKernels => jsKernels(A, k, slots, diagPos, dinv);
  const mod = options.kernel === 'js' || k % 2 !== 0 ? null : moduleFor(k);
  if (!mod) return js();
  const { n } = A;
  const nnz = A.rowPtr[n];
  const rp = 0;
  const cp = align16(rp + 4 * (n + 1));
  const vp = align16(cp + 4 * nnz);
  const dp = align16(vp + 8 * nnz);
  const ip = align16(dp + 4 * n);
  const vecBytes = align16(8 * n * k);
  const slot0 = align16(ip + 8 * n);
  const scratch = 3; // for arguments that are not our own vectors
  const par = slot0 + (slots + scratch) * vecBytes; // α or β, the lane mask, the k sums
  const size = par + align16(24 * k);
  if (size > MAX_BYTES) return js();
  let memory: WebAssembly.Memory;
  let ex: Record<string, Fn>;
  try {
    memory = new WebAssembly.Memory({ initial: Math.ceil(size / PAGE) });
    ex = new WebAssembly.Instance(mod, { env: { mem: memory } }).exports as unknown as Record<string, Fn>;
  } catch {
    return js(); // the runtime refused the memory
  }
  const buf = memory.buffer; // never grown afterwards: views stay valid
  new Uint32Array(buf, rp, n + 1).set(A.rowPtr);
  new Uint32Array(buf, cp, nnz).set(A.cols.subarray(0, nnz));
  new Float64Array(buf, vp, nnz).set(A.vals.subarray(0, nnz));
  new Uint32Array(buf, dp, n).set(diagPos);
  new Float64Array(buf, ip, n).set(dinv);
  const len = n * k;
  const own = (v: Float64Array): boolean => v.buffer === buf;
  /** the byte offset of v in the memory, copying it into scratch slot s when it lives elsewhere */
  const inArg = (v: Float64Array, s: number, copy: boolean): number => {
    if (own(v)) return v.byteOffset;
    const off = slot0 + (slots + s) * vecBytes;
    if (copy) new Float64Array(buf, off, len).set(v.subarray(0, len));
    return off;
  };
  const coef = new Float64Array(buf, par, k);
  const mask = new BigInt64Array(buf, par + 8 * k, k);
  const sums = new Float64Array(buf, par + 16 * k, k);
  /** α or β into the memory, and the lane mask: all ones for an active column */
  const setLanes = (c: Float64Array, active: Uint8Array): void => {
    coef.set(c.subarray(0, k));
    for (let j = 0; j < k; j++) mask[j] = active[j] ? -1n : 0n;
  };
  const outArg = (v: Float64Array, off: number): void => {
    if (!own(v)) v.set(new Float64Array(buf, off, len));
  };
  return {
    n, k, kernel: 'wasm-simd',
    spmv(X, Y) {
      const xo = inArg(X, 0, true), yo = inArg(Y, 1, false);
      ex.spmv(n, rp, cp, vp, xo, yo);
      outArg(Y, yo);
    },
    gsForwardFromZeroWithResidual(B, X, Out) {
      const bo = inArg(B, 0, true), xo = inArg(X, 1, false), oo = inArg(Out, 2, false);
      ex.gsFwd(n, rp, cp, vp, dp, ip, bo, xo, oo);
      outArg(X, xo);
      outArg(Out, oo);
    },
    gsBackward(B, X) {
      const bo = inArg(B, 0, true), xo = inArg(X, 1, true);
      ex.gsBwd(n, rp, cp, vp, ip, bo, xo);
      outArg(X, xo);
    },
    dots(U, V, out) {
      const uo = inArg(U, 0, true), vo = inArg(V, 1, true);
      ex.dots(n, uo, vo, par + 16 * k);
      out.set(sums);
    },
    update(alpha, active, X, P, R, Q, rr) {
      setLanes(alpha, active);
      const xo = inArg(X, 0, true), po = inArg(P, 1, true), ro = inArg(R, 2, true);
      const qo = own(Q) ? Q.byteOffset : -1;
      if (qo < 0) throw new Error('block kernels: update needs Q among the kernels\' own vectors');
      ex.update(n, xo, po, ro, qo, par, par + 8 * k, par + 16 * k);
      outArg(X, xo);
      outArg(R, ro);
      rr.set(sums);
    },
    direction(beta, active, Z, P) {
      setLanes(beta, active);
      const zo = inArg(Z, 0, true), po = inArg(P, 1, true);
      ex.direction(n, zo, po, par, par + 8 * k);
      outArg(P, po);
    },
    vector(slot) {
      if (!(slot >= 0 && slot < slots)) throw new Error(`block kernels: no vector slot ${slot} (${slots} slots)`);
      return new Float64Array(buf, slot0 + slot * vecBytes, len);
    },
  };
}
