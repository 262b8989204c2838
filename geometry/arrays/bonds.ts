/**
 * The bond graph of an array in the (001) plane.
 *
 * 1. Nodes: sites sharing a `group` label (a donor cluster) form one node at their centroid;
 *    every other site is its own node.
 * 2. Candidate edges: the Delaunay triangulation (delaunator) of the node projections onto the
 *    (001) plane. Nodes whose projections coincide exactly (stacked along z) are skipped by
 *    delaunator; each is joined to the first node (by index) with the same projection.
 *    Collinear nodes (a chain) give delaunator no triangles; it then returns the points sorted
 *    along the line as its hull, and consecutive hull points are the edges.
 * 3. Lengths: 3D distances between node centroids (projections fix the topology only).
 * 4. Pruning, the distance rule: with nn(p) the shortest candidate edge at node p, keep edge
 *    (p, q) when  length ≤ shellFactor · min(nn(p), nn(q)).  shellFactor = 1.2 (default) keeps
 *    the nearest-neighbour shell of square, triangular and honeycomb arrays and drops square
 *    diagonals (√2) and honeycomb cross-hexagon edges (√3); raise it above sy/sx to keep the
 *    long bonds of a rectangular array, or above √2 to add square diagonals. The rule is
 *    local, so mild placement disorder does not break it.
 *
 *     o---o---o        Delaunay adds one diagonal per square (|, — kept; / dropped at 1.2)
 *     | / | / |
 *     o---o---o
 *
 * Output is deterministic: edges (p < q) sorted by p then q.
 */
import Delaunator from 'delaunator';

export interface BondGraph {
  /** site indices of each node */
  members: number[][];
  /** node centroids, 3 per node (nm) */
  centroids: Float64Array;
  /** node index pairs, 2 per edge, p < q, sorted */
  edges: Uint32Array;
  /** 3D length of each edge (nm) */
  lengths: Float64Array;
}

export interface BondGraphOptions {
  /** cluster label per site; sites with the same label form one node */
  groups?: readonly (string | undefined)[];
  /** pruning factor of the distance rule (see above); default 1.2 */
  shellFactor?: number;
}

export const DEFAULT_SHELL_FACTOR = 1.2;

export function bondGraph(positions: Float64Array, options: BondGraphOptions = {}): BondGraph {
  const nodes = graphNodes(positions, options.groups);
  const { m, start, list, centroids } = nodes;
  const members: number[][] = new Array(m);
  for (let p = 0; p < m; p++) members[p] = Array.from(list.subarray(start[p], start[p + 1]));
  const { edges, lengths } = prunedEdges(centroids, m, options.shellFactor ?? DEFAULT_SHELL_FACTOR);
  return { members, centroids, edges, lengths };
}

/**
 * Buffers kept between builds of the bond graph of the same number of nodes: the live far-field
 * session rebuilds it after every moved site, where allocating the triangulation again cost
 * more than triangulating (delaunator's `update()` reruns it in place, same result).
 */
export interface BondScratch {
  delaunay: Delaunator<Float64Array> | null;
}

export const bondScratch = (): BondScratch => ({ delaunay: null });

/**
 * The site pairs the far-field check takes from the bond graph, as site-index pairs (i < j) in the
 * check's order: first the pairs inside each node (cluster), node by node, members in site order;
 * then, edge by edge in the graph's order, every member of the first node with every member of
 * the second. Same graph as bondGraph(), without building its per-node arrays.
 */
export function bondPairs(positions: Float64Array, options: BondGraphOptions = {}, scratch?: BondScratch): { I: Int32Array; J: Int32Array } {
  const nodes = graphNodes(positions, options.groups);
  const { edges } = prunedEdges(nodes.centroids, nodes.m, options.shellFactor ?? DEFAULT_SHELL_FACTOR, scratch);
  return pairsFromEdges(nodes, edges);
}

