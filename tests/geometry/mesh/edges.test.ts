import { describe, expect, it } from 'vitest';
import { buildEdges, buildFaces, NO_TET } from '../../../geometry/mesh/edges';
import { TET_EDGES, TET_FACES } from '../../../geometry/fem/reference';
import { kuhnGrid, shuffleTets } from './check.fixtures';
import { kuhnBox, refine, toTetMesh } from '../../../geometry/mesh/index';

/** Reference: unique edges by a JavaScript Set of string keys (a general-purpose container). */
function naiveEdges(tets: Uint32Array): string[] {
  const s = new Set<string>();
  for (let i = 0; i < tets.length; i += 4) {
    for (const [a, b] of TET_EDGES) {
      const u = tets[i + a];
      const v = tets[i + b];
      s.add(`${Math.min(u, v)},${Math.max(u, v)}`);
    }
  }
  return [...s];
}

function naiveFaces(tets: Uint32Array): Map<string, number[]> {
  const s = new Map<string, number[]>();
  for (let i = 0; i < tets.length; i += 4) {
    for (const f of TET_FACES) {
      const key = f.map((k) => tets[i + k]).sort((x, y) => x - y).join(',');
      if (!s.has(key)) s.set(key, []);
      s.get(key)!.push(i / 4);
    }
  }
  return s;
}

function gradedMesh() {
  // a Kuhn box refined twice near one corner (mesher output, with closure)
  const bm = kuhnBox({ center: [0, 0, 0], halfExtents: [2, 2, 2], cells: [2, 2, 2] });
  for (let pass = 0; pass < 4; pass++) {
    const marks = new Uint8Array(bm.nTets);
    for (let t = 0; t < bm.nTets; t++) {
      const v = bm.tets[4 * t];
      if (bm.coords[3 * v] < -1 && bm.coords[3 * v + 1] < -1) marks[t] = 1;
    }
    refine(bm, marks);
  }
  return toTetMesh(bm);
}

describe('buildEdges', () => {
  for (const [label, mesh] of [
    ['Kuhn 3×2×2 grid', kuhnGrid(3, 2, 2)],
    ['graded bisection mesh', gradedMesh()],
  ] as const) {
    it(`finds exactly the unique edges of a Set-based reference (${label})`, () => {
      const nV = mesh.coords.length / 3;
      const { edges, tetEdges } = buildEdges(mesh.tets, nV);
      const ref = naiveEdges(mesh.tets);
      expect(edges.length / 2).toBe(ref.length);
      const mine: string[] = [];
      for (let e = 0; e < edges.length; e += 2) {
        expect(edges[e]).toBeLessThan(edges[e + 1]);
        mine.push(`${edges[e]},${edges[e + 1]}`);
        // sorted lexicographically by (min, max)
        if (e > 0) expect(edges[e - 2] < edges[e] || (edges[e - 2] === edges[e] && edges[e - 1] < edges[e + 1])).toBe(true);
      }
      expect(new Set(mine)).toEqual(new Set(ref));
      // each tet's edge e joins its local vertices TET_EDGES[e]
      for (let t = 0; t < mesh.tets.length / 4; t++) {
        TET_EDGES.forEach(([a, b], e) => {
          const ed = tetEdges[6 * t + e];
          const u = mesh.tets[4 * t + a];
          const v = mesh.tets[4 * t + b];
          expect([edges[2 * ed], edges[2 * ed + 1]]).toEqual([Math.min(u, v), Math.max(u, v)]);
        });
      }
    });
  }

  it('numbers edges independently of the order of the tets', () => {
    const mesh = kuhnGrid(3, 3, 2);
    const nV = mesh.coords.length / 3;
    const a = buildEdges(mesh.tets, nV).edges;
    const b = buildEdges(shuffleTets(mesh, 7).tets, nV).edges;
    expect(Buffer.from(b.buffer).equals(Buffer.from(a.buffer))).toBe(true);
  });

  it('counts the 19 edges of a Kuhn-split cube (12 cube edges, 6 face diagonals, 1 main diagonal)', () => {
    // geometric count for the Kuhn/Freudenthal cube split: every cube face is cut by one diagonal
    expect(buildEdges(kuhnGrid(1, 1, 1).tets, 8).edges.length / 2).toBe(12 + 6 + 1);
  });

  it('rejects out-of-range vertex indices', () => {
    expect(() => buildEdges(Uint32Array.from([0, 1, 2, 9]), 4)).toThrow(/vertex 9/);
  });
});

