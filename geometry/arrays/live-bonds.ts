/**
 * The bond-graph site pairs (bonds.ts, bondPairs) kept up to date while sites move one at a
 * time: the live far-field session asks for them after every moved site.
 *
 * Why a move can skip the triangulation: when no four node projections are cocircular and no
 * three collinear, the Delaunay triangulation is unique, so delaunator returns it whatever the
 * insertion order. A triangulation in which every interior edge is locally Delaunay (the
 * opposite vertex of each pair of adjacent triangles lies outside the other's circumcircle) is
 * the Delaunay triangulation (Delaunay's lemma; de Berg et al., Computational Geometry, 3rd ed.,
 * Thm 9.8). Moving node p changes only the triangles around p and the pairs of triangles that
 * share an edge with them. So when, after the move,
 *   - p is not on the hull and every triangle around p keeps its orientation (no fold-over),
 *   - every edge of the triangles around p is still locally Delaunay,
 * each by a clear margin, and every interior edge was locally Delaunay by that margin before,
 * the old triangulation is the unique Delaunay triangulation of the moved nodes and a full
 * rebuild would give the same candidate edges. Only the lengths change, so the distance rule is
 * applied again to the same sorted candidates (O(edges), no triangulation). Otherwise — a
 * cocircular or collinear configuration (square arrays are cocircular), a hull node, stacked
 * nodes, a fold-over — it rebuilds in full, exactly as bondPairs.
 *
 * Margin: the in-circle and orientation determinants are computed in floating point; a sign is
 * trusted when the determinant exceeds 1e-9 of its scale (|coordinate differences|⁴ or ²), far
 * above the rounding of a few dozen operations (~1e-15 relative; common practice).
 */
import Delaunator from 'delaunator';
import { bondScratch, candidateKeys, graphNodes, nodeCentroid, pairsFromEdges, pruneKeys, type GraphNodes } from './bonds';

const MARGIN = 1e-9;

const next = (e: number) => (e % 3 === 2 ? e - 2 : e + 1);
const prev = (e: number) => (e % 3 === 0 ? e + 2 : e - 1);

/** orientation determinant of (a, b, c), and whether its sign is clear */
function orient(xy: ArrayLike<number>, a: number, b: number, c: number): number {
  const ax = xy[2 * a], ay = xy[2 * a + 1];
  const bx = xy[2 * b] - ax, by = xy[2 * b + 1] - ay;
  const cx = xy[2 * c] - ax, cy = xy[2 * c + 1] - ay;
  const det = bx * cy - by * cx;
  const scale = Math.max(Math.abs(bx), Math.abs(by), Math.abs(cx), Math.abs(cy)) ** 2;
  return Math.abs(det) > MARGIN * scale ? det : 0;
}

/**
 * 1 when d is clearly outside the circumcircle of the triangle (a, b, c) (either orientation),
 * −1 when clearly inside, 0 when too close to tell.
 */
