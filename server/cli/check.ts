/**
 * `npm run cli -- check <design.json> [--json]`: the far-field check of a design.
 *
 * With --json prints exactly one JSON object:
 *   { boundary, tolerance, sites: [{ id, chargeOutside, uBoundEv, uRelBound }],
 *     pairs: [{ a, b, vBoundEv, vRelBound }], worstRelBound, recommendedHalfExtentsNm,
 *     warnings: [{ code, message, siteIds }] }
 * (null stands for "no bound": a site outside the enclosure, or a box no size can fix).
 * Without it, a readable table with the model assumptions.
 * Exit codes: 0 checked, 1 invalid document or unreadable file, 2 usage.
 */
import { readFile } from 'node:fs/promises';
import { describeIssues, parseDesign } from '@contracts/design';
import { farFieldCheck, type FarFieldReport } from '../../geometry/farfield';
import type { Design } from '../../geometry/design/types';

const USAGE = 'usage: npm run cli -- check <design.json> [--json]';

const num = (x: number | null) => (x === null || !Number.isFinite(x) ? null : x);

export function toCheckJson(r: FarFieldReport) {
  return {
    boundary: r.boundary,
    tolerance: r.tolerance,
    sites: r.sites.map((s) => ({ id: s.id, chargeOutside: s.chargeOutside, uBoundEv: num(s.uBoundEv), uRelBound: num(s.uRelBound) })),
    pairs: r.pairs.map((p) => ({ a: p.a, b: p.b, vBoundEv: num(p.vBoundEv), vRelBound: num(p.vRelBound) })),
    worstRelBound: num(r.worstRelBound),
    recommendedHalfExtentsNm: r.recommendedHalfExtentsNm.map(num),
    warnings: r.warnings.map((w) => ({ code: w.code, message: w.message, siteIds: w.siteIds })),
  };
}

const g = (x: number | null, digits = 3) => (x === null || !Number.isFinite(x) ? '—' : x.toPrecision(digits));
const pct = (x: number | null) => (x === null || !Number.isFinite(x) ? '—' : `${(100 * x).toPrecision(3)}%`);
const meV = (x: number | null) => (x === null || !Number.isFinite(x) ? '—' : (1000 * x).toPrecision(3));

function table(rows: string[][]): string {
  const w = rows[0].map((_, c) => Math.max(...rows.map((r) => r[c].length)));
  return rows.map((r) => r.map((cell, c) => (c === 0 ? cell.padEnd(w[c]) : cell.padStart(w[c]))).join('  ')).join('\n');
}

export function toReadable(design: Design, r: FarFieldReport): string {
  const out: string[] = [];
  const h = design.enclosure.halfExtentsNm;
  out.push(`Far-field check: ${design.name}`);
  out.push(`boundary ${r.boundary}, tolerance ${pct(r.tolerance)}, enclosure half-extents ${h.join(' × ')} nm about (${design.enclosure.center.join(', ')}), εr = ${design.host.epsilonR}`);
  out.push('');
  out.push(
    table([
      ['site', 'U model (meV)', 'clearance (nm)', 'density outside', '|ΔU| bound (meV)', 'relative'],
      ...r.sites.map((s) => [s.id, meV(s.uEv), g(s.clearanceNm, 4), g(s.chargeOutside, 2), meV(s.uBoundEv), pct(s.uRelBound)]),
    ]),
  );
  if (r.pairs.length) {
    out.push('');
    const shown = r.pairs.slice(0, 40);
    out.push(
      table([
        ['pair', 'R (nm)', 'V model (meV)', '|ΔV| bound (meV)', 'relative'],
        ...shown.map((p) => [`${p.a}–${p.b}`, g(p.distanceNm, 4), meV(p.vEv), meV(p.vBoundEv), pct(p.vRelBound)]),
      ]),
    );
    if (r.pairs.length > shown.length) out.push(`… ${r.pairs.length - shown.length} more pairs (use --json for all)`);
  }
  out.push('');
  out.push(`worst relative bound: ${pct(r.worstRelBound)} (target ${pct(r.tolerance)})`);
  out.push(`smallest half-extents meeting the target: ${r.recommendedHalfExtentsNm.map((x) => g(x, 4)).join(' × ')} nm`);
  if (r.elementsEstimate !== null) out.push(`elements the refinement would need: about ${r.elementsEstimate}`);
  if (r.warnings.length) {
    out.push('');
    out.push('warnings:');
    for (const w of r.warnings) out.push(`  [${w.severity}] ${w.code}: ${w.message}${w.siteIds.length ? ` (${w.siteIds.slice(0, 12).join(', ')}${w.siteIds.length > 12 ? ', …' : ''})` : ''}`);
  }
  out.push('');
  out.push('Model assumptions:');
  for (const a of r.assumptions) out.push(`  - ${a}`);
  return out.join('\n');
}

export async function run(argv: string[]): Promise<number> {
  const flags = argv.filter((a) => a.startsWith('--'));
  const files = argv.filter((a) => !a.startsWith('--'));
  const unknown = flags.filter((f) => f !== '--json' && f !== '--help');
  if (flags.includes('--help')) {
    console.log(USAGE);
    return 0;
  }
  if (files.length !== 1 || unknown.length) {
    console.error(unknown.length ? `unknown option ${unknown.join(', ')}\n${USAGE}` : USAGE);
    return 2;
  }
  const json = flags.includes('--json');
  let text: string;
  try {
    text = await readFile(files[0], 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    console.error(`cannot read ${files[0]}: ${code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a folder' : (e as Error).message}`);
    return 1;
  }
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (e) {
    console.error(`${files[0]} is not valid JSON: ${(e as Error).message}`);
    return 1;
  }
  const parsed = parseDesign(doc);
  if (!parsed.ok) {
    console.error(`${files[0]} is not a valid design document:`);
    for (const line of describeIssues(parsed.issues.slice(0, 50))) console.error(`  ${line}`);
    if (parsed.issues.length > 50) console.error(`  … and ${parsed.issues.length - 50} more`);
    if (json) console.log(JSON.stringify({ valid: false, issues: parsed.issues }));
    return 1;
  }
  const design = parsed.design as Design;
  const report = farFieldCheck(design);
  console.log(json ? JSON.stringify(toCheckJson(report), null, 2) : toReadable(design, report));
  return 0;
}
