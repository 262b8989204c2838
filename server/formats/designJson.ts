/**
 * Sites from a JSON file: a Tetrawell design document (its `sites`), any object with a `sites`
 * list, or a bare list of sites. Each site is reported with the line its object starts on.
 *
 * JSON.parse reads the values; a small scanner (strings, escapes and nesting only) finds where
 * each element of the sites list starts, since JSON.parse keeps no positions.
 */
import type { ImportIssue, ImportRow, ParsedRows } from './rows';

/** Offsets where the elements of the site list begin: top-level array, or the top-level object's "sites" array. */
export function siteOffsets(text: string): number[] {
  const out: number[] = [];
  const stack: ('{' | '[')[] = [];
  let sitesDepth = -1; // stack depth inside the sites array
  let lastString = '';
  let expectValue = false; // at sitesDepth, the next non-space char starts an element
  let pendingSitesKey = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === ' ' || c === '\n' || c === '\t' || c === '\r') continue;
    if (expectValue && stack.length === sitesDepth && c !== ']') {
      out.push(i);
      expectValue = false;
    }
    if (c === '"') {
      let j = i + 1;
      while (j < text.length && text[j] !== '"') j += text[j] === '\\' ? 2 : 1;
      lastString = text.slice(i + 1, j);
      i = j;
      continue;
    }
    if (c === ':') {
      pendingSitesKey = stack.length === 1 && stack[0] === '{' && lastString === 'sites';
      continue;
    }
    if (c === '{' || c === '[') {
      stack.push(c);
      if (c === '[' && sitesDepth < 0 && (pendingSitesKey || stack.length === 1)) {
        sitesDepth = stack.length;
        expectValue = true;
      }
      pendingSitesKey = false;
      continue;
    }
    if (c === '}' || c === ']') {
      if (stack.length === sitesDepth && c === ']') {
        // close of the sites array: stop looking
        return out;
      }
      stack.pop();
      continue;
    }
    if (c === ',' && stack.length === sitesDepth) expectValue = true;
    pendingSitesKey = false;
  }
  return out;
}

/**
 * Offset of the first JSON syntax error (RFC 8259 grammar), for a line number in the message:
 * V8's JSON.parse messages do not always carry a position. Iterative, so deep nesting cannot
 * overflow the stack.
 */
export function jsonErrorOffset(text: string): number {
  let i = 0;
  const ws = () => {
    while (i < text.length && (text[i] === ' ' || text[i] === '\n' || text[i] === '\t' || text[i] === '\r')) i++;
  };
  const stack: string[] = [];
  // states: 'value' expects a value; 'after' expects , or a closer; 'key' expects a string key (or } right after {)
  let state: 'value' | 'after' | 'key' | 'key-or-close' | 'value-or-close' = 'value';
  for (;;) {
    ws();
    if (i >= text.length) return stack.length || state !== 'after' ? i : -1;
    const c = text[i];
    if (state === 'after') {
      if (stack.length === 0) return i; // trailing content
      if (c === ',') {
        i++;
        state = stack[stack.length - 1] === '{' ? 'key' : 'value';
      } else if ((c === '}' && stack[stack.length - 1] === '{') || (c === ']' && stack[stack.length - 1] === '[')) {
        i++;
        stack.pop();
      } else return i;
      continue;
    }
    if (state === 'key' || state === 'key-or-close') {
      if (c === '}' && state === 'key-or-close') {
        i++;
        stack.pop();
        state = 'after';
        continue;
      }
      if (c !== '"') return i;
      const end = stringEnd(text, i);
      if (end < 0) return i;
      i = end;
      ws();
      if (text[i] !== ':') return i;
      i++;
      state = 'value';
      continue;
    }
    // a value
    if (c === ']' && state === 'value-or-close') {
      i++;
      stack.pop();
      state = 'after';
      continue;
    }
    if (c === '{') {
      stack.push('{');
      i++;
      state = 'key-or-close';
    } else if (c === '[') {
      stack.push('[');
      i++;
      state = 'value-or-close';
    } else if (c === '"') {
      const end = stringEnd(text, i);
      if (end < 0) return i;
      i = end;
      state = 'after';
    } else {
      const m = /^(-?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?|true|false|null)/.exec(text.slice(i, i + 400));
      if (!m) return i;
      i += m[0].length;
      state = 'after';
    }
  }
}

/** Index just past the closing quote of the string starting at `start`, or −1. */
function stringEnd(text: string, start: number): number {
  let j = start + 1;
  while (j < text.length) {
    const ch = text.charCodeAt(j);
    if (ch === 34) return j + 1;
    if (ch < 32) return -1;
    j += ch === 92 ? 2 : 1;
  }
  return -1;
}

function lineAt(text: string, offset: number): number {
  let line = 1;
  for (let i = 0; i < offset && i < text.length; i++) if (text.charCodeAt(i) === 10) line++;
  return line;
}

export function parseDesignJson(text: string): ParsedRows {
  const errors: ImportIssue[] = [];
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    const off = jsonErrorOffset(text);
    const line = lineAt(text, Math.max(0, off));
    return { rows: [], errors: [{ line, message: `the file is not valid JSON (${(e as Error).message.split('\n')[0].slice(0, 120)}); the first error is on line ${line}` }], rowCount: 0 };
  }
  const list = Array.isArray(value) ? value : value && typeof value === 'object' ? (value as { sites?: unknown }).sites : undefined;
  if (!Array.isArray(list)) {
    return { rows: [], errors: [{ line: 1, message: 'a design JSON needs a "sites" list (a Tetrawell design document), or the file must be a list of sites' }], rowCount: 0 };
  }
  const offsets = siteOffsets(text);
  // line starts, once, for the element offsets (in increasing order)
  const lines: number[] = [];
  let line = 1;
  let at = 0;
  for (const off of offsets) {
    for (; at < off; at++) if (text.charCodeAt(at) === 10) line++;
    lines.push(line);
  }
  const rows: ImportRow[] = [];
  list.forEach((s: unknown, i) => {
    const ln = lines[i] ?? 1;
    if (!s || typeof s !== 'object' || Array.isArray(s)) {
      errors.push({ line: ln, message: `site ${i} must be an object with id, species, position and electrons` });
      return;
    }
    const o = s as Record<string, unknown>;
    const missing = ['id', 'species', 'position'].filter((k) => o[k] === undefined);
    if (missing.length) {
      errors.push({ line: ln, message: `site ${i} lacks ${missing.join(', ')}` });
      return;
    }
    const p = o.position;
    if (!Array.isArray(p) || p.length !== 3 || p.some((x) => typeof x !== 'number' || !Number.isFinite(x))) {
      errors.push({ line: ln, message: `site ${i}: position must be a list of three numbers in nm, not ${JSON.stringify(p).slice(0, 40)}` });
      return;
    }
    if (typeof o.id !== 'string' || typeof o.species !== 'string') {
      errors.push({ line: ln, message: `site ${i}: id and species must be text` });
      return;
    }
    const electrons = o.electrons === undefined ? 1 : o.electrons;
    if (typeof electrons !== 'number') {
      errors.push({ line: ln, message: `site ${i}: electrons must be 0, 1 or 2, not ${JSON.stringify(electrons)}` });
      return;
    }
    const row: ImportRow = { line: ln, id: o.id, species: o.species, position: [p[0], p[1], p[2]], electrons };
    if (typeof o.cluster === 'string') row.cluster = o.cluster;
    if (o.orbital !== undefined) row.orbital = o.orbital;
    rows.push(row);
  });
  return { rows, errors, rowCount: list.length };
}
