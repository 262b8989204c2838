/**
 * Conforming newest-vertex bisection of a Kuhn (Freudenthal) box mesh, in flat typed arrays.
 *
 * Method (published; implemented here from the papers' rules):
 *   - Initial mesh: the box is cut into cells, each cell into the 6 Kuhn tetrahedra around its
 *     main diagonal (Kuhn 1960; Freudenthal 1942). Every cell uses the same diagonal direction,
 *     so the cells together form the Kuhn/Freudenthal triangulation of a lattice, which is
 *     conforming across cell faces and whose tagging satisfies the matching condition
 *     (Stevenson, Math. Comp. 77, 2008, section 4). Conformity is checked by tests, not assumed.
 *   - Tagged simplices (Maubach, SIAM J. Sci. Comput. 16, 1995): a tetrahedron is stored as an
 *     ordered vertex list (y0, y1, y2, y3) and a tag k in {1, 2, 3}. Its refinement edge is y0–yk.
 *     Bisection at the midpoint z of y0–yk gives
 *
 *         child A = (y0 .. y(k-1), z, y(k+1) .. y3; k')      (yk replaced by z)
 *         child B = (y1 .. yk,     z, y(k+1) .. y3; k')      (y0 dropped, z inserted at k)
 *
 *     with k' = k - 1 if k > 1, else 3.
 *
 *             y3                                   Kuhn path inside one cell (tag k = 3):
 *            /|\                                       x0 = cell corner
 *           / | \           refinement edge y0–yk      x1 = x0 + h e_p1
 *          /  |  \          is cut at z; the two       x2 = x1 + h e_p2
 *        y0---z---yk        children share face        x3 = x0 + h (1,1,1)
 *          \  |  /          (z and the two other       for each of the 6 permutations
 *           \ | /           vertices)                   (p1, p2, p3) of the axes
 *            y_other
 *
 *   - Closure: after bisecting the marked elements, every element with a hanging midpoint on one
 *     of its edges is bisected, repeatedly, until none remains. For meshes satisfying the matching
 *     condition this terminates in the smallest conforming refinement (Stevenson 2008, Thm 4.3).
 *
 * Storage: `tets` keeps the Maubach order (needed to continue bisecting later), which is not
 * always positively oriented. `tetFlip[t] = 1` records that (y0, y1, y2, y3) is negatively
 * oriented; toTetMesh() swaps the last two vertices of such tets so that the exported, FEM-facing
 * mesh satisfies det > 0 (types.ts). The flip bit is propagated exactly, without floating point:
 *   child A: z = (y0 + yk)/2 replaces yk, moving it along y0→yk by half: orientation kept.
 *   child B: z replaces y0 (same argument), then z moves from position 0 to position k, a cyclic
 *            shift of k + 1 entries with sign (-1)^k: the orientation flips when k is odd.
 *
 * Determinism: all loops run over global indices in increasing order, midpoints are looked up in a
 * typed open-addressing hash with linear probing (no Map iteration), and child B of tet t is
 * appended at the end while child A keeps index t. The same input gives the same bytes.
 */
import { cooperate, COOPERATE_MASK } from '../cooperate';
import { NO_PARENT, type TetMesh } from './types';
import { MeshError } from './errors';

export type Vec3Like = readonly [number, number, number];

export interface KuhnBoxOptions {
  center: Vec3Like;
  halfExtents: Vec3Like;
  /** cells per axis */
  cells: readonly [number, number, number];
  /**
   * Optional capacity hints (tets, vertices) so that a refinement of known size never regrows.
   * Arrays grow by doubling when a hint is too small.
   */
  capacity?: { tets?: number; vertices?: number };
  /**
   * Explicit grid coordinates per axis (a tensor grid with non-uniform spacing), increasing, the
   * first and last equal to the box ends; `cells` must then be their counts minus one. Used to put
   * grid planes at layer interfaces and electrode faces (device.ts). Omitted: uniform spacing.
   */
  lines?: readonly [ArrayLike<number>, ArrayLike<number>, ArrayLike<number>];
}

