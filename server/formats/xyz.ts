/**
 * XYZ files (the common plain-text molecule format):
 *
 *   3                                   ← number of atoms
 *   comment line (anything)
 *   P   -21.72408204  0.0  0.0          ← symbol x y z, in ångström
 *   ...
 *
 * Positions are converted to nm (1 Å = 0.1 nm, exact by definition of the ångström). Site ids are
 * made from the symbol and the atom's place in the file (P1, As2, …): XYZ has no ids. Columns
 * after z (charges, forces) are ignored. Only the first frame of a multi-frame file is read; a
 * further frame is reported. Written as the shortest decimal of x·10 (Å); reading back divides by 10,
 * so a round trip may differ from the stored nm value in the last bit (≲ 1e-16 relative).
 */
import { normaliseSymbol, readNumber, type ImportIssue, type ImportRow, type ParsedRows, type Site } from './rows';

/** ångström per nm (1 Å = 10⁻¹⁰ m, 1 nm = 10⁻⁹ m: SI Brochure, 9th ed.) */
export const ANGSTROM_PER_NM = 10;

export function parseXyz(text: string): ParsedRows {
  const lines = text.split('\n');
  const rows: ImportRow[] = [];
  const errors: ImportIssue[] = [];
  // leading blank lines are tolerated; the count line is the first non-blank one
  let first = 0;
  while (first < lines.length && lines[first].trim() === '') first++;
  const countText = (lines[first] ?? '').trim().split(/\s+/)[0] ?? '';
  if (!/^\d+$/.test(countText)) {
    errors.push({ line: first + 1, message: `the first line of an XYZ file gives the number of atoms; it holds "${countText.slice(0, 30)}"` });
    return { rows, errors, rowCount: 0 };
  }
  const count = Number(countText);
  let seen = 0;
  let rowCount = 0;
  let i = first + 2; // skip the comment line
  for (; i < lines.length && seen < count; i++) {
    const raw = lines[i].trim();
    if (raw === '') continue;
    seen++;
    rowCount++;
    const at = i + 1;
    const parts = raw.split(/\s+/);
    if (parts.length < 4) {
      errors.push({ line: at, message: `an atom line needs a symbol and x y z in ångström; this one has ${parts.length} column(s) (missing ${['symbol', 'x', 'y', 'z'].slice(parts.length).join(', ')})` });
      continue;
    }
    const xyz = [1, 2, 3].map((k) => readNumber(parts[k], ['x', 'y', 'z'][k - 1]));
    const bad = xyz.filter((v): v is string => typeof v === 'string');
    if (bad.length) {
      for (const m of bad) errors.push({ line: at, message: m });
      continue;
    }
    const symbol = normaliseSymbol(parts[0]);
    rows.push({ line: at, id: `${symbol}${seen}`, species: parts[0], position: (xyz as number[]).map((v) => v / ANGSTROM_PER_NM) as [number, number, number], electrons: 1 });
  }
  if (seen < count) errors.push({ line: first + 1, message: `the file announces ${count} atoms but holds ${seen} atom line(s)` });
  for (; i < lines.length; i++) {
    if (lines[i].trim() !== '') {
      errors.push({ line: i + 1, message: `the file goes on after the ${count} announced atoms (a second frame?); only the first frame is read` });
      break;
    }
  }
  return { rows, errors, rowCount };
}

export function writeXyz(sites: readonly Site[], comment: string): string {
  const out = [String(sites.length), comment.replace(/[\r\n]+/g, ' ')];
  for (const s of sites) out.push(`${s.species} ${s.position.map((x) => String(x * ANGSTROM_PER_NM)).join(' ')}`);
  return `${out.join('\n')}\n`;
}
