/**
 * Finite-element spaces on a TetMesh: degree-of-freedom numbering for P1 and P2 Lagrange elements.
 *
 * Numbering (that of the P2 exporters, geometry/mesh/p2.ts): dof v < nVertices is vertex v; dof
 * nVertices + e is the midpoint of edge e of buildEdges (edges sorted by (min vertex, max vertex)). Per tetrahedron the local
 * order is the VTK order of reference.ts (4 vertices, then edges TET_EDGES[0..5]).
 *
 *        v3                       P2 dofs of one tet (VTK order):
 *        /|\                        0..3  vertices v0..v3
 *       7 | 9                       4 = (v0,v1)  5 = (v1,v2)  6 = (v0,v2)
 *      /  8  \                      7 = (v0,v3)  8 = (v1,v3)  9 = (v2,v3)
 *    v0-6-|---v2
 *      \  |  /
 *       4 | 5
 *        \|/
 *        v1
 */
import { cooperate, COOPERATE_MASK } from '../cooperate';
import type { TetMesh } from '../mesh/types';
import { TET_EDGES, TET_FACES } from './reference';
import { buildEdges, buildFaces, NO_TET } from '../mesh/edges';
import { p2Connectivity, p2Coords } from '../mesh/p2';

/**
 * Boundary dofs: nodes on a face that has a tetrahedron on one side only. An edge between two
 * boundary vertices may cut through the interior, so vertex flags alone are not enough for the
 * edge nodes of P2; the mesh's boundaryVertex flags are merged in for the vertices.
 */
function boundaryFlags(mesh: TetMesh, nVertices: number, tetEdges: Uint32Array | null, nDofs: number): Uint8Array {
  const { tetFaces, faceTets } = buildFaces(mesh.tets, nVertices);
  const nTets = mesh.tets.length / 4;
  const flags = new Uint8Array(nDofs);
  for (let t = 0; t < nTets; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    for (let f = 0; f < 4; f++) {
      if (faceTets[2 * tetFaces[4 * t + f] + 1] !== NO_TET) continue;
      for (const lv of TET_FACES[f]) flags[mesh.tets[4 * t + lv]] = 1;
      if (!tetEdges) continue;
      // local face f is opposite local vertex f: its edges are those not touching f
      for (let e = 0; e < 6; e++) {
        const [a, b] = TET_EDGES[e];
        if (a !== f && b !== f) flags[nVertices + tetEdges[6 * t + e]] = 1;
      }
    }
  }
  for (let v = 0; v < nVertices; v++) if (mesh.boundaryVertex[v]) flags[v] = 1;
  return flags;
}


export interface FeSpace {
  mesh: TetMesh;
  order: 1 | 2;
  nVertices: number;
  nTets: number;
  nDofs: number;
  /** local dofs per tetrahedron: 4 (P1) or 10 (P2) */
  dofsPerTet: 4 | 10;
  /** coordinates of each dof's node in nm, 3 per dof */
  dofCoords: Float64Array;
  /** global dofs of each tetrahedron, dofsPerTet per tet, local order of reference.ts */
  tetDofs: Uint32Array;
  /** 1 where the dof's node lies on the domain boundary */
  boundaryDof: Uint8Array;
  /** edge endpoints (min, max), 2 per edge, sorted; empty for P1 */
  edges: Uint32Array;
  /** edge index of each of the 6 local edges per tet; empty for P1 */
  tetEdges: Uint32Array;
}

/** Build the P1 or P2 space of a mesh. Deterministic: depends only on the mesh arrays. */
export function buildSpace(mesh: TetMesh, order: 1 | 2): FeSpace {
  const nVertices = mesh.coords.length / 3;
  const nTets = mesh.tets.length / 4;
  if (order === 1) {
    return {
      mesh, order, nVertices, nTets, nDofs: nVertices, dofsPerTet: 4,
      dofCoords: mesh.coords, tetDofs: mesh.tets, boundaryDof: boundaryFlags(mesh, nVertices, null, nVertices),
      edges: new Uint32Array(0), tetEdges: new Uint32Array(0),
    };
  }
  // P2 numbering is the exporters' (geometry/mesh/p2.ts): node nVertices + e sits on edge e
  const edgeTable = buildEdges(mesh.tets, nVertices);
  const nDofs = nVertices + edgeTable.edges.length / 2;
  return {
    mesh, order, nVertices, nTets, nDofs, dofsPerTet: 10,
    dofCoords: p2Coords(mesh, edgeTable),
    tetDofs: p2Connectivity(mesh, edgeTable),
    boundaryDof: boundaryFlags(mesh, nVertices, edgeTable.tetEdges, nDofs),
    edges: edgeTable.edges,
    tetEdges: edgeTable.tetEdges,
  };
}