/**
 * A tagged bisection mesh. Arrays have spare capacity: only the first nTets / nVertices entries
 * are meaningful. refine() updates the object in place and returns it.
 */
export interface BisectionMesh {
  nVertices: number;
  nTets: number;
  /** 3 per vertex, nm */
  coords: Float64Array;
  /** 2 per vertex: the endpoints of the edge this vertex bisected; NO_PARENT for initial vertices */
  parents: Uint32Array;
  /** bisection generation that created the vertex (0 for initial vertices) */
  vertexLevel: Uint8Array;
  /**
   * Box faces a vertex lies on, one bit each: bit 2*axis for the min face, bit 2*axis+1 for the
   * max face. A midpoint lies on a face exactly when both parents do, so its mask is the AND of
   * theirs (this is exact: the average of two equal coordinates is that coordinate).
   */
  vertexFaces: Uint8Array;
  /** 4 per tet, Maubach order (y0, y1, y2, y3) */
  tets: Uint32Array;
  /** Maubach tag k in {1, 2, 3}: the refinement edge is y0–yk */
  tetTag: Uint8Array;
  /** 1 when (y0, y1, y2, y3) is negatively oriented */
  tetFlip: Uint8Array;
  /** bisection generation of the tet (0 for initial Kuhn tets) */
  tetLevel: Uint8Array;
  /** region id (0 = host) */
  tetRegion: Uint8Array;
  /** domain */
  boxMin: [number, number, number];
  boxMax: [number, number, number];
  /** cells per axis of the initial Kuhn mesh */
  cells: [number, number, number];
}

/** The 6 permutations (p1, p2, p3) of the axes and the sign of det[e_p1, e_p2, e_p3]. */
const PERMS: ReadonlyArray<readonly [number, number, number, number]> = [
  [0, 1, 2, +1],
  [0, 2, 1, -1],
  [1, 0, 2, -1],
  [1, 2, 0, +1],
  [2, 0, 1, +1],
  [2, 1, 0, -1],
];

const MAX_LEVEL = 255;

function checkBox(center: Vec3Like, half: Vec3Like): void {
  for (let a = 0; a < 3; a++) {
    const c = center[a];
    const h = half[a];
    if (!Number.isFinite(c) || !Number.isFinite(h) || !(h > 0)) {
      throw new MeshError(
        'degenerate-box',
        `the domain is degenerate: half-extent ${'xyz'[a]} = ${h} nm and centre ${c} nm must be finite, with a positive half-extent`,
      );
    }
    // A box so thin that min and max round to the same double has no interior.
    if (!(c + h > c - h)) {
      throw new MeshError('degenerate-box', `the domain has no interior along ${'xyz'[a]} (half-extent ${h} nm)`);
    }
  }
}

/**
 * The initial mesh: `cells` near-cubic cells per axis, 6 Kuhn tets per cell, all tagged
 * (x0, x1, x2, x3; k = 3). Vertices are the lattice points, index i + (nx+1)(j + (ny+1) k).
 */
