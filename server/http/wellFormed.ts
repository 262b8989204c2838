/**
 * Refuses text PostgreSQL cannot store faithfully, for every route at once (present and future):
 *
 * - a lone UTF-16 surrogate (U+D800–U+DFFF without its partner, e.g. JSON "\ud800"): it has no UTF-8
 *   encoding (Unicode 15, §3.9 D92), so a text column fails with a driver error (500) and jsonb turns it into
 *   U+FFFD silently. Answered 422 `validation_failed` naming each field (first few found).
 * - U+0000 (NUL): "the character with code zero cannot be stored" (PostgreSQL docs, character types).
 *   Answered 400 `bad_request`, as the JSON parser used to.
 *
 * One iterative walk over the parsed body and query string, object keys included (keys land in
 * jsonb too). It replaced a JSON.parse reviver, which cost a function call per value of a 100,000-site design.
 */
import type { RequestHandler } from 'express';
import { sendError } from './errors';
import type { FieldIssue } from '../services/errors';

export interface TextProblem {
  path: (string | number)[];
  kind: 'lone_surrogate' | 'nul';
}

/** Lone surrogates: `isWellFormed` is ES2024 (Node ≥ 20); the regular expression is the fallback. */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;
const wellFormed: (s: string) => boolean =
  typeof (String.prototype as { isWellFormed?: unknown }).isWellFormed === 'function'
    ? (s) => (s as unknown as { isWellFormed(): boolean }).isWellFormed()
    : (s) => !LONE_SURROGATE.test(s);

function check(s: string): TextProblem['kind'] | null {
  if (!wellFormed(s)) return 'lone_surrogate';
  if (s.includes('\u0000')) return 'nul';
  return null;
}

/** Up to `max` problems in `value` (strings, arrays, plain objects and their keys), in document order. */
export function findTextProblems(value: unknown, rootPath: (string | number)[] = [], max = 5): TextProblem[] {
  const out: TextProblem[] = [];
  const stack: { v: unknown; path: (string | number)[] }[] = [{ v: value, path: rootPath }];
  while (stack.length > 0 && out.length < max) {
    const { v, path } = stack.pop()!;
    if (typeof v === 'string') {
      const kind = check(v);
      if (kind) out.push({ path, kind });
    } else if (Array.isArray(v)) {
      // pushed in reverse so they pop in document order
      for (let i = v.length - 1; i >= 0; i--) {
        const item = v[i];
        if (typeof item === 'string' || (item !== null && typeof item === 'object')) stack.push({ v: item, path: [...path, i] });
      }
    } else if (v !== null && typeof v === 'object') {
      const keys = Object.keys(v);
      for (let k = keys.length - 1; k >= 0; k--) {
        const key = keys[k];
        const item = (v as Record<string, unknown>)[key];
        if (typeof item === 'string' || (item !== null && typeof item === 'object')) stack.push({ v: item, path: [...path, key] });
        const kind = check(key);
        if (kind) stack.push({ v: key, path: [...path, key] });
      }
    }
  }
  return out;
}

const MESSAGE: Record<TextProblem['kind'], string> = {
  lone_surrogate: 'holds a broken character (half of a UTF-16 surrogate pair), which cannot be stored. Retype or paste the text again.',
  nul: 'holds a NUL character, which the server does not store.',
};

/** The answer for found problems: 400 for NUL, 422 naming the fields for lone surrogates (shared with the worker). */
export function textProblemsAnswer(problems: TextProblem[]): { code: 'bad_request' | 'validation_failed'; message: string; details?: FieldIssue[] } {
  if (problems.some((p) => p.kind === 'nul')) {
    return { code: 'bad_request', message: 'The request body is not valid JSON (or holds a NUL character, which the server does not store).' };
  }
  return {
    code: 'validation_failed',
    message: 'Some text holds a broken character (a lone UTF-16 surrogate) and was not saved.',
    details: problems.map((p) => ({ path: p.path, message: `This text ${MESSAGE[p.kind]}` })),
  };
}

/** After body parsing: 400 for NUL, 422 naming the fields for lone surrogates; otherwise on to the routes. */
export const refuseUnstorableText: RequestHandler = (req, res, next) => {
  const problems = [
    // a Buffer is a large body kept raw for an off-thread parser, which checks it there
    ...(Buffer.isBuffer(req.body) ? [] : findTextProblems(req.body)),
    ...findTextProblems(req.query, ['query']),
    // route parameters need no walk: Express decodes them as UTF-8, and the UTF-8 form of a lone surrogate
    // (%ED%A0%80) is invalid, so such a path is refused with 400 before any route runs
  ];
  if (problems.length === 0) return next();
  const a = textProblemsAnswer(problems);
  sendError(res, a.code, a.message, a.details);
};
