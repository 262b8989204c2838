/**
 * The placement list: Tetrawell's own plain-text format for handing a design's donor positions
 * to fabrication (documented in README.md, "Placement list").
 *
 *   # tetrawell-placement 1
 *   # design: Six-donor chain
 *   # lattice-constant-nm: 0.5431020511
 *   # origin-nm: 0 0 0
 *   # axes: x [100], y [010], z [001]
 *   # index-unit: a/4
 *   # … (explanatory comment lines)
 *   # columns: id species electrons i j k x_nm y_nm z_nm offset_nm
 *   c1 P 1 -36 0 0 -4.8879184599 0 0 0
 *
 * i j k are integer indices of a diamond-lattice site in units of a/4, counted from the origin
 * along the axes: position = origin + (i, j, k)·a/4. x_nm y_nm z_nm are the exact positions.
 * A site that is not on the lattice (free placement) keeps its exact nm position; its indices
 * name the NEAREST lattice point and offset_nm says how far that point is (0 on the lattice).
 * Reading: the nm columns are the position when present; a line of only six columns
 * (id species electrons i j k) places the site on the lattice point. Indices that are not a
 * lattice site, or that are not the lattice point nearest to the nm position, are errors.
 * Ids containing spaces, quotes or a leading # are written as JSON strings ("my id").
 */
import { isLatticeSite, snapToLattice } from '../../geometry/lattice';
import { readNumber, type ImportIssue, type ImportRow, type ParsedRows, type Site } from './rows';

export const PLACEMENT_MARKER = '# tetrawell-placement 1';
export const PLACEMENT_AXES = 'x [100], y [010], z [001]';
export const PLACEMENT_COLUMNS = 'id species electrons i j k x_nm y_nm z_nm offset_nm';

/** Split a data line into tokens; "…" tokens are JSON strings. Null when a quote is unterminated. */
export function tokens(line: string): string[] | null {
  const out: string[] = [];
  let i = 0;
  while (i < line.length) {
    while (i < line.length && /\s/.test(line[i])) i++;
    if (i >= line.length) break;
    if (line[i] === '"') {
      let j = i + 1;
      while (j < line.length && line[j] !== '"') j += line[j] === '\\' ? 2 : 1;
      if (j >= line.length) return null;
      try {
        out.push(JSON.parse(line.slice(i, j + 1)) as string);
      } catch {
        return null;
      }
      i = j + 1;
    } else {
      let j = i;
      while (j < line.length && !/\s/.test(line[j])) j++;
      out.push(line.slice(i, j));
      i = j;
    }
  }
  return out;
}

const bareId = (id: string) => (/^[^\s"#][^\s"]*$/.test(id) ? id : JSON.stringify(id));

export function writePlacement(sites: readonly Site[], opts: { name: string; latticeConstantNm: number }): string {
  const a = opts.latticeConstantNm;
  const q = a / 4;
  const out = [
    PLACEMENT_MARKER,
    `# design: ${opts.name.replace(/[\r\n]+/g, ' ')}`,
    `# lattice-constant-nm: ${a}`,
    '# origin-nm: 0 0 0',
    `# axes: ${PLACEMENT_AXES}`,
    '# index-unit: a/4',
    '# Silicon diamond lattice, crystal axes along x, y, z. Integer indices i j k in units of a/4: position = origin + (i, j, k) * a/4.',
    '# Lattice sites: i, j, k all even with i+j+k = 0 (mod 4), or all odd with i+j+k = 3 (mod 4).',
    '# x_nm y_nm z_nm are the exact positions in nm. A site off the lattice keeps its exact position; its i j k name the nearest',
    '# lattice point and offset_nm is the distance (nm) from that point (0 for a site on the lattice).',
    '# Positions are model inputs: confirm them against your own validated placement methods before fabrication.',
    `# columns: ${PLACEMENT_COLUMNS}`,
  ];
  for (const s of sites) {
    const ix = snapToLattice(s.position, a);
    const off = Math.hypot(s.position[0] - ix[0] * q, s.position[1] - ix[1] * q, s.position[2] - ix[2] * q);
    out.push([bareId(s.id), s.species, s.electrons, ix[0], ix[1], ix[2], s.position[0], s.position[1], s.position[2], off].map(String).join(' '));
  }
  return `${out.join('\n')}\n`;
}

/** Does the text start like a placement list (for sniffing)? */
export function looksLikePlacement(text: string): boolean {
  return text.trimStart().startsWith(PLACEMENT_MARKER);
}