export function kuhnBox(opts: KuhnBoxOptions): BisectionMesh {
  checkBox(opts.center, opts.halfExtents);
  const [nx, ny, nz] = opts.cells;
  for (const n of opts.cells) {
    if (!Number.isInteger(n) || n < 1) throw new MeshError('degenerate-box', `cell counts must be positive integers, got ${opts.cells.join(', ')}`);
  }
  const lo: [number, number, number] = [0, 0, 0];
  const hi: [number, number, number] = [0, 0, 0];
  for (let a = 0; a < 3; a++) {
    lo[a] = opts.center[a] - opts.halfExtents[a];
    hi[a] = opts.center[a] + opts.halfExtents[a];
  }
  const px = nx + 1;
  const py = ny + 1;
  const nv0 = px * py * (nz + 1);
  const nt0 = 6 * nx * ny * nz;
  const tetCap = Math.max(nt0, Math.ceil(opts.capacity?.tets ?? 0));
  const vertCap = Math.max(nv0, Math.ceil(opts.capacity?.vertices ?? 0));

  const coords = new Float64Array(3 * vertCap);
  const parents = new Uint32Array(2 * vertCap);
  const vertexLevel = new Uint8Array(vertCap);
  const vertexFaces = new Uint8Array(vertCap);
  const counts = [nx, ny, nz];

  // Lattice coordinates: the last plane is set to the box max exactly so that boundary
  // vertices lie exactly on the box faces (midpoints of them then do too).
  const lines = opts.lines;
  if (lines) {
    for (let a = 0; a < 3; a++) {
      const l = lines[a];
      let ok = l.length === counts[a] + 1 && l[0] === lo[a] && l[l.length - 1] === hi[a];
      for (let i = 1; ok && i < l.length; i++) ok = l[i] > l[i - 1];
      if (!ok) throw new MeshError('degenerate-box', `grid lines along ${'xyz'[a]} must increase from the box min to the box max, one more than the cells`);
    }
  }
  const axisCoord = (a: number, i: number): number =>
    lines ? lines[a][i] : i === 0 ? lo[a] : i === counts[a] ? hi[a] : lo[a] + ((hi[a] - lo[a]) * i) / counts[a];
  for (let k = 0; k <= nz; k++) {
    const z = axisCoord(2, k);
    const fz = (k === 0 ? 16 : 0) | (k === nz ? 32 : 0);
    for (let j = 0; j <= ny; j++) {
      const y = axisCoord(1, j);
      const fy = (j === 0 ? 4 : 0) | (j === ny ? 8 : 0);
      for (let i = 0; i <= nx; i++) {
        const v = i + px * (j + py * k);
        coords[3 * v] = axisCoord(0, i);
        coords[3 * v + 1] = y;
        coords[3 * v + 2] = z;
        parents[2 * v] = NO_PARENT;
        parents[2 * v + 1] = NO_PARENT;
        vertexFaces[v] = (i === 0 ? 1 : 0) | (i === nx ? 2 : 0) | fy | fz;
      }
    }
  }

  const tets = new Uint32Array(4 * tetCap);
  const tetTag = new Uint8Array(tetCap);
  const tetFlip = new Uint8Array(tetCap);
  const tetLevel = new Uint8Array(tetCap);
  const tetRegion = new Uint8Array(tetCap);
  const stride = [1, px, px * py];
  let t = 0;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        const x0 = i + px * (j + py * k);
        const x3 = x0 + stride[0] + stride[1] + stride[2];
        for (const [p1, p2, , sign] of PERMS) {
          const x1 = x0 + stride[p1];
          const x2 = x1 + stride[p2];
          tets[4 * t] = x0;
          tets[4 * t + 1] = x1;
          tets[4 * t + 2] = x2;
          tets[4 * t + 3] = x3;
          tetTag[t] = 3;
          // det[x1-x0, x2-x0, x3-x0] = det[e_p1, e_p1+e_p2, e_p1+e_p2+e_p3] · (cell volume) = sign · vol
          tetFlip[t] = sign > 0 ? 0 : 1;
          t++;
        }
      }
    }
  }
  return {
    nVertices: nv0,
    nTets: nt0,
    coords,
    parents,
    vertexLevel,
    vertexFaces,
    tets,
    tetTag,
    tetFlip,
    tetLevel,
    tetRegion,
    boxMin: lo,
    boxMax: hi,
    cells: [nx, ny, nz],
  };
}

/* ------------------------------------------------------------------------------------------ */
/* Growth helpers (doubling: the final size of an adaptive refinement is not provable up front). */

function grownU32(a: Uint32Array, n: number): Uint32Array {
  const b = new Uint32Array(n);
  b.set(a);
  return b;
}
function grownU8(a: Uint8Array, n: number): Uint8Array {
  const b = new Uint8Array(n);
  b.set(a);
  return b;
}
function grownF64(a: Float64Array, n: number): Float64Array {
  const b = new Float64Array(n);
  b.set(a);
  return b;
}

