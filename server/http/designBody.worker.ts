/**
 * Worker-thread side of large design saves (issue 8, item 7): JSON.parse, the unstorable-text check and the zod
 * contract of a design update body, off the request thread. A 100,000-site document is ~17 MB of JSON; parsing
 * and validating it took seconds of main-thread time on the 2-core test machine, during which /api/health and
 * every other request waited. The answer is the validated design as JSON text (a string is copied in one block,
 * unlike an object graph, whose structured-clone deserialisation costs as much as JSON.parse) plus the few
 * fields the service needs.
 *
 * Imports only the contracts (zod) and the small text check: nothing here touches the database.
 */
import { projectDesignUpdateBodySchema } from '../contracts/api';
import { issuesToDetails, type FieldIssue } from '../services/errors';
import { findTextProblems, textProblemsAnswer } from './wellFormed';

export interface DesignBodyTask {
  bytes: Uint8Array;
}

export type DesignBodyResult =
  | { ok: true; json: string; name: string; siteCount: number; version: number }
  | { ok: false; code: 'bad_request' | 'validation_failed'; message: string; details?: FieldIssue[] };

const BAD_JSON = 'The request body is not valid JSON (or holds a NUL character, which the server does not store).';

export function parseDesignUpdate(bytes: Uint8Array): DesignBodyResult {
  // body-parser's JSON reader also drops a leading byte-order mark and decodes UTF-8
  let text = new TextDecoder('utf-8').decode(bytes);
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch {
    return { ok: false, code: 'bad_request', message: BAD_JSON };
  }
  const problems = findTextProblems(body);
  if (problems.length > 0) return { ok: false, ...textProblemsAnswer(problems) };
  const r = projectDesignUpdateBodySchema.safeParse(body);
  if (!r.success) return { ok: false, code: 'validation_failed', message: 'Some fields of the design need attention.', details: issuesToDetails(r.error.issues) };
  return { ok: true, json: JSON.stringify(r.data.design), name: r.data.design.name, siteCount: r.data.design.sites.length, version: r.data.version };
}

export default function run(task: DesignBodyTask): DesignBodyResult {
  return parseDesignUpdate(task.bytes);
}
