/**
 * `npm run cli -- coulomb <design.json> [--order 1|2] [--adaptive] [--site <id>]… [--pairs …] [--theta x] [--method auto|split|full] [--lever-arms] [--json] [--progress]`:
 * on-site U and inter-site V of a design with error bars.
 *
 * Designs with electrodes add `siteEnergies: [{ id, eV }]` and `leverArms: [{ site, electrode,
 * meVPerV, errorMeVPerV }]` after the keys below (absent without electrodes, so those designs print
 * what they always did). `--lever-arms` computes the lever arms and site energies alone:
 *   { order, walls, siteEnergies, leverArms, siteEnergyErrors: [{ id, errorEv }], levels, seconds, notes }
 *
 * With --json prints exactly one JSON object, the issue's keys first and in order:
 *   { order, elements, dofs, iterations, sites: [{ id, uEv, uErrorEv }],
 *     pairs: [{ a, b, distanceNm, vEv, vErrorEv }], seconds,
 *     meetsTarget, estimatedRelError, notes: [string] }
 * Progress goes to standard error for runs longer than a few seconds; with --json only when
 * --progress asks for it.
 * Without it, a readable table with the error budget of each number, the model assumptions and
 * the reminder that these are estimates.
 * Exit codes: 0 solved and the estimated error meets refinement.targetRelError; 1 invalid
 * document or a refusal (message on stderr, no numbers); 2 usage; 3 the target was not met:
 * graded mode prints the numbers (meetsTarget false) and a one-line warning on stderr, adaptive
 * mode ran out of budget before the target (message, no numbers).
 */
import { readDesign } from './design-file';
import { notesAndAssumptions, table } from './text';
import type { Design } from '../../geometry/design/types';
import type { CoulombResult } from '../../geometry/fem/index';
import { asRefusal, describeRefusal } from '../coreErrors';
import { coulombResults, leverArmResults, LEVER_ARM_ASSUMPTIONS, type CoulombResults, type LeverArmResult } from '../../geometry/pipeline/index';
import { parseCli } from './args';
import { progressLines } from './progress';

const USAGE = 'usage: npm run cli -- coulomb <design.json> [--order 1|2] [--adaptive] [--site <id>]... [--pairs auto|all|bond-graph|none] [--theta x] [--method auto|split|full] [--lever-arms] [--json] [--progress]';

/** The refusals the numerical core raises on purpose (CoreError): shown in words, never as a stack trace. */
export function refusalMessage(err: unknown, lead: string): string | null {
  const refusal = asRefusal(err);
  return refusal ? describeRefusal(refusal, lead) : null;
}

const meV = (x: number) => (Number.isFinite(x) ? (1000 * x).toPrecision(6) : '—');
const meVs = (x: number) => (Number.isFinite(x) ? (1000 * x).toPrecision(2) : '—');