function growTets(m: BisectionMesh, need: number): void {
  let cap = m.tetTag.length;
  if (need <= cap) return;
  while (cap < need) cap *= 2;
  m.tets = grownU32(m.tets, 4 * cap);
  m.tetTag = grownU8(m.tetTag, cap);
  m.tetFlip = grownU8(m.tetFlip, cap);
  m.tetLevel = grownU8(m.tetLevel, cap);
  m.tetRegion = grownU8(m.tetRegion, cap);
}

function growVertices(m: BisectionMesh, need: number): void {
  let cap = m.vertexLevel.length;
  if (need <= cap) return;
  while (cap < need) cap *= 2;
  m.coords = grownF64(m.coords, 3 * cap);
  m.parents = grownU32(m.parents, 2 * cap);
  m.vertexLevel = grownU8(m.vertexLevel, cap);
  m.vertexFaces = grownU8(m.vertexFaces, cap);
}

/* ------------------------------------------------------------------------------------------ */
/* Edge → midpoint hash: open addressing, linear probing, keys (lo, hi) with lo < hi.           */
/*                                                                                              */
/*   slots: | lo | hi | mid | - | lo | hi | mid | - | ...   4 × Uint32 = 16 bytes per slot,     */
/*   so one probe touches one cache line (separate key/value arrays cost three misses).         */

const EMPTY = 0xffffffff;

class MidpointHash {
  slots: Uint32Array;
  mask: number;
  count = 0;
  /**
   * One bit per 4 slots, set from other hash bits than the slot index: most lookups (the hanging
   * test) are misses, and this 1/64-size filter answers most of them from cache without touching
   * the table (a one-hash Bloom filter; Bloom, CACM 13, 1970).
   */
  filter: Int32Array;
  filterMask: number;

  constructor(expected: number) {
    // load factor ≤ 1/2 keeps linear probing short (expected probes ≈ 1.5 hit / 2.5 miss; Knuth TAOCP 3, 6.4)
    let cap = 1024;
    while (cap < 2 * expected) cap *= 2;
    this.slots = new Uint32Array(4 * cap).fill(EMPTY);
    this.mask = cap - 1;
    // 16 filter bits per expected entry at full load: false-positive rate ≈ 1 − e^{−1/16} ≈ 6 %
    this.filter = new Int32Array(cap >> 2);
    this.filterMask = 8 * cap - 1;
  }

  get byteLength(): number {
    return this.slots.byteLength + this.filter.byteLength;
  }

  static mix(lo: number, hi: number): number {
    let h = Math.imul(lo, 0x9e3779b1) ^ Math.imul(hi, 0x85ebca77);
    h ^= h >>> 16;
    h = Math.imul(h, 0x7feb352d);
    h ^= h >>> 15;
    return h;
  }

  static slot(lo: number, hi: number, mask: number): number {
    return MidpointHash.mix(lo, hi) & mask;
  }

  /** filter bit index: the mixed hash rotated, so it is not the slot index */
  private bit(h: number): number {
    return ((h >>> 13) | (h << 19)) & this.filterMask;
  }

  get(lo: number, hi: number): number {
    const h = MidpointHash.mix(lo, hi);
    const f = this.bit(h);
    if ((this.filter[f >>> 5] & (1 << (f & 31))) === 0) return EMPTY;
    const slots = this.slots;
    const mask = this.mask;
    let s = h & mask;
    for (;;) {
      const b = s << 2;
      const k = slots[b];
      if (k === EMPTY) return EMPTY;
      if (k === lo && slots[b + 1] === hi) return slots[b + 2];
      s = (s + 1) & mask;
    }
  }

  /** insert a key known to be absent */
  put(lo: number, hi: number, v: number): void {
    if (2 * (this.count + 1) > this.mask + 1) this.rehash();
    const slots = this.slots;
    const mask = this.mask;
    let s = MidpointHash.slot(lo, hi, mask);
    while (slots[s << 2] !== EMPTY) s = (s + 1) & mask;
    const b = s << 2;
    slots[b] = lo;
    slots[b + 1] = hi;
    slots[b + 2] = v;
    const f = this.bit(MidpointHash.mix(lo, hi));
    this.filter[f >>> 5] |= 1 << (f & 31);
    this.count++;
  }

