import { describe, expect, it } from 'vitest';
import { p2Connectivity, p2Coords, p2ExtendVertexField, p2Layout } from '../../../geometry/mesh/p2';
import { buildEdges } from '../../../geometry/mesh/edges';
import { kuhnGrid, regularTet, shuffleTets } from './check.fixtures';
import { kuhnBox, refineUniform, toTetMesh } from '../../../geometry/mesh/index';

// VTK quadratic tetra (cell type 24) node order, VTK file-format documentation / vtkQuadraticTetra:
// nodes 4..9 are the midpoints of edges (0,1), (1,2), (0,2), (0,3), (1,3), (2,3).
const VTK_QUADRATIC_TETRA_EDGES = [
  [0, 1],
  [1, 2],
  [0, 2],
  [0, 3],
  [1, 3],
  [2, 3],
];

describe('P2 node numbering', () => {
  it('a single tetrahedron has 10 nodes: its vertices then its 6 edge midpoints in VTK order', () => {
    const mesh = regularTet();
    const conn = p2Connectivity(mesh);
    const x = p2Coords(mesh);
    expect(x.length / 3).toBe(10);
    expect(Array.from(conn.subarray(0, 4))).toEqual(Array.from(mesh.tets));
    VTK_QUADRATIC_TETRA_EDGES.forEach(([a, b], e) => {
      const node = conn[4 + e];
      for (let k = 0; k < 3; k++) {
        const mid = (mesh.coords[3 * mesh.tets[a] + k] + mesh.coords[3 * mesh.tets[b] + k]) / 2;
        expect(x[3 * node + k]).toBe(mid);
      }
    });
  });

  it('the P2 nodes of a Kuhn grid of n³ cubes of side h are the (2n+1)³ lattice of spacing h/2', () => {
    // Every edge of the Kuhn split is a cube edge, a face diagonal or the main diagonal, whose
    // midpoints are exactly the half-spacing lattice points: a geometric count, not our code.
    const n = 3;
    const h = 0.75;
    const mesh = kuhnGrid(n, n, n, h);
    const x = p2Coords(mesh);
    const N = 2 * n + 1;
    expect(x.length / 3).toBe(N ** 3);
    const seen = new Set<number>();
    for (let i = 0; i < x.length; i += 3) {
      const ijk = [0, 1, 2].map((k) => x[i + k] / (h / 2));
      for (const v of ijk) expect(Number.isInteger(v)).toBe(true);
      seen.add(ijk[0] + N * (ijk[1] + N * ijk[2]));
    }
    expect(seen.size).toBe(N ** 3); // no duplicates, all lattice points present
  });

  it('mid-edge nodes are shared by all tets around an edge (conforming P2 space)', () => {
    const mesh = toTetMesh(refineUniform(kuhnBox({ center: [1, 2, 3], halfExtents: [1, 1, 1.5], cells: [2, 2, 3] }), 2));
    const { connectivity, nNodes, edgeTable } = p2Layout(mesh);
    const nV = mesh.coords.length / 3;
    expect(nNodes).toBe(nV + edgeTable.edges.length / 2);
    const x = p2Coords(mesh, edgeTable);
    // one node per distinct midpoint position
    const byPos = new Map<string, number>();
    const m = mesh.tets.length / 4;
    for (let t = 0; t < m; t++) {
      VTK_QUADRATIC_TETRA_EDGES.forEach(([a, b], e) => {
        const node = connectivity[10 * t + 4 + e];
        expect(node).toBeGreaterThanOrEqual(nV);
        const u = connectivity[10 * t + a];
        const v = connectivity[10 * t + b];
        const mid = [0, 1, 2].map((k) => (mesh.coords[3 * u + k] + mesh.coords[3 * v + k]) / 2);
        expect([x[3 * node], x[3 * node + 1], x[3 * node + 2]]).toEqual(mid);
        const key = mid.join(',');
        if (byPos.has(key)) expect(byPos.get(key)).toBe(node);
        else byPos.set(key, node);
      });
    }
    expect(byPos.size).toBe(nNodes - nV);
  });

  it('the numbering does not depend on the order of the tets', () => {
    const mesh = kuhnGrid(2, 3, 2);
    expect(Array.from(p2Coords(shuffleTets(mesh, 11)))).toEqual(Array.from(p2Coords(mesh)));
  });

  it('extends a linear vertex field exactly to the mid-edge nodes', () => {
    const mesh = kuhnGrid(2, 2, 2, 0.5);
    const nV = mesh.coords.length / 3;
    const et = buildEdges(mesh.tets, nV);
    const f = (x: number, y: number, z: number) => 3 * x - 2 * y + 0.5 * z + 1;
    const vals = Array.from({ length: nV }, (_, i) => f(mesh.coords[3 * i], mesh.coords[3 * i + 1], mesh.coords[3 * i + 2]));
    const ext = p2ExtendVertexField(vals, et, nV);
    const x = p2Coords(mesh, et);
    for (let i = 0; i < ext.length; i++) expect(ext[i]).toBeCloseTo(f(x[3 * i], x[3 * i + 1], x[3 * i + 2]), 12);
    // a 3-component field (the coordinates themselves) extends to the P2 node coordinates
    expect(Array.from(p2ExtendVertexField(mesh.coords, et, nV, 3))).toEqual(Array.from(x));
  });
});
