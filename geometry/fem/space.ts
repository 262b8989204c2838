/**
 * Finite-element spaces on a TetMesh: degree-of-freedom numbering for P1 and P2 Lagrange elements.
 *
 * Numbering (shared with the P2 exporters): dof v < nVertices is vertex v; dof nVertices + e is the
 * midpoint of edge e, with edges sorted by (min vertex, max vertex). Per tetrahedron the local
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
import type { TetMesh } from '../mesh/types';
import { TET_EDGES, TET_FACES } from './reference';

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
  /** 1 where the dof's node lies on the enclosure boundary */
  boundaryDof: Uint8Array;
  /** edge endpoints (min, max), 2 per edge, sorted; empty for P1 */
  edges: Uint32Array;
  /** edge index of each of the 6 local edges per tet; empty for P1 */
  tetEdges: Uint32Array;
}

/**
 * Unique edges of a tet list, sorted by (min, max), and the 6 edge indices per tet.
 * CSR by minimum vertex: count per vertex, fill, sort each bucket, drop duplicates. O(m + E log d).
 */
export function enumerateEdges(tets: Uint32Array, nVertices: number): { edges: Uint32Array; tetEdges: Uint32Array } {
  const m = tets.length / 4;
  const start = new Uint32Array(nVertices + 1);
  for (let t = 0; t < m; t++) {
    for (let e = 0; e < 6; e++) {
      const a = tets[4 * t + TET_EDGES[e][0]], b = tets[4 * t + TET_EDGES[e][1]];
      start[(a < b ? a : b) + 1]++;
    }
  }
  for (let v = 0; v < nVertices; v++) start[v + 1] += start[v];
  const fill = start.slice(0, nVertices);
  const other = new Uint32Array(6 * m); // bound: 6 edge slots per tet
  for (let t = 0; t < m; t++) {
    for (let e = 0; e < 6; e++) {
      const a = tets[4 * t + TET_EDGES[e][0]], b = tets[4 * t + TET_EDGES[e][1]];
      if (a < b) other[fill[a]++] = b;
      else other[fill[b]++] = a;
    }
  }
  // sort and dedupe each bucket in place; edgeStart[v] = first edge index with min vertex v
  const edgeStart = new Uint32Array(nVertices + 1);
  let nE = 0;
  for (let v = 0; v < nVertices; v++) {
    const seg = other.subarray(start[v], start[v + 1]);
    seg.sort();
    edgeStart[v] = nE;
    let last = -1;
    for (let k = 0; k < seg.length; k++) {
      if (seg[k] !== last) {
        last = seg[k];
        other[nE++] = last; // nE ≤ start[v] + k, so this never overwrites unread entries
      }
    }
  }
  edgeStart[nVertices] = nE;
  const edges = new Uint32Array(2 * nE);
  for (let v = 0; v < nVertices; v++) {
    for (let k = edgeStart[v]; k < edgeStart[v + 1]; k++) {
      edges[2 * k] = v;
      edges[2 * k + 1] = other[k];
    }
  }
  const tetEdges = new Uint32Array(6 * m);
  for (let t = 0; t < m; t++) {
    for (let e = 0; e < 6; e++) {
      let a = tets[4 * t + TET_EDGES[e][0]], b = tets[4 * t + TET_EDGES[e][1]];
      if (a > b) { const s = a; a = b; b = s; }
      // binary search b among the sorted partners of a
      let lo = edgeStart[a], hi = edgeStart[a + 1] - 1;
      while (lo < hi) {
        const mid = (lo + hi) >>> 1;
        if (other[mid] < b) lo = mid + 1;
        else hi = mid;
      }
      tetEdges[6 * t + e] = lo;
    }
  }
  return { edges, tetEdges };
}

/**
 * Faces that belong to exactly one tetrahedron (the enclosure boundary), as a flag per
 * (tet, local face). Faces are keyed by their sorted vertex triple, bucketed by the smallest.
 */