/** The site pairs of bondPairs() from the nodes and the kept edges (shared with live-bonds.ts). */
export function pairsFromEdges(nodes: GraphNodes, edges: Uint32Array): { I: Int32Array; J: Int32Array } {
  const { m, start, list } = nodes;
  const ne = edges.length / 2;
  let count = 0;
  for (let p = 0; p < m; p++) {
    const k = start[p + 1] - start[p];
    count += (k * (k - 1)) / 2;
  }
  for (let e = 0; e < ne; e++) count += (start[edges[2 * e] + 1] - start[edges[2 * e]]) * (start[edges[2 * e + 1] + 1] - start[edges[2 * e + 1]]);
  const I = new Int32Array(count);
  const J = new Int32Array(count);
  let t = 0;
  for (let p = 0; p < m; p++) {
    for (let u = start[p]; u < start[p + 1]; u++) for (let v = u + 1; v < start[p + 1]; v++) {
      I[t] = Math.min(list[u], list[v]);
      J[t++] = Math.max(list[u], list[v]);
    }
  }
  for (let e = 0; e < ne; e++) {
    const p = edges[2 * e], q = edges[2 * e + 1];
    for (let u = start[p]; u < start[p + 1]; u++) for (let v = start[q]; v < start[q + 1]; v++) {
      I[t] = Math.min(list[u], list[v]);
      J[t++] = Math.max(list[u], list[v]);
    }
  }
  return { I, J };
}

export interface GraphNodes {
  m: number;
  start: Uint32Array;
  list: Uint32Array;
  /** node of each site */
  nodeOf: Uint32Array;
  centroids: Float64Array;
}

/** Centroid of node p into centroids (members summed in site order, then divided: the one formula). */
export function nodeCentroid(positions: Float64Array, nodes: GraphNodes, p: number): void {
  const { start, list, centroids } = nodes;
  for (let k = 0; k < 3; k++) centroids[3 * p + k] = 0;
  for (let u = start[p]; u < start[p + 1]; u++) for (let k = 0; k < 3; k++) centroids[3 * p + k] += positions[3 * list[u] + k];
  for (let k = 0; k < 3; k++) centroids[3 * p + k] /= start[p + 1] - start[p];
}

/**
 * Nodes of the graph (rule 1): node p holds the sites list[start[p] .. start[p+1]) in site order;
 * nodes are numbered by their first site.
 */
export function graphNodes(positions: Float64Array, groups: readonly (string | undefined)[] | undefined): GraphNodes {
  const n = positions.length / 3;
  const nodeOf = new Uint32Array(n);
  let m = 0;
  if (groups) {
    const byLabel = new Map<string, number>();
    for (let i = 0; i < n; i++) {
      const label = groups[i];
      if (label !== undefined) {
        const at = byLabel.get(label);
        if (at !== undefined) {
          nodeOf[i] = at;
          continue;
        }
        byLabel.set(label, m);
      }
      nodeOf[i] = m++;
    }
  } else {
    for (let i = 0; i < n; i++) nodeOf[i] = i;
    m = n;
  }
  const start = new Uint32Array(m + 1);
  for (let i = 0; i < n; i++) start[nodeOf[i] + 1]++;
  for (let p = 0; p < m; p++) start[p + 1] += start[p];
  const fill = start.slice(0, m);
  const list = new Uint32Array(n);
  for (let i = 0; i < n; i++) list[fill[nodeOf[i]]++] = i;
  const nodes: GraphNodes = { m, start, list, nodeOf, centroids: new Float64Array(3 * m) };
  for (let p = 0; p < m; p++) nodeCentroid(positions, nodes, p);
  return nodes;
}

/** Candidate edges (rule 2) of the m node centroids, pruned by the distance rule (rules 3, 4). */
function prunedEdges(centroids: Float64Array, m: number, factor: number, scratch?: BondScratch): { edges: Uint32Array; lengths: Float64Array } {
  return pruneKeys(candidateKeys(centroids, m, scratch).keys, centroids, m, factor);
}

