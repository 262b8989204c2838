/**
 * Legacy VTK ASCII writer (VTK file-format documentation, "Simple Legacy Formats",
 * DATASET UNSTRUCTURED_GRID), written as version 3.0 for the widest reader support:
 *
 *   # vtk DataFile Version 3.0
 *   <title line>
 *   ASCII
 *   DATASET UNSTRUCTURED_GRID
 *   POINTS n double           x y z per line
 *   CELLS m size              "4 a b c d" (or "10 …" for quadratic), size = m·(nodes+1)
 *   CELL_TYPES m              10 (VTK_TETRA) or 24 (VTK_QUADRATIC_TETRA)
 *   CELL_DATA m               SCALARS RegionId int / RefinementLevel int / MeanRatio double
 *   POINT_DATA n              SCALARS SizeFieldNm double and caller-named arrays
 *
 * The second choice after .vtu: larger and slower, but readable by eye and by old tools. Numbers
 * use the shortest form that reads back to the same double. Array names must not contain spaces.
 */
import { cooperate, COOPERATE_MASK } from '../../cooperate';
import type { TetMesh } from '../types';
import { buildEdges } from '../edges';
import { p2Connectivity, p2Coords, p2ExtendVertexField } from '../p2';
import { computeMeanRatio } from '../quality';
import { utf8 } from './bytes';
import { VTK_QUADRATIC_TETRA, VTK_TETRA, type NamedArray } from './vtu';

export interface VtkLegacyOptions {
  order?: 1 | 2;
  sizeField?: ArrayLike<number>;
  pointData?: NamedArray[];
  cellData?: NamedArray[];
  meanRatio?: Float64Array;
  /** second header line (default names the product and the unit); one line, ≤ 255 characters */
  title?: string;
}

function checkName(name: string): string {
  if (!/^[A-Za-z0-9_.-]+$/.test(name)) throw new Error(`legacy VTK array name "${name}" must be letters, digits, _ . - only`);
  return name;
}

function isIntegerArray(v: ArrayLike<number>): boolean {
  return v instanceof Uint8Array || v instanceof Int8Array || v instanceof Uint16Array || v instanceof Int16Array || v instanceof Int32Array || v instanceof Uint32Array;
}

export function writeVtkLegacy(mesh: TetMesh, options: VtkLegacyOptions = {}): Uint8Array {
  const order = options.order ?? 1;
  if (order !== 1 && order !== 2) throw new Error(`order must be 1 or 2 (got ${order})`);
  const nV = mesh.coords.length / 3;
  const m = mesh.tets.length >> 2;
  if (m === 0) throw new Error('cannot export an empty mesh (no tetrahedra)');
  const et = order === 2 ? buildEdges(mesh.tets, nV) : undefined;
  const points = et ? p2Coords(mesh, et) : mesh.coords;
  const conn = et ? p2Connectivity(mesh, et) : mesh.tets;
  const nPoints = points.length / 3;
  const k = order === 2 ? 10 : 4;
  const title = (options.title ?? 'Tetrawell tetrahedral mesh, lengths in nm (model mesh; derived values are estimates)').replace(/[\r\n]/g, ' ').slice(0, 255);

  const lines: string[] = [];
  lines.push('# vtk DataFile Version 3.0', title, 'ASCII', 'DATASET UNSTRUCTURED_GRID');
  lines.push(`POINTS ${nPoints} double`);
  for (let i = 0; i < nPoints; i++) {
    if ((i & COOPERATE_MASK) === 0) cooperate();
    lines.push(`${points[3 * i]} ${points[3 * i + 1]} ${points[3 * i + 2]}`);
  }
  lines.push(`CELLS ${m} ${m * (k + 1)}`);
  const row: number[] = new Array(k);
  for (let t = 0; t < m; t++) {
    if ((t & COOPERATE_MASK) === 0) cooperate();
    for (let j = 0; j < k; j++) row[j] = conn[k * t + j];
    lines.push(`${k} ${row.join(' ')}`);
  }
  lines.push(`CELL_TYPES ${m}`);
  const typeLine = String(order === 2 ? VTK_QUADRATIC_TETRA : VTK_TETRA);
  for (let t = 0; t < m; t++) lines.push(typeLine);

  const scalars = (name: string, values: ArrayLike<number>, comps: number) => {
    lines.push(`SCALARS ${checkName(name)} ${isIntegerArray(values) ? 'int' : 'double'} ${comps}`, 'LOOKUP_TABLE default');
    const r: number[] = new Array(comps);
    for (let i = 0; i < values.length; i += comps) {
      if ((i & COOPERATE_MASK) === 0) cooperate();
      for (let c = 0; c < comps; c++) r[c] = values[i + c];
      lines.push(r.join(' '));
    }
  };

  lines.push(`CELL_DATA ${m}`);
  if (mesh.tetRegion) scalars('RegionId', mesh.tetRegion, 1);
  if (mesh.tetLevel) scalars('RefinementLevel', mesh.tetLevel, 1);
  scalars('MeanRatio', options.meanRatio ?? computeMeanRatio(mesh), 1);
  for (const a of options.cellData ?? []) {
    const comps = a.components ?? 1;
    if (a.values.length !== comps * m) throw new Error(`CellData array "${a.name}" has ${a.values.length} values, expected ${comps} × ${m}`);
    scalars(a.name, a.values, comps);
  }

  const pointArrays: NamedArray[] = [];
  if (options.sizeField) pointArrays.push({ name: 'SizeFieldNm', values: options.sizeField });
  pointArrays.push(...(options.pointData ?? []));
  if (pointArrays.length) {
    lines.push(`POINT_DATA ${nPoints}`);
    for (const a of pointArrays) {
      const comps = a.components ?? 1;
      let values = a.values;
      if (et && values.length === comps * nV) values = p2ExtendVertexField(values, et, nV, comps);
      if (values.length !== comps * nPoints) throw new Error(`PointData array "${a.name}" has ${values.length} values, expected ${comps} × ${nPoints}`);
      scalars(a.name, values, comps);
    }
  }
  lines.push('');
  return utf8(lines.join('\n'));
}
