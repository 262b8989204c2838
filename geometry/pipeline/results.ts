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
  json: CoulombJson;
  table: ResultTable;
}

/** U and V with error bars (geometry/fem solveCoulomb) and their two outward shapes. */
export function coulombResults(design: Design, options: CoulombOptions = {}): CoulombResults {
  const result = solveCoulomb(design, options);
  return { result, hasNumbers: !(result.mode === 'adaptive' && !result.meetsTarget), json: coulombJson(result), table: coulombTable(result) };
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
