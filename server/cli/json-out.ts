/**
 * `--json` output of large results without building the whole text or an array of row objects:
 * the same characters as `console.log(JSON.stringify(value, null, 2))`, written in pieces of about
 * a megabyte as it goes. Rows (`Rows`) are made one at a time and dropped once written.
 *
 * Mirrors JSON.stringify for plain data (ECMA-262 §25.5.2, SerializeJSONProperty): strings and
 * object keys through JSON.stringify itself (same escapes), numbers as JSON.stringify writes
 * them (non-finite → null), undefined and functions left out of objects and null in arrays,
 * `toJSON` honoured, empty arrays and objects as [] and {}. tests/server/cli/jsonOut.test.ts
 * compares it with JSON.stringify.
 */

/** An array whose entries are made when written: printed exactly as the array of its rows. */
export class Rows<T> {
  constructor(
    readonly length: number,
    readonly at: (index: number) => T,
  ) {}
}

const INDENT = '  ';

/**
 * Writes the text of JSON.stringify(value, null, 2) followed by a newline, through `emit`, which
 * receives pieces that each end where the text has a line break (left out: emit adds it, as
 * console.log does). Pieces are cut once they pass `pieceChars`.
 */
export function writePrettyJson(value: unknown, emit: (piece: string) => void, pieceChars = 1 << 20): void {
  let buf = '';
  const indents: string[] = [''];
  const indentOf = (depth: number) => {
    while (indents.length <= depth) indents.push(indents[indents.length - 1] + INDENT);
    return indents[depth];
  };
  // a line break: the piece goes out here once it is long enough
  const newline = (depth: number) => {
    if (buf.length >= pieceChars) {
      emit(buf);
      buf = indentOf(depth);
    } else buf += `\n${indentOf(depth)}`;
  };

  const scalar = (v: unknown): string | undefined => {
    switch (typeof v) {
      case 'string':
        return JSON.stringify(v);
      case 'number':
        return Number.isFinite(v) ? String(v) : 'null';
      case 'boolean':
        return v ? 'true' : 'false';
      case 'undefined':
      case 'function':
      case 'symbol':
        return undefined;
      case 'bigint':
        // what JSON.stringify does with a BigInt
        throw new TypeError('Do not know how to serialize a BigInt');
      default:
        return v === null ? 'null' : '';
    }
  };

  // a value's toJSON, called once, before anything else looks at it
  const resolve = (v: unknown, key: string): unknown =>
    v !== null && (typeof v === 'object' || typeof v === 'bigint') && typeof (v as { toJSON?: unknown }).toJSON === 'function'
      ? (v as { toJSON: (k: string) => unknown }).toJSON(key)
      : v;

  // writes v (already resolved); false when it has no JSON text (undefined, a function, a symbol)
  const write = (v: unknown, depth: number): boolean => {
    const s = scalar(v);
    if (s === undefined) return false;
    if (s !== '') {
      buf += s;
      return true;
    }
    if (v instanceof Number || v instanceof String || v instanceof Boolean) {
      buf += scalar(v.valueOf());
      return true;
    }
    if (Array.isArray(v) || v instanceof Rows) {
      const rows = v instanceof Rows ? v : null;
      const list = v as unknown[];
      const n = rows ? rows.length : list.length;
      if (n === 0) {
        buf += '[]';
        return true;
      }
      buf += '[';
      for (let i = 0; i < n; i++) {
        if (i > 0) buf += ',';
        newline(depth + 1);
        if (!write(resolve(rows ? rows.at(i) : list[i], String(i)), depth + 1)) buf += 'null';
      }
      newline(depth);
      buf += ']';
      return true;
    }
    const obj = v as Record<string, unknown>;
    let any = false;
    for (const k of Object.keys(obj)) {
      const item = resolve(obj[k], k);
      const t = typeof item;
      if (t === 'undefined' || t === 'function' || t === 'symbol') continue;
      buf += any ? ',' : '{';
      any = true;
      newline(depth + 1);
      buf += `${JSON.stringify(k)}: `;
      write(item, depth + 1);
    }
    buf += any ? '' : '{';
    if (any) newline(depth);
    buf += '}';
    return true;
  };

  if (!write(resolve(value, ''), 0)) buf += 'undefined';
  emit(buf);
}