function outside(xy: ArrayLike<number>, a: number, b: number, c: number, d: number): number {
  const dx = xy[2 * d], dy = xy[2 * d + 1];
  const ax = xy[2 * a] - dx, ay = xy[2 * a + 1] - dy;
  const bx = xy[2 * b] - dx, by = xy[2 * b + 1] - dy;
  const cx = xy[2 * c] - dx, cy = xy[2 * c + 1] - dy;
  const ap = ax * ax + ay * ay, bp = bx * bx + by * by, cp = cx * cx + cy * cy;
  const det = ax * (by * cp - bp * cy) - ay * (bx * cp - bp * cx) + ap * (bx * cy - by * cx);
  const o = (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
  const s = Math.max(Math.abs(ax), Math.abs(ay), Math.abs(bx), Math.abs(by), Math.abs(cx), Math.abs(cy));
  // det > 0 ⇔ d inside for a counter-clockwise (o > 0) triangle
  const inside = o > 0 ? det : -det;
  const m = MARGIN * s ** 4;
  return -inside > m ? 1 : inside > m ? -1 : 0;
}

export class LiveBondPairs {
  private readonly scratch = bondScratch();
  private nodes: GraphNodes | null = null;
  private keys: Float64Array = new Float64Array(0);
  private delaunay: Delaunator<Float64Array> | null = null;
  /** a halfedge leaving each node (−1: none) */
  private out = new Int32Array(0);
  /** every interior edge locally Delaunay by the margin (the precondition of a local update) */
  private strict = false;
  /** one halfedge of each quad whose diagonal is a toss-up (near-cocircular) */
  private ambiguous: number[] = [];
  /**
   * nodes whose move can change whether those quads are harmless: their corners and the corners'
   * neighbours (the lengths ambiguityHarmless reads); a move of any other node leaves it as it was
   */
  private nearAmbiguous = new Uint8Array(0);
  private recheckAmbiguous = false;
  /** the sign of the orientation of delaunator's triangles (all alike) */
  private turn = 0;
  /** how the last pairs were found, for the tests and the bench */
  lastWasLocal = false;

  constructor(private readonly shellFactor: number) {}

  /** full rebuild, exactly as bondPairs */
  build(positions: Float64Array, groups: readonly (string | undefined)[] | undefined): { I: Int32Array; J: Int32Array } {
    const nodes = graphNodes(positions, groups);
    const { keys, delaunay, stacked } = candidateKeys(nodes.centroids, nodes.m, this.scratch);
    this.nodes = nodes;
    this.keys = keys;
    this.delaunay = stacked ? null : delaunay;
    this.strict = false;
    if (this.delaunay) {
      const tri = this.delaunay.triangles, half = this.delaunay.halfedges, xy = this.delaunay.coords;
      if (this.out.length !== nodes.m) this.out = new Int32Array(nodes.m);
      this.out.fill(-1);
      let strict = true;
      // quads too close to cocircular to tell which diagonal delaunator takes: allowed when each
      // stands alone (its two triangles in no other such quad: two choices only) and neither of
      // its diagonals can survive the distance rule or set a node's nearest length (see
      // ambiguityHarmless)
      this.ambiguous = [];
      const marked = new Uint8Array(tri.length / 3);
      for (let e = 0; e < tri.length; e++) {
        this.out[tri[e]] = e;
        const g = half[e];
        if (!strict || g < e) continue;
        const side = outside(xy, tri[e], tri[next(e)], tri[prev(e)], tri[prev(g)]);
        if (side < 0) strict = false;
        else if (side === 0) {
          const t1 = Math.floor(e / 3), t2 = Math.floor(g / 3);
          if (marked[t1] || marked[t2]) strict = false;
          marked[t1] = marked[t2] = 1;
          this.ambiguous.push(e);
        }
      }
      this.nearAmbiguous = new Uint8Array(nodes.m);
      for (const e of this.ambiguous) {
        // the quad's four corners (2), then every node joined to a corner (1)
        for (const h of [e, next(e), prev(e), half[e], next(half[e]), prev(half[e])]) this.nearAmbiguous[tri[h]] = 2;
      }
      if (this.ambiguous.length) {
        for (let e = 0; e < tri.length; e++) if (this.nearAmbiguous[tri[e]] === 2 && this.nearAmbiguous[tri[next(e)]] !== 2) this.nearAmbiguous[tri[next(e)]] = 1;
        for (let e = 0; e < tri.length; e++) if (this.nearAmbiguous[tri[next(e)]] === 2 && this.nearAmbiguous[tri[e]] !== 2) this.nearAmbiguous[tri[e]] = 1;
      }
      if (strict && !this.ambiguityHarmless()) strict = false;
      this.turn = 0;
      for (let e = 0; e + 2 < tri.length && this.turn === 0; e += 3) this.turn = Math.sign(orient(xy, tri[e], tri[e + 1], tri[e + 2]));
      this.strict = strict && this.turn !== 0;
    }
    this.lastWasLocal = false;
    this.recheckAmbiguous = false;
    return pairsFromEdges(nodes, pruneKeys(keys, nodes.centroids, nodes.m, this.shellFactor).edges);
  }

  /**
   * Site i has moved (positions holds its new place; sites, order and clusters unchanged since
   * the last build or move). Returns false when a full build is needed; then the state is stale
   * and build() must follow.
   */
  moved(positions: Float64Array, i: number): boolean {
    const nodes = this.nodes, d = this.delaunay;
    if (!nodes || !d || !this.strict || i >= nodes.nodeOf.length) return false;
    const p = nodes.nodeOf[i];
    if (this.nearAmbiguous[p]) this.recheckAmbiguous = true;
    nodeCentroid(positions, nodes, p);
    const xy = d.coords;
    xy[2 * p] = nodes.centroids[3 * p];
    xy[2 * p + 1] = nodes.centroids[3 * p + 1];
    const tri = d.triangles, half = d.halfedges;
    const e0 = this.out[p];
    if (e0 < 0) return (this.strict = false);
    // walk round p: e leaves p; prev(e) arrives at p; its twin leaves p in the next triangle
    let e = e0;
    for (let guard = 0; ; guard++) {
      const b = tri[next(e)], c = tri[prev(e)];
      // keeps its orientation (delaunator's triangles all turn one way, this.turn)
      if (!(orient(xy, p, b, c) * this.turn > 0)) return (this.strict = false);
      for (const h of [e, next(e), prev(e)]) {
        const g = half[h];
        if (g < 0) {
          if (h === next(e)) continue; // the edge opposite p lies on the hull: no quad there
          return (this.strict = false); // p is on the hull
        }
        if (outside(xy, tri[h], tri[next(h)], tri[prev(h)], tri[prev(g)]) !== 1) return (this.strict = false);
      }
      const t = half[prev(e)];
      if (t < 0) return (this.strict = false);
      e = t;
      if (e === e0) break;
      if (guard > tri.length) return (this.strict = false);
    }
    return true;
  }

  /**
   * The pairs for the current positions after moved() calls that returned true, or null when a
   * near-cocircular quad elsewhere could now change them (then build()).
   */
  pairs(): { I: Int32Array; J: Int32Array } | null {
    const nodes = this.nodes as GraphNodes;
    if (this.recheckAmbiguous && !this.ambiguityHarmless()) return null;
    this.recheckAmbiguous = false;
    this.lastWasLocal = true;
    return pairsFromEdges(nodes, pruneKeys(this.keys, nodes.centroids, nodes.m, this.shellFactor).edges);
  }

  /**
   * Whether every near-cocircular quad gives the same kept edges with either diagonal: with nnC
   * the shortest length at each node over the other candidate edges, both diagonals of each such
   * quad are longer than nnC at both ends (so neither sets the nearest length) and fail the
   * distance rule against nnC. Then every choice delaunator can make gives the same nearest
   * lengths and the same kept edges.
   */
  private ambiguityHarmless(): boolean {
    if (this.ambiguous.length === 0) return true;
    const nodes = this.nodes as GraphNodes;
    const d = this.delaunay as Delaunator<Float64Array>;
    const { m, centroids } = nodes;
    const tri = d.triangles, half = d.halfedges;
    const len = (p: number, q: number) => {
      const dx = centroids[3 * p] - centroids[3 * q];
      const dy = centroids[3 * p + 1] - centroids[3 * q + 1];
      const dz = centroids[3 * p + 2] - centroids[3 * q + 2];
      return Math.sqrt(dx * dx + dy * dy + dz * dz);
    };
    const skip = new Set<number>();
    for (const e of this.ambiguous) {
      const p = tri[e], q = tri[next(e)];
      skip.add(p < q ? p * m + q : q * m + p);
    }
    const nn = new Float64Array(m).fill(Infinity);
    for (let t = 0; t < this.keys.length; t++) {
      const key = this.keys[t];
      if (skip.has(key)) continue;
      const p = Math.floor(key / m), q = key - p * m;
      const L = len(p, q);
      if (L < nn[p]) nn[p] = L;
      if (L < nn[q]) nn[q] = L;
    }
    const harmless = (p: number, q: number) => {
      const L = len(p, q);
      return L > nn[p] && L > nn[q] && L > this.shellFactor * Math.min(nn[p], nn[q]) * (1 + 1e-12);
    };
    for (const e of this.ambiguous) {
      if (!harmless(tri[e], tri[next(e)]) || !harmless(tri[prev(e)], tri[prev(half[e])])) return false;
    }
    return true;
  }
}
