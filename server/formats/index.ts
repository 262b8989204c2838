/**
 * Site file formats: CSV, XYZ, the placement list and design JSON, each a pair of pure
 * functions (parse text → rows with line numbers; write sites → text), plus format detection
 * and the whole import pipeline used by `POST …/designs/:designId/imports`.
 *
 *   bytes ─► decodeText (UTF-8, no NUL) ─► detectFormat (extension, else content) ─► parse…
 *         ─► row limit ─► checkRows (contract, duplicate ids, domain box, one site per lattice point)
 */
import { MAX_SITES } from '@contracts/design';
import { decodeText } from './text';
import { parseCsv } from './csv';
import { parseXyz } from './xyz';
import { looksLikePlacement, parsePlacement } from './placement';
import { parseDesignJson } from './designJson';
import { checkRows, type ImportContext, type ImportIssue, type ParsedRows, type Site } from './rows';

export { canonicalJson } from './canonical';
export { decodeText } from './text';
export { parseCsv, writeCsv } from './csv';
export { parseXyz, writeXyz } from './xyz';
export { parsePlacement, writePlacement } from './placement';
export { jsonErrorOffset, parseDesignJson } from './designJson';
export { checkRows } from './rows';
export type { ImportContext, ImportIssue, ImportRow, ParsedRows, Site } from './rows';

export type ImportFormat = 'csv' | 'xyz' | 'placement' | 'json';

/** The format named by the file name's extension, else sniffed from the text; null when neither tells. */
export function detectFormat(fileName: string, text: string): ImportFormat | null {
  const name = fileName.toLowerCase();
  if (name.endsWith('.placement.txt') || name.endsWith('.placement')) return 'placement';
  if (name.endsWith('.csv')) return 'csv';
  if (name.endsWith('.xyz')) return 'xyz';
  if (name.endsWith('.json')) return 'json';
  // content sniffing: the first non-blank characters
  const head = text.trimStart();
  if (head.startsWith('{') || head.startsWith('[')) return 'json';
  if (looksLikePlacement(head)) return 'placement';
  const firstLine = head.split('\n', 1)[0]?.trim() ?? '';
  if (/^\d+$/.test(firstLine)) return 'xyz';
  if (/(^|[,;\t|])\s*"?x_nm"?\s*([,;\t|]|$)/i.test(firstLine)) return 'csv';
  return null;
}

const PARSERS: Record<ImportFormat, (text: string) => ParsedRows> = { csv: parseCsv, xyz: parseXyz, placement: parsePlacement, json: parseDesignJson };

/** Why a file is refused as a whole (the HTTP layer answers 422 with the message). */
export class ImportRefused extends Error {
  constructor(
    readonly reason: 'not_text' | 'unknown_format' | 'too_many_rows',
    message: string,
  ) {
    super(message);
    this.name = 'ImportRefused';
  }
}

export interface ImportResult {
  format: ImportFormat;
  sites: Site[];
  errors: ImportIssue[];
}

/** Read a whole uploaded file; throws ImportRefused for files that cannot be read at all. */
export function importSites(bytes: Uint8Array, fileName: string, ctx: ImportContext): ImportResult {
  const decoded = decodeText(bytes);
  if (!decoded.ok) throw new ImportRefused('not_text', decoded.message);
  const format = detectFormat(fileName, decoded.text);
  if (!format) {
    throw new ImportRefused(
      'unknown_format',
      'Tetrawell cannot tell what format this file is. It reads CSV with a header row (id, species, x_nm, y_nm, z_nm), XYZ (atom count, comment, then symbol x y z in ångström), a placement list (.placement.txt) and a design JSON; name the file with its extension (.csv, .xyz, .placement.txt, .json).',
    );
  }
  const parsed = PARSERS[format](decoded.text);
  if (parsed.rowCount > MAX_SITES) {
    throw new ImportRefused('too_many_rows', `The file holds ${parsed.rowCount.toLocaleString('en-US')} sites; a design may hold at most ${MAX_SITES.toLocaleString('en-US')}. Split it into parts.`);
  }
  return { format, ...checkRows(parsed, ctx) };
}
