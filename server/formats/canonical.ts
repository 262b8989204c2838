/**
 * Canonical JSON of a design document: the text its sha256 is taken of.
 *
 *   - object keys sorted (JavaScript's default sort: by UTF-16 code unit), recursively;
 *   - array order kept;
 *   - no whitespace between tokens;
 *   - strings and numbers written exactly as JSON.stringify writes them (numbers in the
 *     shortest form that reads back to the same double, ECMA-262 Number::toString);
 *   - object members whose value is undefined are left out, as JSON.stringify does.
 *
 * The definition is part of the stored data (design_versions.sha256): never change it.
 * Pure: no node:* imports, so the CLI, workers and the browser can use it.
 */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') {
    const s = JSON.stringify(value);
    // JSON.stringify gives undefined for undefined/functions; at the top level that is an error
    if (s === undefined) throw new TypeError('canonicalJson: value has no JSON form');
    return s;
  }
  if (Array.isArray(value)) {
    // like JSON.stringify: holes and undefined become null inside arrays
    return `[${value.map((v) => (v === undefined ? 'null' : canonicalJson(v))).join(',')}]`;
  }
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj).filter((k) => obj[k] !== undefined).sort();
  return `{${keys.map((k) => `${JSON.stringify(k)}:${canonicalJson(obj[k])}`).join(',')}}`;
}
