/**
 * CSV of sites (RFC 4180 quoting, parsed and written with papaparse).
 *
 *   id,species,x_nm,y_nm,z_nm,electrons,cluster
 *   p1,P,-2.172408204,-2.172408204,0,1,
 *
 * A header row names the columns, in any order and any letter case; `id`, `species`, `x_nm`,
 * `y_nm`, `z_nm` are required, `electrons` (0, 1 or 2; default 1) and `cluster` are optional.
 * The delimiter is detected (comma, semicolon, tab or bar). Blank lines are skipped. Positions
 * are in nm. Orbital overrides are not carried by CSV (use the design JSON for those).
 */
import Papa from 'papaparse';
import { readNumber, type ImportIssue, type ImportRow, type ParsedRows, type Site } from './rows';

export const CSV_REQUIRED = ['id', 'species', 'x_nm', 'y_nm', 'z_nm'] as const;
export const CSV_OPTIONAL = ['electrons', 'cluster'] as const;

export function parseCsv(text: string): ParsedRows {
  const rows: ImportRow[] = [];
  const errors: ImportIssue[] = [];
  let rowCount = 0;
  // line numbers: papaparse gives the cursor after each row; count the newlines before its start
  let start = 0;
  let line = 1;
  let lineAt = 0;
  const lineOf = (offset: number) => {
    for (; lineAt < offset; lineAt++) if (text.charCodeAt(lineAt) === 10) line++;
    return line;
  };
  let header: Map<string, number> | null = null;
  let headerBad = false;
  Papa.parse<string[]>(text, {
    skipEmptyLines: false,
    step(result) {
      const rowStart = start;
      start = result.meta.cursor;
      const cells = result.data;
      const at = lineOf(rowStart);
      if (cells.length === 1 && cells[0].trim() === '') return; // blank line
      if (!header) {
        header = new Map(cells.map((c, i) => [c.trim().toLowerCase(), i]));
        const missing = CSV_REQUIRED.filter((c) => !header!.has(c));
        if (missing.length) {
          headerBad = true;
          errors.push({ line: at, message: `the header row lacks the column(s) ${missing.join(', ')}; a CSV needs a header row naming ${CSV_REQUIRED.join(', ')} (optional: ${CSV_OPTIONAL.join(', ')})` });
        }
        const unknown = [...header.keys()].filter((c) => c !== '' && !(CSV_REQUIRED as readonly string[]).includes(c) && !(CSV_OPTIONAL as readonly string[]).includes(c));
        if (unknown.length) errors.push({ line: at, message: `column(s) ${unknown.join(', ')} are not read; Tetrawell reads ${[...CSV_REQUIRED, ...CSV_OPTIONAL].join(', ')}` });
        return;
      }
      rowCount++;
      if (headerBad) return;
      for (const e of result.errors) errors.push({ line: at, message: `the row is not well-formed CSV (${e.message})` });
      if (result.errors.length) return;
      const h = header;
      const cell = (name: string) => {
        const i = h.get(name);
        return i === undefined ? undefined : cells[i];
      };
      const problems: string[] = [];
      for (const c of ['id', 'species'] as const) if ((cell(c) ?? '').trim() === '') problems.push(`missing value in column ${c}`);
      const xyz = (['x_nm', 'y_nm', 'z_nm'] as const).map((c) => readNumber(cell(c), c));
      for (const v of xyz) if (typeof v === 'string') problems.push(v);
      let electrons = 1;
      const ecell = cell('electrons');
      if (ecell !== undefined && ecell.trim() !== '') {
        const e = readNumber(ecell, 'electrons');
        if (typeof e === 'string') problems.push(e);
        else electrons = e;
      }
      if (problems.length) {
        for (const m of problems) errors.push({ line: at, message: m });
        return;
      }
      const row: ImportRow = { line: at, id: cell('id')!.trim(), species: cell('species')!.trim(), position: xyz as [number, number, number], electrons };
      const cl = cell('cluster')?.trim();
      if (cl) row.cluster = cl;
      rows.push(row);
    },
  });
  if (!header) errors.push({ line: 1, message: `the file is empty; a CSV needs a header row naming ${CSV_REQUIRED.join(', ')}` });
  return { rows, errors, rowCount };
}

export function writeCsv(sites: readonly Site[]): string {
  const hasCluster = sites.some((s) => s.cluster !== undefined);
  const fields = ['id', 'species', 'x_nm', 'y_nm', 'z_nm', 'electrons', ...(hasCluster ? ['cluster'] : [])];
  // String(number) is the shortest decimal that reads back to the same double (ECMA-262 Number::toString)
  const data = sites.map((s) => [s.id, s.species, String(s.position[0]), String(s.position[1]), String(s.position[2]), String(s.electrons), ...(hasCluster ? [s.cluster ?? ''] : [])]);
  return `${Papa.unparse({ fields, data }, { newline: '\n' })}\n`;
}