  private rehash(): void {
    const old = this.slots;
    const cap = 2 * (this.mask + 1);
    const slots = new Uint32Array(4 * cap).fill(EMPTY);
    const mask = cap - 1;
    // re-insert in slot order: deterministic
    for (let b = 0; b < old.length; b += 4) {
      const lo = old[b];
      if (lo === EMPTY) continue;
      let s = MidpointHash.slot(lo, old[b + 1], mask);
      while (slots[s << 2] !== EMPTY) s = (s + 1) & mask;
      slots[s << 2] = lo;
      slots[(s << 2) + 1] = old[b + 1];
      slots[(s << 2) + 2] = old[b + 2];
    }
    this.slots = slots;
    this.mask = mask;
    this.filter = new Int32Array(cap >> 2);
    this.filterMask = 8 * cap - 1;
    for (let b = 0; b < slots.length; b += 4) {
      if (slots[b] === EMPTY) continue;
      const f = this.bit(MidpointHash.mix(slots[b], slots[b + 1]));
      this.filter[f >>> 5] |= 1 << (f & 31);
    }
  }
}

/* ------------------------------------------------------------------------------------------ */

/** Decides whether tet t (Maubach order in m.tets) must be bisected to meet a size field. */
export type TooLarge = (coords: Float64Array, tets: Uint32Array, t: number) => boolean;

export interface RefineOptions {
  /** refuse (MeshError 'too-many-elements') when the tet count would exceed this */
  maxTets?: number;
  /** expected number of new vertices (sizes the midpoint hash; it grows by doubling if short) */
  expectedNewVertices?: number;
}

export interface RefineStats {
  bisections: number;
  passes: number;
  /** bytes of the engine's transient arrays at their largest (midpoint hash, stamps, block clocks) */
  workBytes: number;
}

/** tets per block of the verification clock (see refineEngine) */
const BLOCK_SHIFT = 6;
const BLOCK_MASK = (1 << BLOCK_SHIFT) - 1;

/**
 * Records the clock at the start of block bi. Tets appended during the pass can outrun the
 * block array: it then doubles (returned, so the caller keeps the grown array).
 */
function stampBlock(block: Uint32Array<ArrayBuffer>, bi: number, clock: number): Uint32Array<ArrayBuffer> {
  if (bi >= block.length) {
    const g = new Uint32Array(2 * block.length + 1);
    g.set(block);
    block = g;
  }
  block[bi] = clock;
  return block;
}

/**
 * The refinement engine shared by refine() and refineToSize().
 *
 * Pass 1 bisects the marked tets once each (marks mode), or bisects every tet repeatedly until it
 * meets the size field and has no hanging midpoint (size mode; child A stays at index t and is
 * re-examined at once, child B is appended and examined when the loop reaches it). Later passes
 * only close the mesh: bisect tets with a hanging midpoint until a pass changes nothing.
 *
 * Which tets need a hash lookup? A global clock counts edge splits; stamp[v] is the clock of the
 * last split of an edge at v. A pass visits tets in increasing index (appended tets included) and
 * verifies each one, so the time a tet was last verified grows with its index; we keep that
 * time only per block of 64 tets (blockClock, the clock when the pass reached the block: a lower
 * bound, hence safe). In the next pass a tet can only have gained a hanging midpoint if two of its
 * vertices carry a stamp newer than its block clock; every other tet costs four loads and no
 * probe. A tet just bisected, or appended after the previous pass, is checked in full (clock 0).
 *
 *     pass p:   t = 0 ....... 63 | 64 ...... 127 | ...      blockClock[b] = clock at block start
 *     pass p+1: probe tet t only if ≥ 2 vertices have stamp > blockClock_p[t >> 6]
 *
 * The hash holds only edges split during this call: the input mesh is conforming, so any hanging
 * midpoint was created in this call.
 */