export function toCoulombReadable(design: Design, r: CoulombResult): string {
  const out: string[] = [];
  out.push(`Coulomb energies: ${design.name}`);
  out.push(
    `${r.method === 'split' ? 'Method split (closed form in each site\'s own layer + finite-element remainder)' : 'Method full (whole potential by finite elements)'}; ` +
    `P${r.order} elements, ${r.mode === 'adaptive' ? 'adaptive refinement' : `${r.levels.length} nested ${r.method === 'split' ? '' : 'graded '}meshes`}; finest mesh ${r.elements} tetrahedra, ${r.dofs} unknowns, ` +
      `${r.iterations} PCG iterations; εr = ${design.host.epsilonR}, boundary ${design.domain.boundary.kind === 'grounded' ? 'grounded' : `multipole(order ${design.domain.boundary.order})`}; ${r.seconds.toFixed(1)} s`,
  );
  out.push('');
  out.push(
    table([
      ['site', 'U (meV)', '± (meV)', 'discretisation (meV)', 'boundary (meV)', 'density cut (meV)', 'rate', 'charge in box'],
      ...r.sites.map((s) => [s.id, meV(s.uEv), meVs(s.uErrorEv), meVs(s.budget.discretisationEv), meVs(s.budget.boundaryEv), meVs(s.budget.densityCutEv), `${s.budget.rate.toFixed(2)} ${s.budget.rateSource}, Fs ${s.budget.safetyFactor}`, s.charge.toFixed(8)]),
    ]),
  );
  if (r.pairs.length) {
    out.push('');
    const shown = r.pairs.slice(0, 40);
    out.push(
      table([
        ['pair', 'R (nm)', 'V (meV)', '± (meV)', 'discretisation (meV)', 'boundary (meV)', 'density cut (meV)'],
        ...shown.map((p) => [`${p.a}–${p.b}`, p.distanceNm.toPrecision(4), meV(p.vEv), meVs(p.vErrorEv), meVs(p.budget.discretisationEv), meVs(p.budget.boundaryEv), meVs(p.budget.densityCutEv)]),
      ]),
    );
    if (r.pairs.length > shown.length) out.push(`… ${r.pairs.length - shown.length} more pairs (use --json for all)`);
  }
  out.push('');
  out.push(
    `estimated relative error ${r.estimatedRelError.toExponential(2)}, target ${r.targetRelError} — ${r.meetsTarget ? 'met' : 'NOT met'}` +
      ' (error columns: grid-convergence-index bar from nested meshes; maximum-principle boundary bound; density outside the box)',
  );
  out.push(...notesAndAssumptions(r.notes, r.assumptions));
  return out.join('\n');
}

/** The lever arms (meV/V) and site energies (meV) with their error bars, for the readable output. */
export function leverReadable(design: Design, r: LeverArmResult): string[] {
  const out: string[] = [];
  const names = (design.electrodes ?? []).map((e) => e.name);
  const volts = (design.electrodes ?? []).map((e) => `${e.name} ${e.voltageV} V`).join(', ');
  out.push(
    `Gate lever arms ∂E/∂V (meV/V; negative: an electron's energy falls as the electrode's voltage rises, a hole's rises), P${r.order}, ` +
      `${r.levels.length} nested meshes (finest ${r.levels[r.levels.length - 1]?.elements ?? 0} tetrahedra), walls ${r.walls === 'grounded' ? 'grounded (0 V)' : 'with zero normal field'}`,
  );
  out.push('');
  const byKey = new Map(r.leverArms.map((a) => [`${a.site}\u0000${a.electrode}`, a] as const));
  const fmt = (x: number) => (Number.isFinite(x) ? x.toPrecision(6) : '—');
  const fmtErr = (x: number) => (Number.isFinite(x) ? x.toPrecision(2) : '—');
  out.push(
    table([
      ['site', ...names.flatMap((n) => [`${n} (meV/V)`, '± (meV/V)']), 'E at design voltages (meV)', '± (meV)'],
      ...r.siteEnergies.map((s) => [
        s.id,
        ...names.flatMap((n) => {
          const a = byKey.get(`${s.id}\u0000${n}`);
          return a ? [fmt(a.meVPerV), fmtErr(a.errorMeVPerV)] : ['—', '—'];
        }),
        fmt(1000 * s.eV),
        fmtErr(1000 * s.errorEv),
      ]),
    ]),
  );
  out.push(`(site energies at ${volts || 'no electrodes'}, against every electrode at 0 V; error columns: grid-convergence-index bar from nested meshes)`);
  return out;
}

/** `seconds` is left out when the lever arms ran inside a U and V solve (whose own time the table gives). */
export function toLeverReadable(design: Design, r: LeverArmResult, seconds?: number): string {
  const out: string[] = [`Gate lever arms: ${design.name}${seconds === undefined ? '' : ` (${seconds.toFixed(1)} s)`}`, ''];
  out.push(...leverReadable(design, r));
  out.push(...notesAndAssumptions(r.notes, LEVER_ARM_ASSUMPTIONS));
  return out.join('\n');
}

