/**
 * What every import format produces and the checks they share.
 *
 * A format parser turns text into rows, each with its 1-based line number in the file, and
 * reports what it cannot read (a missing column, text in a number) as `{ line, message }`.
 * `checkRows` then applies the checks that do not depend on the format: the site contract
 * (species, id length, coordinate range, electrons), duplicate ids, sites outside the design's
 * domain box (`domain`; on a face counts as outside, as in the far-field check) and two sites
 * at one lattice point (nearest diamond-lattice site, geometry/lattice `snapToLattice`).
 * The first of two clashing rows is kept; the later one is reported with the first one's line.
 *
 * Pure functions: no node:* imports, no database, so the CLI and workers can reuse them.
 */
import { siteSchema, plainIssueMessage, formatPath, type DesignDocument } from '@contracts/design';
import { snapToLattice } from '../../geometry/lattice';

export type Site = DesignDocument['sites'][number];

export interface ImportIssue {
  /** 1-based line number in the file */
  line: number;
  message: string;
}

/** A row as a format read it; `species` is still unchecked text. */
export interface ImportRow {
  line: number;
  id: string;
  species: string;
  /** nm */
  position: [number, number, number];
  electrons: number;
  cluster?: string;
  /** an orbital override (design JSON only), checked against the site contract */
  orbital?: unknown;
}

export interface ParsedRows {
  rows: ImportRow[];
  errors: ImportIssue[];
  /** data rows seen, read or not (the row limit counts these) */
  rowCount: number;
}

/** The parts of the target design the checks need. */
export interface ImportContext {
  domain: DesignDocument['domain'];
  latticeConstantNm: number;
}

export const SPECIES = ['P', 'As', 'Sb', 'Bi', 'B'] as const;

/** "as" → "As", "P" → "P": element symbols are case-insensitive in the files we read. */
export function normaliseSymbol(s: string): string {
  const t = s.trim();
  return t.length === 0 ? t : t[0].toUpperCase() + t.slice(1).toLowerCase();
}

/** A number from a text cell, or an error message naming the column. */
export function readNumber(cell: string | undefined, column: string): number | string {
  if (cell === undefined || cell.trim() === '') return `missing value in column ${column}`;
  const t = cell.trim();
  // Number('') is 0 and Number('0x10') is 16: accept only decimal notation
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t)) return `column ${column} holds "${t.length > 30 ? `${t.slice(0, 30)}…` : t}", not a number`;
  const v = Number(t);
  return Number.isFinite(v) ? v : `column ${column} holds a number too large to use`;
}

export function checkRows(parsed: ParsedRows, ctx: ImportContext): { sites: Site[]; errors: ImportIssue[] } {
  const errors = [...parsed.errors];
  const sites: Site[] = [];
  const idLine = new Map<string, number>();
  const pointLine = new Map<string, { line: number; id: string }>();
  const { center, halfExtentsNm: half } = ctx.domain;
  const a = ctx.latticeConstantNm;
  for (const row of parsed.rows) {
    const rowErrors: string[] = [];
    const species = normaliseSymbol(row.species);
    if (!(SPECIES as readonly string[]).includes(species)) {
      rowErrors.push(`unknown species "${row.species}"; Tetrawell reads ${SPECIES.join(', ')}`);
    }
    const candidate: Record<string, unknown> = { id: row.id, species, position: row.position, electrons: row.electrons };
    if (row.cluster !== undefined && row.cluster !== '') candidate.cluster = row.cluster;
    if (row.orbital !== undefined) candidate.orbital = row.orbital;
    const parsedSite = siteSchema.safeParse(candidate, { error: plainIssueMessage });
    if (!parsedSite.success) {
      for (const i of parsedSite.error.issues) if (i.path[0] !== 'species') rowErrors.push(`${formatPath(i.path)} ${i.message}`);
    }
    if (rowErrors.length || !parsedSite.success) {
      for (const m of rowErrors) errors.push({ line: row.line, message: m });
      continue;
    }
    const site = parsedSite.data;
    const firstId = idLine.get(site.id);
    if (firstId !== undefined) {
      errors.push({ line: row.line, message: `repeats the id "${site.id}" of line ${firstId}; every site needs its own id` });
      continue;
    }
    let clearance = Infinity;
    for (let k = 0; k < 3; k++) clearance = Math.min(clearance, half[k] - Math.abs(site.position[k] - center[k]));
    if (!(clearance > 0)) {
      errors.push({
        line: row.line,
        message: `site "${site.id}" at (${site.position.map((x) => x.toPrecision(6)).join(', ')}) nm lies outside the domain box (centre (${center.join(', ')}) nm, half-extents ${half.join(' × ')} nm) or on its face`,
      });
      continue;
    }
    const ix = snapToLattice(site.position, a);
    const key = ix.join(',');
    const other = pointLine.get(key);
    if (other) {
      errors.push({ line: row.line, message: `site "${site.id}" takes the same lattice point as "${other.id}" on line ${other.line} (indices ${ix.join(', ')} in units of a/4)` });
      continue;
    }
    idLine.set(site.id, row.line);
    pointLine.set(key, { line: row.line, id: site.id });
    sites.push(site);
  }
  errors.sort((x, y) => x.line - y.line);
  return { sites, errors };
}
