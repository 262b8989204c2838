/**
 * Mesher benchmark (prints figures, asserts nothing):
 *   - refinement throughput, tets per second, for a graded mesh of about 2 million tets
 *     (target ≥ 1 million per second on one core);
 *   - memory per tet (target ≤ 100 bytes), measured two ways, see below;
 *   - export speed of the .vtu writer (MB of file per second) and of the binary encoder.
 *
 * Memory, how measured: typed arrays live outside the V8 heap, so process.memoryUsage().arrayBuffers
 * is the figure that counts. After a forced GC (npm run bench passes --expose-gc) we read it before
 * meshing and again with both the tagged bisection mesh and the exported TetMesh still alive, i.e.
 * at the end of meshDesign, where both coexist: (after − before) / tets. Transient buffers freed
 * before that point (the midpoint hash, the vertex stamps, arrays replaced by doubling) are not
 * collected by then, so the reading includes them; the refinement engine also reports its working
 * bytes and we print the accounted peak both ways: max(bisection capacity + working bytes,
 * bisection capacity + TetMesh) when the freed working set is collected before toTetMesh, and
 * the plain sum when it is not.
 */
import { deflateSync } from 'node:zlib';
import { meshDesign, estimateTetCount, SizeField, sizeFieldFromDesign, chooseInitialCells, kuhnBox, refineToSize } from '../../geometry/mesh/index';
import { writeVtu, encodeMeshBinary } from '../../geometry/mesh/export/index';
import type { Design } from '../../geometry/design/types';
import type { TetMesh } from '../../geometry/mesh/types';
import type { BisectionMesh } from '../../geometry/mesh/bisection';

const TARGET_TETS = 2_000_000;

/** An invented 2×2 plaquette of P donors 4.6 nm apart in a 60 nm box, graded for P1. */
function plaquette(tol: number): Design {
  const p = 2.3;
  return {
    format: 'tetrawell-design',
    version: 1,
    name: 'bench plaquette (invented)',
    host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431 },
    sites: [
      { id: 'a', species: 'P', position: [-p, -p, 0], electrons: 1 },
      { id: 'b', species: 'P', position: [p, -p, 0], electrons: 1 },
      { id: 'c', species: 'P', position: [-p, p, 0], electrons: 1 },
      { id: 'd', species: 'P', position: [p, p, 0], electrons: 1 },
    ],
    domain: { center: [0, 0, 0], halfExtentsNm: [30, 30, 30], boundary: { kind: 'grounded' } },
    refinement: { order: 1, targetRelError: tol, maxElements: 10_000_000 },
  };
}

function estimateFor(d: Design): number {
  const { spec } = sizeFieldFromDesign(d);
  const h = d.domain.halfExtentsNm;
  const c = d.domain.center;
  return estimateTetCount({
    field: new SizeField(spec),
    boxMin: [c[0] - h[0], c[1] - h[1], c[2] - h[2]],
    boxMax: [c[0] + h[0], c[1] + h[1], c[2] + h[2]],
    cells: chooseInitialCells(h, 2),
  }).tets;
}

const gc = (globalThis as { gc?: () => void }).gc;

function arrayBytes(m: TetMesh): number {
  return Object.values(m).reduce((s, a) => s + (ArrayBuffer.isView(a) ? a.byteLength : 0), 0);
}

function bisectionBytes(m: BisectionMesh): number {
  return [m.coords, m.parents, m.vertexLevel, m.vertexFaces, m.tets, m.tetTag, m.tetFlip, m.tetLevel, m.tetRegion].reduce((s, a) => s + a.byteLength, 0);
}

