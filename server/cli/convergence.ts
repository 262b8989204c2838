/**
 * `npm run cli -- convergence <design.json> --kind refinement|box [--order 1|2] [--levels n] [--json] [--progress]`:
 * convergence sweeps of U (and the box-size sweep for grounded and multipole boundaries).
 *
 * With --json prints the convergence result: { kind, order, siteIds, rows, plots, fittedRate, theoreticalRate,
 * seconds, notes }. Progress goes to standard error for runs longer than a few seconds; with --json only
 * when --progress asks for it. Without it, the table, the fitted rate and the model assumptions.
 * Exit codes: 0 done, 1 invalid document or a refusal, 2 usage.
 */
import type { Design } from '../../geometry/design/types';
import type { ConvergenceResult, RefinementRow, BoxRow } from '../../geometry/fem/index';
import { convergenceResults, type ConvergenceResults } from '../../geometry/pipeline/index';
import { refusalMessage } from './coulomb';
import { parseCli } from './args';
import { progressLines } from './progress';
import { readDesign } from './design-file';
import { notesAndAssumptions, table } from './text';

const USAGE = 'usage: npm run cli -- convergence <design.json> --kind refinement|box [--order 1|2] [--levels n] [--json] [--progress]';

const meV = (x: number) => (Number.isFinite(x) ? (1000 * x).toPrecision(6) : '—');

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
  const args = parseCli(argv, {
    kind: { type: 'string' },
    order: { type: 'string' },
    levels: { type: 'string' },
    json: { type: 'boolean' },
    progress: { type: 'boolean' },
    help: { type: 'boolean', short: 'h' },
  });
  if (!('error' in args) && args.values.help) {
    console.log(USAGE);
    return 0;
  }
  const v = 'error' in args ? {} : args.values;
  const kind = v.kind;
  if ('error' in args || args.positionals.length !== 1 || (kind !== 'refinement' && kind !== 'box')) {
    const why = ['error' in args ? args.error : [], ...(kind !== undefined && kind !== 'refinement' && kind !== 'box' ? [`--kind must be refinement or box, not "${kind}"`] : [])].flat();
    console.error(`${why.join('\n')}${why.length ? '\n' : ''}${USAGE}`);
    return 2;
  }
  const orderArg = v.order;
  if (orderArg !== undefined && orderArg !== '1' && orderArg !== '2') {
    console.error(`--order must be 1 or 2, not "${orderArg}"\n${USAGE}`);
    return 2;
  }
  const levelsArg = v.levels;
  const levels = levelsArg === undefined ? undefined : Number(levelsArg);
  if (levels !== undefined && !(Number.isInteger(levels) && levels >= 3 && levels <= 8)) {
    console.error(`--levels must be a whole number from 3 to 8, not "${levelsArg}"`);
    return 2;
  }
  const json = !!v.json;
  const design = await readDesign(args.positionals[0], json);
  if (!design) return 1;
  const progress = progressLines({ enabled: !json || !!v.progress });
  let out: ConvergenceResults;
  try {
    out = convergenceResults(design, { kind, order: orderArg ? (Number(orderArg) as 1 | 2) : undefined, levels, onProgress: progress.onProgress });
  } catch (err) {
    const msg = refusalMessage(err, 'cannot run the convergence sweep');
    if (msg === null) throw err;
    console.error(msg);
    return 1;
  }
  console.log(json ? JSON.stringify(out.json, null, 2) : toConvergenceReadable(design, out.result));
  return 0;
}
