/**
 * Design → graded meshes → solves → results: the solve half of the pipeline that
 * `npm run cli -- coulomb|convergence` and the `coulomb`/`convergence` jobs both run.
 *
 * Each returns the core's result, the object `--json` prints (a revision's results.json is that
 * object; its summary is the same without `seconds`), and the results table as fields and rows
 * (the server writes it as results.csv). Data only: the words are the callers'.
 */
import type { Design } from '../design/types';
import { solveCoulomb, type CoulombOptions, type CoulombResult } from '../fem/coulomb';
import { runConvergence, type ConvergenceOptions, type ConvergenceResult, type RefinementRow, type BoxRow } from '../fem/convergence';
import { solveLeverArms, type LeverArmOptions, type LeverArmResult } from '../fem/lever';

/** A table of results: column names and rows of numbers or strings (an empty string for no value). */
export interface ResultTable {
  fields: string[];
  rows: (string | number)[][];
}

export function coulombJson(r: CoulombResult) {
  return {
    order: r.order,
    elements: r.elements,
    dofs: r.dofs,
    iterations: r.iterations,
    sites: r.sites.map((s) => ({ id: s.id, uEv: s.uEv, uErrorEv: s.uErrorEv })),
    pairs: r.pairs.map((p) => ({ a: p.a, b: p.b, distanceNm: p.distanceNm, vEv: p.vEv, vErrorEv: p.vErrorEv })),
    seconds: r.seconds,
    meetsTarget: r.meetsTarget,
    estimatedRelError: r.estimatedRelError,
    notes: r.notes,
    /** 'split' (closed form + finite-element remainder) or 'full' (issue 11); added after the original keys */
    method: r.method,
  };
}
export type CoulombJson = ReturnType<typeof coulombJson>;

/** The lever-arm keys of `coulomb --json` (issue 11's names, in this order). */
export function leverJson(r: LeverArmResult) {
  return {
    siteEnergies: r.siteEnergies.map((s) => ({ id: s.id, eV: s.eV })),
    leverArms: r.leverArms.map((a) => ({ site: a.site, electrode: a.electrode, meVPerV: a.meVPerV, errorMeVPerV: a.errorMeVPerV })),
  };
}

/**
 * `coulomb --json` of a design with electrodes: the keys, then siteEnergies and leverArms
 * (present, possibly empty, exactly when the design has electrodes). Without electrodes the object
 * is coulombJson's, key for key.
 */
export function coulombJsonWithLever(r: CoulombResult, lever: LeverArmResult | null) {
  const base = coulombJson(r);
  return lever ? { ...base, ...leverJson(lever) } : base;
}

/** `coulomb --lever-arms --json`: the lever arms alone, for designs whose U and V wait for the layered solve. */
export function leverArmsJson(r: LeverArmResult, seconds: number) {
  return {
    order: r.order,
    walls: r.walls,
    ...leverJson(r),
    siteEnergyErrors: r.siteEnergies.map((s) => ({ id: s.id, errorEv: s.errorEv })),
    levels: r.levels.map((l) => ({ elements: l.elements, dofs: l.dofs, iterations: l.iterations })),
    seconds,
    notes: r.notes,
  };
}
export type LeverArmsJson = ReturnType<typeof leverArmsJson>;

/** Lever arms and site energies as a table (the server writes it as CSV). */
export function leverTable(r: LeverArmResult): ResultTable {
  return {
    fields: ['quantity', 'site', 'electrode', 'value', 'error', 'unit'],
    rows: [
      ...r.leverArms.map((a) => ['lever_arm_mev_per_v', a.site, a.electrode, a.meVPerV, a.errorMeVPerV, 'meV/V']),
      ...r.siteEnergies.map((s) => ['site_energy_ev', s.id, '', s.eV, s.errorEv, 'eV']),
    ],
  };
}

