/**
 * Convergence studies of a design's Coulomb energies: tables and plot data.
 *
 *   refinement  a graded mesh for a core size 2^(L−1)·h0, then uniform refinement by three
 *               bisections per level (every edge halved, N × 8, the grading kept), so the levels
 *               form one self-similar nested family and the rate is clean. Rows: unknowns, U per site, the change
 *               from the previous level. Plot: U against unknowns N (log x), and |ΔU| against N
 *               on log–log axes with the least-squares rate: |ΔU| ≈ C N^(−rate). For a power
 *               law error C N^(−r) the successive differences fall at the same rate r, so the
 *               fit needs no reference value. Theory on graded meshes: r = 2/3 (P1), 4/3 (P2).
 *
 *   box         the domain scaled by factors (default 0.5 … 2) about its centre, solved with a
 *               grounded and with a multipole boundary. Rows: half-width, boundary, U per site
 *               with its error bar and the far-field bound. Plot: U against the smallest
 *               half-width, one series per boundary kind. Grounded U rises towards the free-space
 *               value like −1/(εr L); multipole U is flat once the box holds the density.
 */
import type { Design, Boundary } from '../design/types';
import { solveCoulomb, energiesOnMesh, type CoulombOptions, type Progress, COULOMB_ASSUMPTIONS } from './coulomb';
import { meshDesign, refineUniform, toTetMesh } from '../mesh/index';

export interface ConvergenceOptions {
  kind: 'refinement' | 'box';
  order?: 1 | 2;
  /** refinement: number of levels (default 3; each is 8× the previous) */
  levels?: number;
  /** box: half-width factors (default [0.5, 0.75, 1, 1.5, 2]) */
  factors?: number[];
  /** box: multipole order of the multipole series (default the design's, or 2) */
  multipoleOrder?: number;
  onProgress?: (p: Progress) => void;
  signal?: CoulombOptions['signal'];
}

export interface LogLogFit {
  /** the fitted rate r of y ≈ C x^(−r) */
  rate: number;
  /** C */
  prefactor: number;
  points: number;
}

export interface PlotSeries {
  name: string;
  x: number[];
  y: number[];
}

export interface ConvergencePlot {
  title: string;
  xLabel: string;
  yLabel: string;
  logX: boolean;
  logY: boolean;
  series: PlotSeries[];
  fit?: LogLogFit;
}

export interface RefinementRow {
  level: number;
  /** uniform bisections applied to the starting graded mesh (3 per level: every edge halved, N ≥ 8× with the closure) */
  bisections: number;
  elements: number;
  dofs: number;
  iterations: number;
  /** U per site (eV), in the order of `siteIds` */
  uEv: number[];
  /** |U − U of the previous level| of the first site (eV); null on the first level */
  deltaEv: number | null;
}

export interface BoxRow {
  factor: number;
  halfWidthNm: number;
  boundary: string;
  elements: number;
  dofs: number;
  uEv: number[];
  uErrorEv: number[];
  boundaryBoundEv: number[];
}

export interface ConvergenceResult {
  kind: 'refinement' | 'box';
  order: 1 | 2;
  siteIds: string[];
  rows: RefinementRow[] | BoxRow[];
  plots: ConvergencePlot[];
  /** refinement: fitted and theoretical rates in N */
  fittedRate: number | null;
  theoreticalRate: number;
  seconds: number;
  notes: string[];
  assumptions: string[];
}

/**
 * Least-squares line through (log x, log y): y ≈ C x^(−rate). Points with y ≤ 0 are skipped
 * (a difference that vanished carries no rate information). Null with fewer than two points.
 */
export function fitLogLog(x: readonly number[], y: readonly number[]): LogLogFit | null {
  const lx: number[] = [];
  const ly: number[] = [];
  for (let i = 0; i < x.length; i++) {
    if (x[i] > 0 && y[i] > 0 && Number.isFinite(y[i])) {
      lx.push(Math.log(x[i]));
      ly.push(Math.log(y[i]));
    }
  }
  const n = lx.length;
  if (n < 2) return null;
  const mx = lx.reduce((a, b) => a + b, 0) / n;
  const my = ly.reduce((a, b) => a + b, 0) / n;
  let sxy = 0, sxx = 0;
  for (let i = 0; i < n; i++) {
    sxy += (lx[i] - mx) * (ly[i] - my);
    sxx += (lx[i] - mx) * (lx[i] - mx);
  }
  if (sxx === 0) return null;
  const slope = sxy / sxx;
  return { rate: -slope, prefactor: Math.exp(my - slope * mx), points: n };
}

