/**
 * The tetrahedral mesh as flat typed arrays: the one data structure the mesher
 * produces and the finite-element solver, the exporters and the browser consume.
 *
 * Orientation: every tetrahedron (v0, v1, v2, v3) is stored positively oriented,
 * det[v1 - v0, v2 - v0, v3 - v0] > 0.
 */
export interface TetMesh {
  /** vertex coordinates in nm, 3 per vertex */
  coords: Float64Array;
  /** vertex indices, 4 per tetrahedron, positively oriented */
  tets: Uint32Array;
  /** bisection generation of each tetrahedron (0 for the initial Kuhn cells) */
  tetLevel: Uint8Array;
  /** region id of each tetrahedron (0 = host) */
  tetRegion: Uint8Array;
  /**
   * Vertex hierarchy from bisection: vertex i was created as the midpoint of
   * parents[2i] and parents[2i+1]; both are 0xffffffff for initial vertices.
   */
  parents: Uint32Array;
  /** generation in which each vertex was created (0 for initial vertices) */
  vertexLevel: Uint8Array;
  /** 1 for vertices on the domain boundary */
  boundaryVertex: Uint8Array;
}

export const NO_PARENT = 0xffffffff;