describe('buildFaces', () => {
  it('matches a Map-based reference: faces, the tets on each side, and outward orientation', () => {
    const mesh = gradedMesh();
    const nV = mesh.coords.length / 3;
    const { faces, faceTets, tetFaces, overSharedFaces } = buildFaces(mesh.tets, nV);
    const ref = naiveFaces(mesh.tets);
    expect(overSharedFaces).toBe(0);
    expect(faces.length / 3).toBe(ref.size);
    const c = mesh.coords;
    for (let f = 0; f < faces.length / 3; f++) {
      const tri = [faces[3 * f], faces[3 * f + 1], faces[3 * f + 2]];
      expect(tri[0]).toBe(Math.min(...tri));
      const key = [...tri].sort((x, y) => x - y).join(',');
      const owners = ref.get(key)!;
      expect(owners).toBeDefined();
      expect([faceTets[2 * f], faceTets[2 * f + 1]]).toEqual(owners.length === 2 ? owners : [owners[0], NO_TET]);
      // outward from the first tet: the tet's fourth vertex lies on the negative side of the
      // right-hand normal (the definition of an outward-oriented face)
      const t = owners[0];
      const opp = [0, 1, 2, 3].map((k) => mesh.tets[4 * t + k]).find((v) => !tri.includes(v))!;
      const p = (v: number) => [c[3 * v], c[3 * v + 1], c[3 * v + 2]];
      const [a, b, d] = tri.map(p);
      const u = [b[0] - a[0], b[1] - a[1], b[2] - a[2]];
      const w = [d[0] - a[0], d[1] - a[1], d[2] - a[2]];
      const n = [u[1] * w[2] - u[2] * w[1], u[2] * w[0] - u[0] * w[2], u[0] * w[1] - u[1] * w[0]];
      const q = p(opp);
      expect(n[0] * (q[0] - a[0]) + n[1] * (q[1] - a[1]) + n[2] * (q[2] - a[2])).toBeLessThan(0);
    }
    // tetFaces[i] is the face opposite local vertex i
    for (let t = 0; t < mesh.tets.length / 4; t++) {
      for (let i = 0; i < 4; i++) {
        const f = tetFaces[4 * t + i];
        const tri = [faces[3 * f], faces[3 * f + 1], faces[3 * f + 2]];
        expect(tri.includes(mesh.tets[4 * t + i])).toBe(false);
      }
    }
  });

  it('finds 2 boundary triangles per cube face on the surface of a Kuhn grid', () => {
    // each square on the box surface is cut by one diagonal into two triangles
    const [nx, ny, nz] = [3, 2, 4];
    const mesh = kuhnGrid(nx, ny, nz);
    const { faceTets } = buildFaces(mesh.tets, mesh.coords.length / 3);
    let boundary = 0;
    for (let f = 0; f < faceTets.length / 2; f++) if (faceTets[2 * f + 1] === NO_TET) boundary++;
    expect(boundary).toBe(2 * 2 * (nx * ny + ny * nz + nz * nx));
  });

  it('reports faces met by more than two tets instead of throwing', () => {
    const mesh = kuhnGrid(1, 1, 1);
    const tets = new Uint32Array(mesh.tets.length + 4);
    tets.set(mesh.tets);
    tets.set(mesh.tets.subarray(0, 4), mesh.tets.length); // a duplicated tet
    expect(buildFaces(tets, 8).overSharedFaces).toBeGreaterThan(0);
  });
});