export function boundaryFaceFlags(tets: Uint32Array, nVertices: number): Uint8Array {
  const m = tets.length / 4;
  const start = new Uint32Array(nVertices + 1);
  const sorted = new Uint32Array(3 * 4 * m);
  for (let t = 0; t < m; t++) {
    for (let f = 0; f < 4; f++) {
      let a = tets[4 * t + TET_FACES[f][0]], b = tets[4 * t + TET_FACES[f][1]], c = tets[4 * t + TET_FACES[f][2]];
      let s: number;
      if (a > b) { s = a; a = b; b = s; }
      if (b > c) { s = b; b = c; c = s; }
      if (a > b) { s = a; a = b; b = s; }
      const k = 3 * (4 * t + f);
      sorted[k] = a; sorted[k + 1] = b; sorted[k + 2] = c;
      start[a + 1]++;
    }
  }
  for (let v = 0; v < nVertices; v++) start[v + 1] += start[v];
  const fill = start.slice(0, nVertices);
  const ids = new Uint32Array(4 * m);
  for (let i = 0; i < 4 * m; i++) ids[fill[sorted[3 * i]]++] = i;
  const flags = new Uint8Array(4 * m);
  for (let v = 0; v < nVertices; v++) {
    const seg = ids.subarray(start[v], start[v + 1]);
    // sort by (b, c), ties by face id: deterministic
    const arr = Array.from(seg);
    arr.sort((x, y) => sorted[3 * x + 1] - sorted[3 * y + 1] || sorted[3 * x + 2] - sorted[3 * y + 2] || x - y);
    for (let k = 0; k < arr.length; ) {
      let j = k + 1;
      while (j < arr.length && sorted[3 * arr[j] + 1] === sorted[3 * arr[k] + 1] && sorted[3 * arr[j] + 2] === sorted[3 * arr[k] + 2]) j++;
      if (j - k === 1) flags[arr[k]] = 1;
      k = j;
    }
  }
  return flags;
}

/** Build the P1 or P2 space of a mesh. Deterministic: depends only on the mesh arrays. */
export function buildSpace(mesh: TetMesh, order: 1 | 2): FeSpace {
  const nVertices = mesh.coords.length / 3;
  const nTets = mesh.tets.length / 4;
  if (order === 1) {
    const boundaryDof = new Uint8Array(nVertices);
    const bf = boundaryFaceFlags(mesh.tets, nVertices);
    for (let t = 0; t < nTets; t++) {
      for (let f = 0; f < 4; f++) {
        if (!bf[4 * t + f]) continue;
        for (const lv of TET_FACES[f]) boundaryDof[mesh.tets[4 * t + lv]] = 1;
      }
    }
    for (let v = 0; v < nVertices; v++) if (mesh.boundaryVertex[v]) boundaryDof[v] = 1;
    return {
      mesh, order, nVertices, nTets, nDofs: nVertices, dofsPerTet: 4,
      dofCoords: mesh.coords, tetDofs: mesh.tets, boundaryDof,
      edges: new Uint32Array(0), tetEdges: new Uint32Array(0),
    };
  }
  const { edges, tetEdges } = enumerateEdges(mesh.tets, nVertices);
  const nEdges = edges.length / 2;
  const nDofs = nVertices + nEdges;
  const dofCoords = new Float64Array(3 * nDofs);
  dofCoords.set(mesh.coords);
  for (let e = 0; e < nEdges; e++) {
    const a = edges[2 * e], b = edges[2 * e + 1];
    for (let k = 0; k < 3; k++) dofCoords[3 * (nVertices + e) + k] = 0.5 * (mesh.coords[3 * a + k] + mesh.coords[3 * b + k]);
  }
  const tetDofs = new Uint32Array(10 * nTets);
  for (let t = 0; t < nTets; t++) {
    for (let i = 0; i < 4; i++) tetDofs[10 * t + i] = mesh.tets[4 * t + i];
    for (let e = 0; e < 6; e++) tetDofs[10 * t + 4 + e] = nVertices + tetEdges[6 * t + e];
  }
  // a dof is on the boundary when its node lies on a boundary face (an edge between two
  // boundary vertices may still cut through the interior, so vertex flags are not enough)
  const boundaryDof = new Uint8Array(nDofs);
  const bf = boundaryFaceFlags(mesh.tets, nVertices);
  // local edges of each face: the edges whose both endpoints are in the face
  for (let t = 0; t < nTets; t++) {
    for (let f = 0; f < 4; f++) {
      if (!bf[4 * t + f]) continue;
      for (const lv of TET_FACES[f]) boundaryDof[mesh.tets[4 * t + lv]] = 1;
      for (let e = 0; e < 6; e++) {
        const [a, b] = TET_EDGES[e];
        if (a !== f && b !== f) boundaryDof[nVertices + tetEdges[6 * t + e]] = 1; // face f is opposite vertex f
      }
    }
  }
  for (let v = 0; v < nVertices; v++) if (mesh.boundaryVertex[v]) boundaryDof[v] = 1;
  return { mesh, order, nVertices, nTets, nDofs, dofsPerTet: 10, dofCoords, tetDofs, boundaryDof, edges, tetEdges };
}