export async function run(): Promise<void> {
  // tune the tolerance so the mesh has about TARGET_TETS tets: N ∝ h0^−3 ∝ tol^−3/2 for P1
  let tol = 1e-3;
  for (let i = 0; i < 3; i++) tol *= (estimateFor(plaquette(tol)) / TARGET_TETS) ** (2 / 3);
  const design = plaquette(tol);

  // warm-up on a small mesh (JIT)
  meshDesign(plaquette(tol * 8));

  gc?.();
  const before = process.memoryUsage();
  const t0 = performance.now();
  const r = meshDesign(design, { keepBisectionMesh: true });
  const seconds = (performance.now() - t0) / 1000;
  const after = process.memoryUsage();
  const tets = r.stats.tets;
  const bm = r.bisectionMesh!;
  const refinedTets = tets - r.stats.initialTets;

  console.log(`design: 4 donors, P1, targetRelError ${tol.toExponential(3)}, h0 ${r.sizeField.h0MinNm.toFixed(3)} nm, box 60 nm`);
  console.log(`mesh: ${tets} tets, ${r.stats.vertices} vertices, levels 0…${r.stats.maxLevel}, ${r.stats.closurePasses} passes (1 size + closure), estimate ${Math.round(r.estimate)} (${((100 * r.estimate) / tets).toFixed(1)} % of actual)`);
  console.log(`refinement: ${r.stats.secondsRefine.toFixed(3)} s → ${(refinedTets / r.stats.secondsRefine / 1e6).toFixed(2)} M tets/s (tets created by bisection per second; target ≥ 1 M/s)`);
  console.log(`            ${(r.stats.bisections / r.stats.secondsRefine / 1e6).toFixed(2)} M bisections/s`);
  console.log(`estimate: ${r.stats.secondsEstimate.toFixed(3)} s (${r.stats.estimateLeaves} cubature cells); toTetMesh: ${r.stats.secondsConvert.toFixed(3)} s; meshDesign total ${seconds.toFixed(3)} s → ${(tets / seconds / 1e6).toFixed(2)} M tets/s end to end`);

  const measured = after.arrayBuffers - before.arrayBuffers;
  const bisect = bisectionBytes(bm);
  const tetMesh = arrayBytes(r.mesh);
  const work = r.stats.workBytes;
  const peak = Math.max(bisect + work, bisect + tetMesh);
  const all = bisect + work + tetMesh;
  console.log(`memory measured (arrayBuffers growth over meshDesign, both meshes alive, the engine's freed hash and stamps not yet collected): ${(measured / 1e6).toFixed(1)} MB = ${(measured / tets).toFixed(1)} bytes/tet${gc ? '' : ' (run without --expose-gc: baseline may include garbage)'}`);
  console.log(`memory accounted: bisection mesh with spare capacity ${(bisect / tets).toFixed(1)} B/tet, refinement working set (hash + stamps) ${(work / tets).toFixed(1)} B/tet, TetMesh ${(tetMesh / tets).toFixed(1)} B/tet → peak ${(peak / tets).toFixed(1)} bytes/tet if the freed working set is collected before toTetMesh, ${(all / tets).toFixed(1)} bytes/tet if not (target ≤ 100)`);
  console.log(`            V8 heapUsed change ${((after.heapUsed - before.heapUsed) / 1e6).toFixed(1)} MB`);

  // Refinement alone, timed by process CPU time as well as wall time: on a shared machine the wall
  // clock also counts other processes' turns, CPU time counts only ours.
  {
    const h = design.domain.halfExtentsNm;
    const field = new SizeField(sizeFieldFromDesign(design).spec);
    const runs: string[] = [];
    for (let i = 0; i < 3; i++) {
      const m = kuhnBox({ center: design.domain.center, halfExtents: h, cells: chooseInitialCells(h, 2), capacity: { tets: 1.4 * r.estimate, vertices: (1.4 * r.estimate) / 4 } });
      const c0 = process.cpuUsage();
      const w0 = performance.now();
      refineToSize(m, field.tooLarge, { expectedNewVertices: r.estimate / 5 });
      const wall = (performance.now() - w0) / 1000;
      const c = process.cpuUsage(c0);
      const cpu = (c.user + c.system) / 1e6;
      runs.push(`${(m.nTets / cpu / 1e6).toFixed(2)} M/s cpu (${cpu.toFixed(3)} s), ${(m.nTets / wall / 1e6).toFixed(2)} M/s wall (${wall.toFixed(3)} s)`);
    }
    console.log(`refinement alone, 3 runs: ${runs.join('; ')}`);
  }

  // export
  const mesh = r.mesh;
  for (const [label, write] of [
    ['vtu zlib (P1)', () => writeVtu(mesh)],
    ['vtu zlib (P1, node:zlib deflate)', () => writeVtu(mesh, { deflate: (raw, level) => deflateSync(raw, { level }) })],
    ['vtu base64 (P1)', () => writeVtu(mesh, { encoding: 'base64' })],
    ['binary TWMESH', () => encodeMeshBinary(mesh)],
  ] as const) {
    const t = performance.now();
    const bytes = write();
    const s = (performance.now() - t) / 1000;
    console.log(`export ${label}: ${(bytes.length / 1e6).toFixed(1)} MB in ${s.toFixed(3)} s → ${(bytes.length / 1e6 / s).toFixed(0)} MB/s`);
  }
}