function refineEngine(m: BisectionMesh, marks: Uint8Array | null, tooLarge: TooLarge | null, opts: RefineOptions): RefineStats {
  const maxTets = opts.maxTets ?? Infinity;
  let coords = m.coords;
  let parents = m.parents;
  let vertexLevel = m.vertexLevel;
  let vertexFaces = m.vertexFaces;
  let tets = m.tets;
  let tetTag = m.tetTag;
  let tetFlip = m.tetFlip;
  let tetLevel = m.tetLevel;
  let tetRegion = m.tetRegion;
  let stamp = new Uint32Array(vertexLevel.length);
  let nv = m.nVertices;
  let nt = m.nTets;
  let passes = 1;
  let bisections = 0;
  let clock = 0;
  let workPeak = 0;
  const hash = new MidpointHash(Math.max(1024, opts.expectedNewVertices ?? nv >> 2));
  let prevBlock = new Uint32Array(0);
  let prevEnd = 0; // tets with index < prevEnd were verified in the previous pass

  const refreshTets = (): void => {
    tets = m.tets;
    tetTag = m.tetTag;
    tetFlip = m.tetFlip;
    tetLevel = m.tetLevel;
    tetRegion = m.tetRegion;
  };
  const refreshVertices = (): void => {
    coords = m.coords;
    parents = m.parents;
    vertexLevel = m.vertexLevel;
    vertexFaces = m.vertexFaces;
    if (stamp.length < vertexLevel.length) {
      const s = new Uint32Array(vertexLevel.length);
      s.set(stamp);
      stamp = s;
    }
  };

  /** midpoint of edge (a, b), created on first request */
  const midpoint = (a: number, b: number, level: number): number => {
    const lo = a < b ? a : b;
    const hi = a < b ? b : a;
    const found = hash.get(lo, hi);
    if (found !== EMPTY) return found;
    if (nv + 1 > vertexLevel.length) {
      growVertices(m, nv + 1);
      refreshVertices();
    }
    const z = nv++;
    coords[3 * z] = 0.5 * (coords[3 * lo] + coords[3 * hi]);
    coords[3 * z + 1] = 0.5 * (coords[3 * lo + 1] + coords[3 * hi + 1]);
    coords[3 * z + 2] = 0.5 * (coords[3 * lo + 2] + coords[3 * hi + 2]);
    parents[2 * z] = lo;
    parents[2 * z + 1] = hi;
    vertexLevel[z] = level;
    vertexFaces[z] = vertexFaces[lo] & vertexFaces[hi];
    hash.put(lo, hi, z);
    clock++;
    stamp[lo] = clock;
    stamp[hi] = clock;
    return z;
  };

  const bisect = (t: number): void => {
    if (nt + 1 > maxTets) {
      throw new MeshError('too-many-elements', `refinement stopped: the mesh would exceed ${maxTets} tetrahedra`, { limit: maxTets });
    }
    if (nt + 1 > tetTag.length) {
      growTets(m, nt + 1);
      refreshTets();
    }
    const level = tetLevel[t] + 1;
    if (level > MAX_LEVEL) {
      throw new MeshError('level-overflow', `more than ${MAX_LEVEL} bisection generations requested; the size field is too fine for the domain`);
    }
    const b = 4 * t;
    const k = tetTag[t];
    const y0 = tets[b];
    const y1 = tets[b + 1];
    const y2 = tets[b + 2];
    const y3 = tets[b + 3];
    const z = midpoint(y0, tets[b + k], level);
    const kk = k > 1 ? k - 1 : 3;
    const c = 4 * nt;
    // child B = (y1 .. yk, z, y(k+1) .. y3), appended
    if (k === 1) {
      tets[c] = y1; tets[c + 1] = z; tets[c + 2] = y2; tets[c + 3] = y3;
    } else if (k === 2) {
      tets[c] = y1; tets[c + 1] = y2; tets[c + 2] = z; tets[c + 3] = y3;
    } else {
      tets[c] = y1; tets[c + 1] = y2; tets[c + 2] = y3; tets[c + 3] = z;
    }
    tetTag[nt] = kk;
    tetFlip[nt] = tetFlip[t] ^ (k & 1);
    tetLevel[nt] = level;
    tetRegion[nt] = tetRegion[t];
    // child A = parent with yk replaced by z, in place
    tets[b + k] = z;
    tetTag[t] = kk;
    tetLevel[t] = level;
    nt++;
    // a turn-taking point every few thousand bisections (a single coarse tet may take thousands)
    if ((++bisections & COOPERATE_MASK) === 0) cooperate();
  };

  /** true when tet t has a hanging midpoint on an edge whose endpoints both have stamp > since */
  const hanging = (t: number, since: number): boolean => {
    if (hash.count === 0) return false;
    const b = 4 * t;
    const v0 = tets[b];
    const v1 = tets[b + 1];
    const v2 = tets[b + 2];
    const v3 = tets[b + 3];
    const s0 = stamp[v0] > since;
    const s1 = stamp[v1] > since;
    const s2 = stamp[v2] > since;
    const s3 = stamp[v3] > since;
    if (+s0 + +s1 + +s2 + +s3 < 2) return false;
    if (s0 && s1 && hash.get(v0 < v1 ? v0 : v1, v0 < v1 ? v1 : v0) !== EMPTY) return true;
    if (s0 && s2 && hash.get(v0 < v2 ? v0 : v2, v0 < v2 ? v2 : v0) !== EMPTY) return true;
    if (s0 && s3 && hash.get(v0 < v3 ? v0 : v3, v0 < v3 ? v3 : v0) !== EMPTY) return true;
    if (s1 && s2 && hash.get(v1 < v2 ? v1 : v2, v1 < v2 ? v2 : v1) !== EMPTY) return true;
    if (s1 && s3 && hash.get(v1 < v3 ? v1 : v3, v1 < v3 ? v3 : v1) !== EMPTY) return true;
    if (s2 && s3 && hash.get(v2 < v3 ? v2 : v3, v2 < v3 ? v3 : v2) !== EMPTY) return true;
    return false;
  };

  const noteWork = (blocks: Uint32Array): void => {
    const bytes = hash.byteLength + stamp.byteLength + prevBlock.byteLength + blocks.byteLength;
    if (bytes > workPeak) workPeak = bytes;
  };

  try {
    if (marks) {
      // pass 1: each marked tet once; nothing verified yet, so the next pass checks all (clock 0)
      const n0 = nt;
      for (let t = 0; t < n0; t++) {
        if ((t & COOPERATE_MASK) === 0) cooperate();
        if (marks[t]) bisect(t);
      }
    } else if (tooLarge) {
      // pass 1: to size, verifying each tet against splits so far
      let block = new Uint32Array(((m.tetTag.length - 1) >> BLOCK_SHIFT) + 1);
      for (let t = 0; t < nt; t++) {
        if ((t & BLOCK_MASK) === 0) block = stampBlock(block, t >> BLOCK_SHIFT, clock);
        if ((t & COOPERATE_MASK) === 0) cooperate();
        while (tooLarge(coords, tets, t) || hanging(t, 0)) bisect(t);
      }
      noteWork(block);
      prevBlock = block;
      prevEnd = nt;
    }
    // closure passes
    for (;;) {
      if (hash.count === 0) break;
      passes++;
      const before = bisections;
      let block = new Uint32Array(((Math.max(nt, 1) - 1) >> BLOCK_SHIFT) + 1);
      for (let t = 0; t < nt; t++) {
        if ((t & BLOCK_MASK) === 0) block = stampBlock(block, t >> BLOCK_SHIFT, clock);
        if ((t & COOPERATE_MASK) === 0) cooperate();
        let since = t < prevEnd ? prevBlock[t >> BLOCK_SHIFT] : 0;
        while (hanging(t, since)) {
          bisect(t);
          since = 0;
        }
      }
      noteWork(block);
      prevBlock = block;
      prevEnd = nt;
      if (bisections === before) break;
    }
  } finally {
    // keep the object consistent with the arrays even when a refusal interrupts the loop
    m.nVertices = nv;
    m.nTets = nt;
  }
  noteWork(new Uint32Array(0));
  return { bisections, passes, workBytes: workPeak };
}

