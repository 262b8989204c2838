/**
 * `npm run cli -- check <design.json> [--json]`: the far-field check of a design.
 *
 * With --json prints exactly one JSON object:
 *   { boundary, tolerance, sites: [{ id, chargeOutside, uBoundEv, uRelBound }],
 *     pairs: [{ a, b, vBoundEv, vRelBound }], worstRelBound, recommendedHalfExtentsNm,
 *     recommendedElements, warnings: [{ code, message, siteIds }], recommendedElementsIsLowerBound }
 * where recommendedElements is the mesher's estimate of the graded mesh for the recommended box
 * (null when no box size meets the tolerance). The estimate is capped so that check stays instant
 * on every valid design: past the cap (1.5 × min(maxElements, the mesher's server cap), or a flat
 * box whose initial grid alone is larger, or CHECK_ESTIMATE_MAX_LEAVES of work) it stops and
 * recommendedElementsIsLowerBound is true: the mesh would need more than recommendedElements.
 * (null stands for "no bound": a site outside the domain, or a box no size can fix).
 * With host.layers or electrodes (issue 11) each site adds boundKind ('rigorous' | 'estimated') and
 * boundReason (geometry/farfield/layered.ts), and the object ends with imageEffect: { worstURel,
 * worstUSite, worstVRel, worstVPair, tailBoundEv, maxLeak, findings: [{ code, index?, value? }] },
 * the worst change of U and V by the interfaces and metal planes against an infinite host of
 * host.epsilonR (relative numbers are fractions; U and V in the tables are then the stack's).
 * --moments adds the multipole moments to order 4 of every site's unit density and of the array
 * (weights = electrons) about the domain centre: a `moments` key in the JSON, a table otherwise.
 * Without it, a readable table with the model assumptions.
 * Exit codes: 0 checked, 1 invalid document or unreadable file, 2 usage, 3 checked but the design
 * is not fit to mesh as it stands: the worst bound misses the design's targetRelError, or the report
 * holds an error-level warning (a site outside the domain box, sites at the same position). The
 * numbers are printed either way.
 */
import { farFieldColumns, pairBoundAt, siteBoundAt, type FarFieldColumns, type FarFieldReport, type PairBound, type SiteBound } from '../../geometry/farfield';
import type { Design } from '../../geometry/design/types';
import { checkElementEstimate } from '../../geometry/mesh/index';
import { readDesign } from './design-file';
import { parseCli } from './args';
import { Rows, writePrettyJson } from './json-out';
import { notesAndAssumptions, table } from './text';
import { layeredSection } from './checkText';

const USAGE = 'usage: npm run cli -- check <design.json> [--json] [--moments]';


const num = (x: number | null) => (x === null || !Number.isFinite(x) ? null : x);

const siteJson = (s: SiteBound) => ({
  id: s.id,
  chargeOutside: s.chargeOutside,
  uBoundEv: num(s.uBoundEv),
  uRelBound: num(s.uRelBound),
  // layers or electrodes only (issue 11): rigorous or estimated, and why
  ...(s.boundKind ? { boundKind: s.boundKind, boundReason: s.boundReason } : {}),
});
const pairJson = (p: PairBound) => ({ a: p.a, b: p.b, vBoundEv: num(p.vBoundEv), vRelBound: num(p.vRelBound) });

export function toCheckJson(r: FarFieldReport) {
  return checkJson(r, r.sites.map(siteJson), r.pairs.map(pairJson));
}

/** The --json object with its site and pair rows made as they are written (same text as toCheckJson). */
export function toCheckJsonRows(c: FarFieldColumns) {
  return checkJson(
    c.head,
    new Rows(c.sites.count, (i) => siteJson(siteBoundAt(c, i))),
    new Rows(c.pairs.count, (t) => pairJson(pairBoundAt(c, t))),
  );
}

function checkJson<S, P>(r: Omit<FarFieldReport, 'sites' | 'pairs'>, sites: S, pairs: P) {
  return {
    boundary: r.boundary,
    tolerance: r.tolerance,
    sites,
    pairs,
    worstRelBound: num(r.worstRelBound),
    recommendedHalfExtentsNm: r.recommendedHalfExtentsNm.map(num),
    recommendedElements: r.elementsEstimate,
    warnings: r.warnings.map((w) => ({ code: w.code, message: w.message, siteIds: w.siteIds })),
    // added after the first release: keys are only ever added, at the end
    recommendedElementsIsLowerBound: r.elementsEstimateIsLowerBound,
    // layers or electrodes only (issue 11): the worst image-charge effect against an infinite host
    ...(r.imageEffect ? { imageEffect: r.imageEffect } : {}),
  };
}

const g = (x: number | null, digits = 3) => (x === null || !Number.isFinite(x) ? '—' : x.toPrecision(digits));
const pct = (x: number | null) => (x === null || !Number.isFinite(x) ? '—' : `${(100 * x).toPrecision(3)}%`);
const meV = (x: number | null) => (x === null || !Number.isFinite(x) ? '—' : (1000 * x).toPrecision(3));