export function runConvergence(design: Design, options: ConvergenceOptions): ConvergenceResult {
  const t0 = performance.now();
  const order = options.order ?? design.refinement.order;
  const theoreticalRate = (2 * order) / 3;
  const notes: string[] = [];
  const report = (p: Progress, level: number, f: number): void => options.onProgress?.({ ...p, phase: p.phase === 'done' ? 'solve' : p.phase, level, fraction: Math.min(1, Math.max(0, f)) });

  if (options.kind === 'refinement') {
    const levels = Math.max(3, Math.floor(options.levels ?? 3));
    // start graded for a looser target so that the finest level lands near the design's own mesh
    const start = meshDesign(design, { order, h0Factor: Math.pow(2, levels - 1), keepBisectionMesh: true });
    const bm = start.bisectionMesh!;
    const rows: RefinementRow[] = [];
    let siteIds: string[] = [];
    for (let k = 0; k < levels; k++) {
      if (k > 0) refineUniform(bm, 3, { maxTets: Math.min(design.refinement.maxElements, 5_000_000) });
      const mesh = toTetMesh(bm);
      const e = energiesOnMesh(design, mesh, order, {
        signal: options.signal,
        onProgress: (p) => report(p, k + 1, ((Math.pow(8, k) - 1 + p.fraction * Math.pow(8, k)) / (Math.pow(8, levels) - 1)) * 7 / 8),
      });
      siteIds = e.siteIds;
      rows.push({
        level: k,
        bisections: 3 * k,
        elements: e.elements,
        dofs: e.dofs,
        iterations: e.iterations,
        uEv: e.uEv,
        deltaEv: k === 0 ? null : Math.abs(e.uEv[0] - rows[k - 1].uEv[0]),
      });
    }
    const fx = rows.slice(1).map((row) => row.dofs);
    const fy = rows.slice(1).map((row) => row.deltaEv as number);
    const fit = fitLogLog(fx, fy);
    if (fit && Math.abs(fit.rate - theoreticalRate) > 0.5 * theoreticalRate) {
      notes.push(`The fitted rate ${fit.rate.toFixed(2)} is far from the theoretical ${theoreticalRate.toFixed(2)}: the coarse levels may not be in the asymptotic range yet.`);
    }
    const plots: ConvergencePlot[] = [
      {
        title: `U against unknowns (P${order})`,
        xLabel: 'unknowns N',
        yLabel: 'U (eV)',
        logX: true,
        logY: false,
        series: siteIds.map((id, s) => ({ name: id, x: rows.map((row) => row.dofs), y: rows.map((row) => row.uEv[s]) })),
      },
      {
        title: `Change of U between levels, fitted rate ${fit ? fit.rate.toFixed(2) : 'n/a'} (theory ${theoreticalRate.toFixed(2)})`,
        xLabel: 'unknowns N',
        yLabel: '|ΔU| (eV)',
        logX: true,
        logY: true,
        series: [{ name: siteIds[0], x: fx, y: fy }],
        fit: fit ?? undefined,
      },
    ];
    options.onProgress?.({ phase: 'done', fraction: 1 });
    return {
      kind: 'refinement', order, siteIds, rows, plots, fittedRate: fit ? fit.rate : null, theoreticalRate,
      seconds: (performance.now() - t0) / 1000, notes, assumptions: COULOMB_ASSUMPTIONS,
    };
  }

  // ---- box sweep
  const factors = options.factors ?? [0.5, 0.75, 1, 1.5, 2];
  const mpOrder = options.multipoleOrder ?? (design.domain.boundary.kind === 'multipole' ? design.domain.boundary.order : 2);
  const kinds: Boundary[] = [{ kind: 'grounded' }, { kind: 'multipole', order: mpOrder }];
  const rows: BoxRow[] = [];
  let siteIds: string[] = [];
  const total = factors.length * kinds.length;
  let done = 0;
  for (const boundary of kinds) {
    for (const f of factors) {
      const half = design.domain.halfExtentsNm.map((h) => h * f) as [number, number, number];
      const d: Design = { ...design, domain: { ...design.domain, halfExtentsNm: half, boundary } };
      const label = boundary.kind === 'grounded' ? 'grounded' : `multipole(${boundary.order})`;
      const r = solveCoulomb(d, {
        order, levels: 2, pairs: 'none', method: 'full', signal: options.signal,
        onProgress: (p) => report(p, done + 1, (done + p.fraction) / total),
      });
      siteIds = r.sites.map((s) => s.id);
      rows.push({
        factor: f,
        halfWidthNm: Math.min(...half),
        boundary: label,
        elements: r.elements,
        dofs: r.dofs,
        uEv: r.sites.map((s) => s.uEv),
        uErrorEv: r.sites.map((s) => s.uErrorEv),
        boundaryBoundEv: r.sites.map((s) => s.budget.boundaryEv),
      });
      done++;
    }
  }
  const plots: ConvergencePlot[] = [
    {
      title: `U of ${siteIds[0]} against the domain half-width`,
      xLabel: 'smallest half-width (nm)',
      yLabel: 'U (eV)',
      logX: false,
      logY: false,
      series: kinds.map((b) => {
        const label = b.kind === 'grounded' ? 'grounded' : `multipole(${b.order})`;
        const sel = rows.filter((row) => row.boundary === label);
        return { name: label, x: sel.map((row) => row.halfWidthNm), y: sel.map((row) => row.uEv[0]) };
      }),
    },
  ];
  options.onProgress?.({ phase: 'done', fraction: 1 });
  return {
    kind: 'box', order, siteIds, rows, plots, fittedRate: null, theoreticalRate,
    seconds: (performance.now() - t0) / 1000, notes, assumptions: COULOMB_ASSUMPTIONS,
  };
}