/**
 * Bisect every tet t with marked[t] ≠ 0 once (along its Maubach refinement edge), then close the
 * mesh. Updates `mesh` in place and returns it. Index bookkeeping for callers that transfer data:
 * tet t keeps index t for its first child; every other new tet and vertex is appended; the new
 * vertex i is the midpoint of parents[2i], parents[2i+1].
 */
export function refine(mesh: BisectionMesh, marked: Uint8Array, opts: RefineOptions = {}): BisectionMesh {
  checkMarks(mesh, marked, opts);
  refineEngine(mesh, marked, null, opts);
  return mesh;
}

/**
 * Marker length, and a refusal before any change when the marked tets alone would pass maxTets
 * (each marked tet adds one). The closure can still pass it later; then the error leaves the mesh
 * part-refined (callers that must keep it intact refine a copy).
 */
function checkMarks(mesh: BisectionMesh, marked: Uint8Array, opts: RefineOptions): void {
  if (marked.length < mesh.nTets) {
    throw new MeshError('bad-marker', `the marker array has ${marked.length} entries for ${mesh.nTets} tetrahedra`);
  }
  if (opts.maxTets !== undefined) {
    let n = 0;
    for (let t = 0; t < mesh.nTets; t++) if (marked[t]) n++;
    if (mesh.nTets + n > opts.maxTets) {
      throw new MeshError('too-many-elements', `refinement refused: bisecting ${n} marked tetrahedra would pass ${opts.maxTets}`, { limit: opts.maxTets, marked: n });
    }
  }
}

