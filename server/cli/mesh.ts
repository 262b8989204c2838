/**
 * `npm run cli -- mesh <design.json> --out mesh.vtu [--order 1|2] [--format vtu|vtk|binary] [--solve] [--json]`
 *
 * Builds the graded bisection mesh of a design (geometry/mesh meshDesign), writes it and prints a
 * summary. With --json prints exactly one JSON object:
 *   { vertices, tets, p2Nodes, minDihedralDeg, maxDihedralDeg, volumeNm3, levels, seconds, file }
 * where `levels` is the number of tetrahedra per refinement level (levels[k] = tets of level k)
 * and `seconds` the wall time of meshing and writing.
 * --order defaults to the design's refinement.order (it selects 4- or 10-node cells in the file
 * and the grading exponent); --format defaults to the --out extension (.vtu, .vtk, .twmesh/.bin),
 * else vtu.
 * --solve also solves the Coulomb problem of every site with electrons on this mesh (geometry/fem)
 * and writes its potential as PointData "Potential_<site id>" in V per elementary charge
 * (φ·e²/4πε₀ in eV, i.e. volts), on all P2 nodes for order 2. Only for vtu and vtk.
 * Exit codes: 0 written, 1 invalid document, refused mesh or unwritable file, 2 usage.
 */
import { writeFile } from 'node:fs/promises';
import { readDesign } from './design-file';
import { resolveOrbital } from '../../geometry/design/presets';
import { MeshError, meshDesign, SizeField, sizeFieldFromDesign, orbitalLength } from '../../geometry/mesh/index';
import { writeVtu, writeVtkLegacy, encodeMeshBinary } from '../../geometry/mesh/export/index';
import { qualityReport, type ReportSite } from '../../geometry/mesh/quality';
import { solveSitePotentials, CoulombError } from '../../geometry/fem/coulomb';
import { COULOMB_EV_NM } from '../../geometry/units';

/** The keys `mesh --json` prints before its timings; a mesh revision's summary is exactly this (server/jobs/pipeline.ts). */
export function meshSummary(q: ReturnType<typeof qualityReport>) {
  return {
    vertices: q.vertices,
    tets: q.tets,
    p2Nodes: q.p2Nodes,
    minDihedralDeg: q.minDihedralDeg,
    maxDihedralDeg: q.maxDihedralDeg,
    volumeNm3: q.volumeNm3,
    levels: q.levels,
  };
}

const USAGE = 'usage: npm run cli -- mesh <design.json> --out <file> [--order 1|2] [--format vtu|vtk|binary] [--solve] [--json]';

type Format = 'vtu' | 'vtk' | 'binary';

interface Args {
  file: string;
  out: string;
  order?: 1 | 2;
  format: Format;
  json: boolean;
  solve: boolean;
}

function formatFromName(out: string): Format {
  const lower = out.toLowerCase();
  if (lower.endsWith('.vtk')) return 'vtk';
  if (lower.endsWith('.twmesh') || lower.endsWith('.bin')) return 'binary';
  return 'vtu';
}

/** Parses argv; returns a usage message (string) when it cannot. */
export function parseArgs(argv: string[]): Args | string {
  const files: string[] = [];
  let out: string | undefined;
  let order: 1 | 2 | undefined;
  let format: Format | undefined;
  let json = false;
  let solve = false;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const value = (): string | undefined => {
      const eq = a.indexOf('=');
      if (eq >= 0) return a.slice(eq + 1);
      const v = argv[i + 1];
      if (v === undefined || v.startsWith('--')) return undefined;
      i++;
      return v;
    };
    const name = a.split('=')[0];
    if (name === '--json') json = true;
    else if (name === '--solve') solve = true;
    else if (name === '--out') {
      out = value();
      if (!out) return `--out needs a file name\n${USAGE}`;
    } else if (name === '--order') {
      const v = value();
      if (v !== '1' && v !== '2') return `--order must be 1 or 2, not ${v ?? 'nothing'}\n${USAGE}`;
      order = v === '1' ? 1 : 2;
    } else if (name === '--format') {
      const v = value();
      if (v !== 'vtu' && v !== 'vtk' && v !== 'binary') return `--format must be vtu, vtk or binary, not ${v ?? 'nothing'}\n${USAGE}`;
      format = v;
    } else if (a.startsWith('--')) return `unknown option ${a}\n${USAGE}`;
    else files.push(a);
  }
  if (files.length !== 1) return files.length ? `one design file, please (got ${files.length})\n${USAGE}` : USAGE;
  if (!out) return `--out <file> is required\n${USAGE}`;
  const fmtOut = format ?? formatFromName(out);
  if (solve && fmtOut === 'binary') return `--solve writes potentials as point data: use --format vtu or vtk\n${USAGE}`;
  return { file: files[0], out, order, format: fmtOut, json, solve };
}

const fmt = (x: number, d = 4) => (Number.isFinite(x) ? x.toPrecision(d) : '—');