export function coulombTable(r: CoulombResult): ResultTable {
  return {
    fields: ['quantity', 'site', 'other_site', 'distance_nm', 'value_ev', 'error_ev'],
    rows: [...r.sites.map((s) => ['U', s.id, '', '', s.uEv, s.uErrorEv]), ...r.pairs.map((p) => ['V', p.a, p.b, p.distanceNm, p.vEv, p.vErrorEv])],
  };
}

export function convergenceJson(r: ConvergenceResult) {
  return {
    kind: r.kind,
    order: r.order,
    siteIds: r.siteIds,
    rows: r.rows,
    plots: r.plots,
    fittedRate: r.fittedRate,
    theoreticalRate: r.theoreticalRate,
    seconds: r.seconds,
    notes: r.notes,
  };
}
export type ConvergenceJson = ReturnType<typeof convergenceJson>;

export function convergenceTable(r: ConvergenceResult): ResultTable {
  if (r.kind === 'refinement') {
    const rows = r.rows as RefinementRow[];
    return {
      fields: ['level', 'bisections', 'tetrahedra', 'unknowns', 'pcg_iterations', ...r.siteIds.map((id) => `u_${id}_ev`), 'delta_ev'],
      rows: rows.map((row) => [row.level, row.bisections, row.elements, row.dofs, row.iterations, ...row.uEv, row.deltaEv ?? '']),
    };
  }
  const rows = r.rows as BoxRow[];
  return {
    fields: ['boundary', 'half_width_nm', 'unknowns', ...r.siteIds.flatMap((id) => [`u_${id}_ev`, `u_${id}_error_ev`, `u_${id}_boundary_bound_ev`])],
    rows: rows.map((row) => [row.boundary, row.halfWidthNm, row.dofs, ...row.uEv.flatMap((u, k) => [u, row.uErrorEv[k], row.boundaryBoundEv[k]])]),
  };
}

export interface CoulombResults {
  result: CoulombResult;
  /** false when adaptive refinement ran out of budget before the target: no numbers are given out then */
  hasNumbers: boolean;
  json: CoulombJson | ReturnType<typeof coulombJsonWithLever>;
  table: ResultTable;
  /** lever arms and site energies (designs with electrodes; null without) */
  lever: LeverArmResult | null;
}

/** U and V with error bars (geometry/fem solveCoulomb) and their two outward shapes. */
export function coulombResults(design: Design, options: CoulombOptions = {}): CoulombResults {
  const result = solveCoulomb(design, options);
  const lever = (design.electrodes?.length ?? 0) > 0 ? solveLeverArms(design, { order: options.order, signal: options.signal, mesh: options.mesh, onProgress: options.onProgress }) : null;
  const table = coulombTable(result);
  if (lever) table.rows.push(...leverTable(lever).rows.map((r) => [r[0], r[1], r[2], '', r[3], r[4]]));
  return { result, hasNumbers: !(result.mode === 'adaptive' && !result.meetsTarget), json: coulombJsonWithLever(result, lever), table, lever };
}

export interface LeverArmResults {
  result: LeverArmResult;
  json: LeverArmsJson;
  table: ResultTable;
}

/** Gate lever arms and site energies with error bars (geometry/fem solveLeverArms) and their two outward shapes. */
export function leverArmResults(design: Design, options: LeverArmOptions = {}): LeverArmResults {
  const t0 = performance.now();
  const result = solveLeverArms(design, options);
  return { result, json: leverArmsJson(result, (performance.now() - t0) / 1000), table: leverTable(result) };
}

export interface ConvergenceResults {
  result: ConvergenceResult;
  json: ConvergenceJson;
  table: ResultTable;
}

/** A refinement or box sweep (geometry/fem runConvergence) and its two outward shapes. */
export function convergenceResults(design: Design, options: ConvergenceOptions): ConvergenceResults {
  const result = runConvergence(design, options);
  return { result, json: convergenceJson(result), table: convergenceTable(result) };
}