/**
 * Candidate edges (rule 2) as sorted keys p·m + q (p < q), with the triangulation they came
 * from (null for fewer than three nodes or a line) and whether stacked duplicates were joined.
 */
export function candidateKeys(centroids: Float64Array, m: number, scratch?: BondScratch): { keys: Float64Array; delaunay: Delaunator<Float64Array> | null; stacked: boolean } {
  let delaunay: Delaunator<Float64Array> | null = null;
  let stacked = false;
  // --- candidate edges as keys p*m + q (p < q), collected into a typed array sized by the
  // proven bound: a planar triangulation of m points has at most 3m − 6 edges, plus at most
  // m − 1 edges joining stacked duplicates
  const keysBuf = new Float64Array(Math.max(4 * m, 4));
  // the lower node of each key, kept so that sorting needs no division
  const lowBuf = new Uint32Array(keysBuf.length);
  let nk = 0;
  const add = (p: number, q: number) => {
    if (p === q) return;
    const lo = p < q ? p : q;
    lowBuf[nk] = lo;
    keysBuf[nk++] = lo * m + (p < q ? q : p);
  };
  const xy = new Float64Array(2 * m);
  for (let p = 0; p < m; p++) {
    xy[2 * p] = centroids[3 * p];
    xy[2 * p + 1] = centroids[3 * p + 1];
  }
  if (m === 2) add(0, 1);
  if (m >= 3) {
    const line = collinearOrder(xy);
    if (line) {
      for (let t = 0; t + 1 < line.length; t++) add(line[t], line[t + 1]);
    } else {
      let d: Delaunator<Float64Array>;
      if (scratch?.delaunay && scratch.delaunay.coords.length === xy.length) {
        d = scratch.delaunay;
        (d.coords as Float64Array).set(xy);
        d.update();
      } else {
        d = new Delaunator(xy);
        if (scratch) scratch.delaunay = d;
      }
      delaunay = d;
      const tri = d.triangles;
      const half = d.halfedges;
      const seen = new Uint8Array(m);
      for (let e = 0; e < tri.length; e++) {
        seen[tri[e]] = 1;
        // each interior edge appears twice (e and its twin); take it once
        if (half[e] === -1 || e < half[e]) add(tri[e], tri[e % 3 === 2 ? e - 2 : e + 1]);
      }
      // exact duplicates in the plane (stacked along z) are left out by delaunator: join each to
      // the first node with the same projection
      let missing = false;
      for (let p = 0; p < m && !missing; p++) if (!seen[p]) missing = true;
      if (missing) {
        stacked = true;
        const first = new Map<string, number>();
        for (let p = 0; p < m; p++) {
          const key = `${xy[2 * p]},${xy[2 * p + 1]}`;
          const r = first.get(key);
          if (r === undefined) first.set(key, p);
          else if (!seen[p] || !seen[r]) add(r, p);
        }
      }
    }
  }
  return { keys: sortKeys(keysBuf, lowBuf, nk, m), delaunay, stacked };
}

