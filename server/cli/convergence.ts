/**
 * `npm run cli -- convergence <design.json> --kind refinement|box [--order 1|2] [--levels n] [--json]`:
 * convergence sweeps of U (and the box-size sweep for grounded and multipole boundaries).
 *
 * With --json prints the convergence result: { kind, order, siteIds, rows, plots, fittedRate, theoreticalRate,
 * seconds, notes }. Without it, the table, the fitted rate and the model assumptions.
 * Exit codes: 0 done, 1 invalid document or a refusal, 2 usage.
 */
import type { Design } from '../../geometry/design/types';
import { runConvergence, type ConvergenceResult, type RefinementRow, type BoxRow } from '../../geometry/fem/convergence';
import { parseArgs, refusalMessage } from './coulomb';
import { readDesign } from './design-file';
import { notesAndAssumptions, table } from './text';

const USAGE = 'usage: npm run cli -- convergence <design.json> --kind refinement|box [--order 1|2] [--levels n] [--json]';

const meV = (x: number) => (Number.isFinite(x) ? (1000 * x).toPrecision(6) : '—');


export function toConvergenceJson(r: ConvergenceResult) {
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

export function toConvergenceReadable(design: Design, r: ConvergenceResult): string {
  const out: string[] = [];
  out.push(`Convergence (${r.kind}): ${design.name}, P${r.order}, ${r.seconds.toFixed(1)} s`);
  out.push('');
  if (r.kind === 'refinement') {
    const rows = r.rows as RefinementRow[];
    out.push(
      table([
        ['level', 'bisections', 'tetrahedra', 'unknowns', 'PCG its', ...r.siteIds.map((id) => `U ${id} (meV)`), '|ΔU| (meV)'],
        ...rows.map((row) => [String(row.level), String(row.bisections), String(row.elements), String(row.dofs), String(row.iterations), ...row.uEv.map(meV), row.deltaEv === null ? '—' : (1000 * row.deltaEv).toPrecision(3)]),
      ]),
    );
    out.push('');
    out.push(`fitted rate |ΔU| ~ N^-${r.fittedRate === null ? '?' : r.fittedRate.toFixed(2)} (theory on graded meshes: N^-${r.theoreticalRate.toFixed(2)})`);
  } else {
    const rows = r.rows as BoxRow[];
    out.push(
      table([
        ['boundary', 'half-width (nm)', 'unknowns', ...r.siteIds.flatMap((id) => [`U ${id} (meV)`, '± (meV)', 'bound (meV)'])],
        ...rows.map((row) => [row.boundary, row.halfWidthNm.toPrecision(4), String(row.dofs), ...row.uEv.flatMap((u, k) => [meV(u), (1000 * row.uErrorEv[k]).toPrecision(2), (1000 * row.boundaryBoundEv[k]).toPrecision(2)])]),
      ]),
    );
  }
  out.push(...notesAndAssumptions(r.notes, r.assumptions));
  return out.join('\n');
}

export async function run(argv: string[]): Promise<number> {
  const args = parseArgs(argv, ['--kind', '--order', '--levels'], ['--json', '--help']);
  if (args.flags.has('--help')) {
    console.log(USAGE);
    return 0;
  }
  const kind = args.values.get('--kind')?.at(-1);
  if (args.errors.length || args.files.length !== 1 || (kind !== 'refinement' && kind !== 'box')) {
    const why = [...args.errors, ...(kind !== undefined && kind !== 'refinement' && kind !== 'box' ? [`--kind must be refinement or box, not "${kind}"`] : [])];
    console.error(`${why.join('\n')}${why.length ? '\n' : ''}${USAGE}`);
    return 2;
  }
  const orderArg = args.values.get('--order')?.at(-1);
  if (orderArg !== undefined && orderArg !== '1' && orderArg !== '2') {
    console.error(`--order must be 1 or 2, not "${orderArg}"\n${USAGE}`);
    return 2;
  }
  const levelsArg = args.values.get('--levels')?.at(-1);
  const levels = levelsArg === undefined ? undefined : Number(levelsArg);
  if (levels !== undefined && !(Number.isInteger(levels) && levels >= 3 && levels <= 8)) {
    console.error(`--levels must be a whole number from 3 to 8, not "${levelsArg}"`);
    return 2;
  }
  const json = args.flags.has('--json');
  const design = await readDesign(args.files[0], json);
  if (!design) return 1;
  let result: ConvergenceResult;
  try {
    result = runConvergence(design, { kind, order: orderArg ? (Number(orderArg) as 1 | 2) : undefined, levels });
  } catch (err) {
    const msg = refusalMessage(err);
    if (msg === null) throw err;
    console.error(`cannot run the convergence sweep: ${msg}`);
    return 1;
  }
  console.log(json ? JSON.stringify(toConvergenceJson(result), null, 2) : toConvergenceReadable(design, result));
  return 0;
}
