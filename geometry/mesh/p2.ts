/**
 * P2 (10-node quadratic tetrahedron) node numbering: the degree-of-freedom map of the P2 solver
 * and the point numbering of quadratic exports.
 *
 *   nodes 0 .. nVertices-1                 the mesh vertices, same index
 *   node  nVertices + e                    the midpoint of edge e of buildEdges()
 *
 * Per tet, 10 nodes in VTK quadratic-tetra order (VTK file-format documentation, cell type 24):
 *
 *                 v3
 *                 /|\            local node 4 = mid(v0,v1)   7 = mid(v0,v3)
 *                7 | 9                      5 = mid(v1,v2)   8 = mid(v1,v3)
 *               /  8  \                     6 = mid(v0,v2)   9 = mid(v2,v3)
 *             v0---|-6-v2
 *               \  |  /      (the same order as TET_EDGES in geometry/fem/reference.ts,
 *                4 | 5        so local node 4 + e sits on reference edge e)
 *                 \|/
 *                 v1
 *
 * A midpoint node is shared by every tet around its edge, so the P2 space is conforming.
 */
import type { TetMesh } from './types';
import { buildEdges, type EdgeTable } from './edges';

export interface P2Layout {
  /** the edge table the numbering comes from */
  edgeTable: EdgeTable;
  /** number of P2 nodes = vertices + edges */
  nNodes: number;
  /** 10 node indices per tet, VTK quadratic-tetra order */
  connectivity: Uint32Array;
}

/** Number of P2 nodes of a mesh with the given vertex and edge counts. */
export function p2NodeCount(nVertices: number, nEdges: number): number {
  return nVertices + nEdges;
}

/**
 * 10 node indices per tet: the 4 vertices, then nVertices + (index of edge e) for e = 0..5 in
 * TET_EDGES (VTK) order. Pass an edge table already built for this mesh to skip rebuilding it.
 */
export function p2Connectivity(mesh: Pick<TetMesh, 'coords' | 'tets'>, edgeTable?: EdgeTable): Uint32Array {
  const nV = mesh.coords.length / 3;
  const et = edgeTable ?? buildEdges(mesh.tets, nV);
  const m = mesh.tets.length >> 2;
  if (et.tetEdges.length !== 6 * m) throw new Error('edge table does not belong to this mesh');
  const nNodes = nV + et.edges.length / 2;
  if (nNodes > 0xffffffff) throw new Error(`too many P2 nodes for 32-bit indices (${nNodes})`);
  const tets = mesh.tets;
  const tetEdges = et.tetEdges;
  const conn = new Uint32Array(10 * m);
  for (let t = 0; t < m; t++) {
    const o = 10 * t;
    const i = 4 * t;
    const j = 6 * t;
    conn[o] = tets[i];
    conn[o + 1] = tets[i + 1];
    conn[o + 2] = tets[i + 2];
    conn[o + 3] = tets[i + 3];
    conn[o + 4] = nV + tetEdges[j];
    conn[o + 5] = nV + tetEdges[j + 1];
    conn[o + 6] = nV + tetEdges[j + 2];
    conn[o + 7] = nV + tetEdges[j + 3];
    conn[o + 8] = nV + tetEdges[j + 4];
    conn[o + 9] = nV + tetEdges[j + 5];
  }
  return conn;
}

/**
 * Coordinates of all P2 nodes, 3 per node: the vertex coordinates followed by the edge midpoints
 * 0.5·(a + b) (one rounding per component, symmetric in a and b).
 */
export function p2Coords(mesh: Pick<TetMesh, 'coords' | 'tets'>, edgeTable?: EdgeTable): Float64Array {
  const nV = mesh.coords.length / 3;
  const et = edgeTable ?? buildEdges(mesh.tets, nV);
  const edges = et.edges;
  const nE = edges.length / 2;
  const x = mesh.coords;
  const out = new Float64Array(3 * (nV + nE));
  out.set(x);
  for (let e = 0, o = 3 * nV; e < nE; e++, o += 3) {
    const a = 3 * edges[2 * e];
    const b = 3 * edges[2 * e + 1];
    out[o] = 0.5 * (x[a] + x[b]);
    out[o + 1] = 0.5 * (x[a + 1] + x[b + 1]);
    out[o + 2] = 0.5 * (x[a + 2] + x[b + 2]);
  }
  return out;
}

/**
 * Extend a per-vertex field (`components` values per vertex) to all P2 nodes by averaging over
 * each edge: the P1 interpolant read on the P2 nodes (exact for fields linear on each tet).
 */
export function p2ExtendVertexField(values: ArrayLike<number>, edgeTable: EdgeTable, nVertices: number, components = 1): Float64Array {
  const c = components;
  if (values.length !== c * nVertices) throw new Error(`vertex field has ${values.length} values, expected ${c} × ${nVertices}`);
  const edges = edgeTable.edges;
  const nE = edges.length / 2;
  const out = new Float64Array(c * (nVertices + nE));
  for (let i = 0; i < c * nVertices; i++) out[i] = values[i];
  for (let e = 0; e < nE; e++) {
    const a = c * edges[2 * e];
    const b = c * edges[2 * e + 1];
    const o = c * (nVertices + e);
    for (let k = 0; k < c; k++) out[o + k] = 0.5 * (values[a + k] + values[b + k]);
  }
  return out;
}

/** Everything a P2 consumer needs in one call: edge table, node count and connectivity. */
export function p2Layout(mesh: Pick<TetMesh, 'coords' | 'tets'>, edgeTable?: EdgeTable): P2Layout {
  const nV = mesh.coords.length / 3;
  const et = edgeTable ?? buildEdges(mesh.tets, nV);
  return { edgeTable: et, nNodes: p2NodeCount(nV, et.edges.length / 2), connectivity: p2Connectivity(mesh, et) };
}