/** The distance rule (rules 3, 4) over sorted candidate keys: the kept edges and their lengths. */
export function pruneKeys(keys: Float64Array, centroids: Float64Array, m: number, factor: number): { edges: Uint32Array; lengths: Float64Array } {
  const nk = keys.length;
  // --- lengths and the distance rule
  const len = (p: number, q: number) => {
    const dx = centroids[3 * p] - centroids[3 * q];
    const dy = centroids[3 * p + 1] - centroids[3 * q + 1];
    const dz = centroids[3 * p + 2] - centroids[3 * q + 2];
    return Math.sqrt(dx * dx + dy * dy + dz * dz);
  };
  const nn = new Float64Array(m).fill(Infinity);
  const L = new Float64Array(nk);
  // keys ascend, so their lower node p never decreases: found by stepping, not by dividing
  // (p·m + q with q < m, all integers below 2⁵³: the same p as ⌊key / m⌋)
  const P = new Uint32Array(nk);
  const Q = new Uint32Array(nk);
  let p = 0;
  for (let t = 0; t < nk; t++) {
    const key = keys[t];
    if (key < p * m) p = Math.floor(key / m); // not ascending after all: divide
    while (key >= (p + 1) * m) p++;
    const q = key - p * m;
    P[t] = p;
    Q[t] = q;
    L[t] = len(p, q);
    if (L[t] < nn[p]) nn[p] = L[t];
    if (L[t] < nn[q]) nn[q] = L[t];
  }
  let kept = 0;
  const keep = new Uint8Array(nk);
  for (let t = 0; t < nk; t++) {
    if (L[t] <= factor * Math.min(nn[P[t]], nn[Q[t]]) * (1 + 1e-12)) {
      keep[t] = 1;
      kept++;
    }
  }
  const edges = new Uint32Array(2 * kept);
  const lengths = new Float64Array(kept);
  let e = 0;
  for (let t = 0; t < nk; t++) {
    if (!keep[t]) continue;
    edges[2 * e] = P[t];
    edges[2 * e + 1] = Q[t];
    lengths[e] = L[t];
    e++;
  }
  return { edges, lengths };
}

/**
 * When the points lie on one line to within 1e-9 of their extent, their order along it
 * (ties by index); otherwise null. Delaunator's own collinear test is exact, so a chain
 * rotated by an angle whose coordinates are rounded gives it sliver triangles that can miss
 * a consecutive pair; we catch that case first.
 */
function collinearOrder(xy: Float64Array): number[] | null {
  const n = xy.length / 2;
  let far = 0;
  let farD = -1;
  for (let i = 1; i < n; i++) {
    const d = (xy[2 * i] - xy[0]) ** 2 + (xy[2 * i + 1] - xy[1]) ** 2;
    if (d > farD) {
      farD = d;
      far = i;
    }
  }
  const len = Math.sqrt(farD);
  if (!(len > 0)) return null;
  const ux = (xy[2 * far] - xy[0]) / len;
  const uy = (xy[2 * far + 1] - xy[1]) / len;
  const along = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const dx = xy[2 * i] - xy[0];
    const dy = xy[2 * i + 1] - xy[1];
    if (Math.abs(dx * uy - dy * ux) > 1e-9 * len) return null;
    along[i] = dx * ux + dy * uy;
  }
  return Array.from({ length: n }, (_, i) => i).sort((p, q) => along[p] - along[q] || p - q);
}

/**
 * The first nk keys p·m + q in ascending order — the order of a numeric sort — in O(nk + m):
 * a counting sort on p, then insertion sort of each node's few keys (a planar triangulation
 * gives a node 6 on average). The live far-field check rebuilds the bond graph on every moved
 * site, where a comparison sort of the keys cost more than the triangulation.
 */
function sortKeys(buf: Float64Array, low: Uint32Array, nk: number, m: number): Float64Array {
  // low[t] = ⌊buf[t] / m⌋, recorded when the key was made
  const start = new Uint32Array(m + 1);
  for (let t = 0; t < nk; t++) start[low[t] + 1]++;
  for (let p = 0; p < m; p++) start[p + 1] += start[p];
  const fill = start.slice(0, m);
  const out = new Float64Array(nk);
  for (let t = 0; t < nk; t++) out[fill[low[t]]++] = buf[t];
  for (let p = 0; p < m; p++) {
    for (let u = start[p] + 1; u < start[p + 1]; u++) {
      const k = out[u];
      let v = u - 1;
      while (v >= start[p] && out[v] > k) {
        out[v + 1] = out[v];
        v--;
      }
      out[v + 1] = k;
    }
  }
  return out;
}