export function parsePlacement(text: string): ParsedRows {
  const lines = text.split('\n');
  const rows: ImportRow[] = [];
  const errors: ImportIssue[] = [];
  let rowCount = 0;
  let a: number | null = null;
  let origin: [number, number, number] = [0, 0, 0];
  let sawMarker = false;
  let headerFailed = false;
  for (let n = 0; n < lines.length; n++) {
    const at = n + 1;
    const line = lines[n].trim();
    if (line === '') continue;
    if (line.startsWith('#')) {
      if (line === PLACEMENT_MARKER) sawMarker = true;
      const m = /^#\s*([a-z-]+)\s*:\s*(.*)$/.exec(line);
      if (!m) continue;
      const [, key, value] = m;
      if (key === 'lattice-constant-nm') {
        const v = readNumber(value, 'lattice-constant-nm');
        if (typeof v === 'string' || !(v > 0 && v <= 10)) {
          errors.push({ line: at, message: `the lattice constant must be a number of nm between 0 and 10, not "${value}"` });
          headerFailed = true;
        } else a = v;
      } else if (key === 'origin-nm') {
        const parts = value.trim().split(/\s+/).map((p) => readNumber(p, 'origin-nm'));
        if (parts.length !== 3 || parts.some((p) => typeof p === 'string')) {
          errors.push({ line: at, message: `the origin must be three numbers in nm, not "${value}"` });
          headerFailed = true;
        } else origin = parts as [number, number, number];
      } else if (key === 'axes' && value.trim() !== PLACEMENT_AXES) {
        errors.push({ line: at, message: `only the axis convention "${PLACEMENT_AXES}" is read, not "${value.trim()}"` });
        headerFailed = true;
      } else if (key === 'index-unit' && value.trim() !== 'a/4') {
        errors.push({ line: at, message: `indices must be in units of a/4, not "${value.trim()}"` });
        headerFailed = true;
      }
      continue;
    }
    rowCount++;
    if (!sawMarker || a === null) {
      if (!headerFailed) errors.push({ line: at, message: `a placement list starts with the header lines "${PLACEMENT_MARKER}" and "# lattice-constant-nm: …" before any site` });
      headerFailed = true;
      continue;
    }
    if (headerFailed) continue;
    const t = tokens(line);
    if (!t) {
      errors.push({ line: at, message: 'a quoted id is not closed' });
      continue;
    }
    const names = ['id', 'species', 'electrons', 'i', 'j', 'k', 'x_nm', 'y_nm', 'z_nm', 'offset_nm'];
    if (t.length < 6) {
      errors.push({ line: at, message: `missing column(s) ${names.slice(t.length, 6).join(', ')}; a site line is "${PLACEMENT_COLUMNS}" (the nm columns may be left out)` });
      continue;
    }
    if (t.length > 6 && t.length < 9) {
      errors.push({ line: at, message: `missing column(s) ${names.slice(t.length, 9).join(', ')}; give all three nm columns or none` });
      continue;
    }
    const problems: string[] = [];
    const nums = t.slice(2, Math.min(t.length, 9)).map((cell, k) => readNumber(cell, names[k + 2]));
    for (const v of nums) if (typeof v === 'string') problems.push(v);
    if (problems.length) {
      for (const m of problems) errors.push({ line: at, message: m });
      continue;
    }
    const v = nums as number[];
    const ix: [number, number, number] = [v[1], v[2], v[3]];
    if (!isLatticeSite(ix[0], ix[1], ix[2])) {
      errors.push({ line: at, message: `indices (${ix.join(', ')}) are not a diamond-lattice site (all even with sum ≡ 0 mod 4, or all odd with sum ≡ 3 mod 4)` });
      continue;
    }
    const q = a / 4;
    const onLattice: [number, number, number] = [origin[0] + ix[0] * q, origin[1] + ix[1] * q, origin[2] + ix[2] * q];
    let position = onLattice;
    if (t.length >= 9) {
      position = [v[4], v[5], v[6]];
      const nearest = snapToLattice([position[0] - origin[0], position[1] - origin[1], position[2] - origin[2]], a);
      if (nearest.some((x, k) => x !== ix[k])) {
        errors.push({ line: at, message: `the indices (${ix.join(', ')}) and the position disagree: the lattice point nearest to the position has indices (${nearest.join(', ')})` });
        continue;
      }
    }
    rows.push({ line: at, id: t[0], species: t[1], electrons: v[0], position });
  }
  if (!sawMarker && !headerFailed) errors.push({ line: 1, message: `the file does not start with "${PLACEMENT_MARKER}"` });
  return { rows, errors, rowCount };
}