export async function run(argv: string[]): Promise<number> {
  if (argv.includes('--help') || argv.includes('-h')) {
    console.log(USAGE);
    return 0;
  }
  const args = parseArgs(argv);
  if (typeof args === 'string') {
    console.error(args);
    return 2;
  }
  const design = await readDesign(args.file, false);
  if (!design) return 1;
  const order = args.order ?? design.refinement.order;
  // A site outside the enclosure is allowed (a design may be mid-edit) but gets no grading, and
  // nothing computed on this mesh will include it: say so rather than mesh silently.
  const { center, halfExtentsNm } = design.enclosure;
  const outside = design.sites.filter((s) => s.position.some((x, k) => Math.abs(x - center[k]) >= halfExtentsNm[k]));
  if (outside.length) {
    const ids = outside.slice(0, 12).map((s) => s.id).join(', ') + (outside.length > 12 ? ', …' : '');
    console.error(`warning: ${outside.length} site(s) outside the enclosure (${ids}): the mesh is not graded around them; enlarge the box or move them`);
  }

  const t0 = performance.now();
  let result;
  try {
    result = meshDesign(design, { order });
  } catch (e) {
    if (e instanceof MeshError) {
      console.error(`cannot mesh ${args.file}: ${e.message}`);
      return 1;
    }
    throw e;
  }
  const mesh = result.mesh;

  // the size field at the vertices, for PointData (the writers extend it to P2 nodes)
  const field = new SizeField(sizeFieldFromDesign(design, { order }).spec);
  const nV = mesh.coords.length / 3;
  const sizeField = new Float64Array(nV);
  for (let v = 0; v < nV; v++) sizeField[v] = field.valueAt(mesh.coords[3 * v], mesh.coords[3 * v + 1], mesh.coords[3 * v + 2]);

  const pointData: { name: string; values: Float64Array }[] = [];
  if (args.solve) {
    try {
      const solved = solveSitePotentials(design, mesh, order);
      solved.siteIds.forEach((id, i) => {
        const phi = solved.nodal[i];
        const volts = new Float64Array(phi.length);
        for (let k = 0; k < phi.length; k++) volts[k] = phi[k] * COULOMB_EV_NM;
        pointData.push({ name: `Potential_${id}`, values: volts });
      });
    } catch (e) {
      if (e instanceof CoulombError) {
        console.error(`cannot solve on the mesh of ${args.file}: ${e.message}`);
        return 1;
      }
      throw e;
    }
  }

  let bytes: Uint8Array;
  try {
    bytes =
      args.format === 'vtu'
        ? writeVtu(mesh, { order, sizeField, pointData })
        : args.format === 'vtk'
          ? writeVtkLegacy(mesh, { order, sizeField, pointData })
          : encodeMeshBinary(mesh);
  } catch (e) {
    console.error(`cannot write the mesh as ${args.format}: ${(e as Error).message}`);
    return 1;
  }
  try {
    await writeFile(args.out, bytes);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    console.error(`cannot write ${args.out}: ${code === 'ENOENT' ? 'the folder does not exist' : code === 'EACCES' ? 'permission denied' : (e as Error).message}`);
    return 1;
  }
  const seconds = (performance.now() - t0) / 1000;

  const sites: ReportSite[] = design.sites.map((s) => ({ id: s.id, position: s.position, radiusNm: orbitalLength(resolveOrbital(s)) }));
  const q = qualityReport(mesh, args.json ? [] : sites);

  if (args.json) {
    console.log(
      JSON.stringify(
        {
          ...meshSummary(q),
          seconds,
          file: args.out,
        },
        null,
        2,
      ),
    );
    return 0;
  }

  const sf = result.sizeField;
  const out: string[] = [];
  out.push(`Mesh of ${design.name}: ${args.out} (${args.format}, ${order === 2 ? '10-node quadratic' : '4-node linear'} tetrahedra, ${(bytes.length / 1e6).toFixed(2)} MB)`);
  out.push(`  ${q.tets} tetrahedra (estimated ${Math.round(result.estimate)} before meshing), ${q.vertices} vertices, ${q.edges} edges, ${q.faces} faces, ${q.p2Nodes} P2 nodes`);
  out.push(`  dihedral angles ${fmt(q.minDihedralDeg)}° … ${fmt(q.maxDihedralDeg)}°, smallest mean ratio ${fmt(q.meanRatio.min, 3)}, smallest radius ratio ${fmt(q.radiusRatio.min, 3)}`);
  out.push(`  volume ${fmt(q.volumeNm3, 8)} nm³, refinement levels 0 … ${q.levels.length - 1}, element size ${fmt(q.hMin)} … ${fmt(q.hMax)} nm`);
  out.push(`  size field: ${sf.rule}`);
  out.push(`    exponent ${fmt(sf.exponent)}, hmax ${fmt(sf.hmaxNm)} nm, ${sf.classes.map((c) => `${c.sites} site(s) with h0 ${fmt(c.h0Nm)} nm, core ${fmt(c.coreRadiusNm)} nm`).join('; ')}`);
  const shown = q.sites.slice(0, 20);
  for (const s of shown) out.push(`  site ${s.id}: element at the site ${fmt(s.hAtSite)} nm, near it ${fmt(s.hMinNear)} … ${fmt(s.hMaxNear)} nm`);
  if (q.sites.length > shown.length) out.push(`  … ${q.sites.length - shown.length} more sites`);
  out.push(`  ${seconds.toFixed(2)} s`);
  out.push('');
  out.push('The mesh follows a size field built from model assumptions (orbital radii, an error constant');
  out.push('calibrated on one reference case); energies computed on it are estimates to be confirmed');
  out.push("by the group's own validated methods.");
  console.log(out.join('\n'));
  return 0;
}