/** Like refine() but returns the statistics of the run. */
export function refineWithStats(mesh: BisectionMesh, marked: Uint8Array, opts: RefineOptions = {}): RefineStats {
  checkMarks(mesh, marked, opts);
  return refineEngine(mesh, marked, null, opts);
}

/** Bisect every tet `times` times (each round: mark all, refine with closure). */
export function refineUniform(mesh: BisectionMesh, times: number, opts: RefineOptions = {}): BisectionMesh {
  for (let i = 0; i < times; i++) {
    const marks = new Uint8Array(mesh.nTets).fill(1);
    checkMarks(mesh, marks, opts);
    growTets(mesh, 2 * mesh.nTets);
    refineEngine(mesh, marks, null, opts);
  }
  return mesh;
}

/**
 * Bisect until every tet satisfies the size test, then close the mesh. The size test must be
 * monotone (a child of a tet that passes also passes), which holds for "longest edge ≤ minimum of
 * the size field over the tet's bounding box": a child's box and longest edge are no larger.
 */
export function refineToSize(mesh: BisectionMesh, tooLarge: TooLarge, opts: RefineOptions = {}): RefineStats {
  return refineEngine(mesh, null, tooLarge, opts);
}

/**
 * The FEM-facing mesh: exact-length copies, every tet positively oriented (Maubach-order tets with
 * the flip bit get their last two vertices swapped), boundary flag from the box-face masks.
 */
export function toTetMesh(m: BisectionMesh): TetMesh {
  const nt = m.nTets;
  const nv = m.nVertices;
  const tets = m.tets.slice(0, 4 * nt);
  const flip = m.tetFlip;
  for (let t = 0; t < nt; t++) {
    if (flip[t]) {
      const b = 4 * t;
      const v2 = tets[b + 2];
      tets[b + 2] = tets[b + 3];
      tets[b + 3] = v2;
    }
  }
  const boundaryVertex = new Uint8Array(nv);
  const faces = m.vertexFaces;
  for (let v = 0; v < nv; v++) boundaryVertex[v] = faces[v] !== 0 ? 1 : 0;
  return {
    coords: m.coords.slice(0, 3 * nv),
    tets,
    tetLevel: m.tetLevel.slice(0, nt),
    tetRegion: m.tetRegion.slice(0, nt),
    parents: m.parents.slice(0, 2 * nv),
    vertexLevel: m.vertexLevel.slice(0, nv),
    boundaryVertex,
  };
}
