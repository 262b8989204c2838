/** Plain-text layout shared by the CLI commands' readable output. */

/** Columns padded to their widest cell: the first left-aligned, the rest right-aligned. */
export function table(rows: string[][]): string {
  const w: number[] = rows[0].map(() => 0);
  for (const r of rows) for (let c = 0; c < r.length; c++) if (r[c].length > w[c]) w[c] = r[c].length;
  return rows.map((r) => r.map((cell, c) => (c === 0 ? cell.padEnd(w[c]) : cell.padStart(w[c]))).join('  ')).join('\n');
}

/** The closing lines of every result: the solver's notes, then the model assumptions. */
export function notesAndAssumptions(notes: readonly string[], assumptions: readonly string[]): string[] {
  const out: string[] = [];
  if (notes.length) out.push('', 'notes:', ...notes.map((n) => `  - ${n}`));
  out.push('', 'Model assumptions:', ...assumptions.map((a) => `  - ${a}`));
  return out;
}