export async function run(argv: string[]): Promise<number> {
  const args = parseCli(argv, {
    order: { type: 'string' },
    site: { type: 'string', multiple: true },
    theta: { type: 'string' },
    pairs: { type: 'string' },
    method: { type: 'string' },
    json: { type: 'boolean' },
    adaptive: { type: 'boolean' },
    progress: { type: 'boolean' },
    'lever-arms': { type: 'boolean' },
    help: { type: 'boolean', short: 'h' },
  });
  if (!('error' in args) && args.values.help) {
    console.log(USAGE);
    return 0;
  }
  if ('error' in args || args.positionals.length !== 1) {
    console.error(`${'error' in args ? `${args.error}\n` : ''}${USAGE}`);
    return 2;
  }
  const v = args.values;
  const orderArg = v.order;
  if (orderArg !== undefined && orderArg !== '1' && orderArg !== '2') {
    console.error(`--order must be 1 or 2, not "${orderArg}"\n${USAGE}`);
    return 2;
  }
  const thetaArg = v.theta;
  const theta = thetaArg === undefined ? undefined : Number(thetaArg);
  if (theta !== undefined && !(theta > 0 && theta <= 1)) {
    console.error(`--theta must be a number in (0, 1], not "${thetaArg}"`);
    return 2;
  }
  const pairs = v.pairs ?? 'auto';
  if (!['auto', 'all', 'bond-graph', 'none'].includes(pairs)) {
    console.error(`--pairs must be auto, all, bond-graph or none, not "${pairs}"`);
    return 2;
  }
  const method = v.method ?? 'auto';
  if (!['auto', 'split', 'full'].includes(method)) {
    console.error(`--method must be auto, split or full, not "${method}"`);
    return 2;
  }
  const json = !!v.json;
  const design = await readDesign(args.positionals[0], json);
  if (!design) return 1;
  const progress = progressLines({ enabled: !json || !!v.progress });
  if (v['lever-arms']) {
    if (!(design.electrodes?.length)) {
      console.error('--lever-arms needs a design with electrodes: this one has none');
      return 1;
    }
    try {
      const lever = leverArmResults(design, { order: orderArg ? (Number(orderArg) as 1 | 2) : undefined, onProgress: progress.onProgress });
      console.log(json ? JSON.stringify(lever.json, null, 2) : toLeverReadable(design, lever.result, lever.json.seconds));
      return 0;
    } catch (err) {
      const msg = refusalMessage(err, 'cannot compute the lever arms');
      if (msg === null) throw err;
      console.error(msg);
      return 1;
    }
  }
  let out: CoulombResults;
  try {
    out = coulombResults(design, {
      order: orderArg ? (Number(orderArg) as 1 | 2) : undefined,
      adaptive: !!v.adaptive,
      theta,
      siteIds: v.site,
      pairs: pairs as 'auto' | 'all' | 'bond-graph' | 'none',
      method: method as 'auto' | 'split' | 'full',
      onProgress: progress.onProgress,
    });
  } catch (err) {
    const msg = refusalMessage(err, 'cannot compute U and V');
    if (msg === null) throw err;
    console.error(msg);
    return 1;
  }
  const result = out.result;
  if (!out.hasNumbers) {
    console.error(`no result: ${result.notes[0] ?? 'the adaptive refinement did not reach the target'}`);
    return 3;
  }
  console.log(json ? JSON.stringify(out.json, null, 2) : toCoulombReadable(design, result) + (out.lever ? `\n\n${toLeverReadable(design, out.lever)}` : ''));
  if (!result.meetsTarget) {
    console.error(
      `warning: the estimated relative error ${result.estimatedRelError.toExponential(2)} does not meet targetRelError ${result.targetRelError}; the numbers above do not have the accuracy asked for (exit code 3)`,
    );
    return 3;
  }
  return 0;
}