export function toReadable(design: Design, c: FarFieldColumns): string {
  // the rows the tables show (the first 200 sites, 40 pairs) as objects; the rest stay in columns
  const r = c.head;
  const siteCount = c.sites.count, pairCount = c.pairs.count;
  const shownSites = Array.from({ length: Math.min(200, siteCount) }, (_, i) => siteBoundAt(c, i));
  const out: string[] = [];
  const h = design.domain.halfExtentsNm;
  out.push(`Far-field check: ${design.name}`);
  out.push(`boundary ${r.boundary}, tolerance ${pct(r.tolerance)}, domain half-extents ${h.join(' × ')} nm about (${design.domain.center.join(', ')}), εr = ${design.host.epsilonR}`);
  out.push('');
  out.push(
    table([
      ['site', r.imageEffect ? 'U in stack (meV)' : 'U model (meV)', 'clearance (nm)', 'density outside', '|ΔU| bound (meV)', 'relative', ...(r.imageEffect ? ['bound'] : [])],
      ...shownSites.map((s) => [s.id, meV(s.uEv), g(s.clearanceNm, 4), g(s.chargeOutside, 2), meV(s.uBoundEv), pct(s.uRelBound), ...(s.boundKind ? [s.boundKind] : [])]),
    ]),
  );
  if (siteCount > 200) out.push(`… ${siteCount - 200} more sites (use --json for all)`);
  if (pairCount) {
    out.push('');
    const shown = Array.from({ length: Math.min(40, pairCount) }, (_, t) => pairBoundAt(c, t));
    out.push(
      table([
        ['pair', 'R (nm)', r.imageEffect ? 'V in stack (meV)' : 'V model (meV)', '|ΔV| bound (meV)', 'relative'],
        ...shown.map((p) => [`${p.a}–${p.b}`, g(p.distanceNm, 4), `${meV(p.vEv)}${p.vModel === 'point-charge' ? '*' : ''}`, meV(p.vBoundEv), pct(p.vRelBound)]),
      ]),
    );
    if (shown.some((p) => p.vModel === 'point-charge'))
      out.push('* point-charge value e²/(4πε R): no closed form for this pair of orbitals (closed forms: two Gaussians, two equal 1s)');
    if (pairCount > shown.length) out.push(`… ${pairCount - shown.length} more pairs (use --json for all)`);
  }
  out.push('');
  out.push(`worst relative bound: ${pct(r.worstRelBound)} (target ${pct(r.tolerance)})`);
  out.push(`smallest half-extents meeting the target: ${r.recommendedHalfExtentsNm.map((x) => g(x, 4)).join(' × ')} nm`);
  if (r.elementsEstimate !== null)
    out.push(
      r.elementsEstimateIsLowerBound
        ? `elements the refinement would need: more than ${r.elementsEstimate} (the estimate stops there, at its cap)`
        : `elements the refinement would need: about ${r.elementsEstimate}`,
    );
  if (r.moments) {
    const names = ['q', 'p_y', 'p_z', 'p_x'];
    const row = (label: string, v: number[]) => [label, ...v.slice(0, 4).map((x) => g(x, 4)), g(Math.hypot(...v.slice(4, 9)), 4), g(Math.hypot(...v.slice(9, 16)), 4), g(Math.hypot(...v.slice(16, 25)), 4)];
    out.push('');
    out.push(`multipole moments about (${r.moments.center.join(', ')}) nm, in e·nm^l (real solid harmonics, Racah normalisation; |Q_l| = norm over m):`);
    out.push(table([['', ...names, '|Q_2|', '|Q_3|', '|Q_4|'], ...r.moments.sites.slice(0, 40).map((m) => row(m.id, m.values)), row('array', r.moments.values)]));
  }
  out.push(...layeredSection(design, r, c.sites.boundReason ?? []));
  if (r.warnings.length) {
    out.push('');
    out.push('warnings:');
    for (const w of r.warnings) out.push(`  [${w.severity}] ${w.code}: ${w.message}${w.siteIds.length ? ` (${w.siteIds.slice(0, 12).join(', ')}${w.siteIds.length > 12 ? ', …' : ''})` : ''}`);
  }
  out.push(...notesAndAssumptions([], r.assumptions));
  return out.join('\n');
}

export async function run(argv: string[]): Promise<number> {
  const args = parseCli(argv, { json: { type: 'boolean' }, moments: { type: 'boolean' }, help: { type: 'boolean', short: 'h' } });
  if (!('error' in args) && args.values.help) {
    console.log(USAGE);
    return 0;
  }
  if ('error' in args || args.positionals.length !== 1) {
    console.error('error' in args ? `${args.error}\n${USAGE}` : USAGE);
    return 2;
  }
  const files = args.positionals;
  const json = !!args.values.json;
  const design = await readDesign(files[0], json);
  if (!design) return 1;
  // The element count the graded mesh would need for the recommended box (the mesher's estimate,
  // within ±30 %); skipped for a box no size can fix. Capped at the mesher's own limit (the design's
  // maxElements and the server cap): past it the mesher refuses anyway, so "more than N" is the
  // useful answer, and it keeps check instant for tiny orbitals and flat boxes.
  const moments = !!args.values.moments;
  const report = farFieldColumns(design, {
    moments,
    estimateElements: (halfExtentsNm) => checkElementEstimate(design, halfExtentsNm),
  });
  // --json of 10⁵ sites is ~20 MB of text: written in pieces as the rows are made (json-out.ts),
  // the same characters as console.log(JSON.stringify(…, null, 2))
  if (json) writePrettyJson(moments ? { ...toCheckJsonRows(report), moments: report.head.moments } : toCheckJsonRows(report), (piece) => console.log(piece));
  else console.log(toReadable(design, report));
  return unfit(report.head) ? 3 : 0;
}

/**
 * Not fit to mesh as it stands: an error-level warning (a site outside the box, two sites at one
 * position), or a worst bound that misses the design's own target, so that a script watching the
 * exit status stops instead of meshing a box that cuts the far field.
 */
export function unfit(report: Pick<FarFieldReport, 'warnings' | 'worstRelBound' | 'tolerance'>): boolean {
  if (report.warnings.some((w) => w.severity === 'error')) return true;
  return report.worstRelBound !== null && report.worstRelBound > report.tolerance;
}
