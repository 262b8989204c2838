/**
 * Worker-thread side of large design bodies (issue 8, item 7): JSON.parse, the unstorable-text check, the zod
 * contract of a design create or save, and the figures stored beside the document (sha256 and the far-field
 * worst bound, server/workers/designFigures.ts), all off the request thread. A 100,000-site document is ~17 MB
 * of JSON; parsing and validating it took seconds of main-thread time on the 2-core test machine, during which
 * /api/health and every other request waited. The answer is the validated document as JSON text (a string is
 * copied in one block, unlike an object graph, whose structured-clone deserialisation costs as much as
 * JSON.parse) with the fields the repository writes.
 *
 * Nothing here touches the database.
 */
import { designCreateBodySchema, designUpdateBodySchema } from '../contracts/api';
import type { DesignDocument } from '../contracts/design';
import type { DesignWrite } from '../repositories/designs';
import { issuesToDetails, type FieldIssue } from '../services/errors';
import { computeFigures } from '../workers/designFigures';
import { findTextProblems, textProblemsAnswer } from './wellFormed';
import { lowerThreadPriority } from '../workers/lowPriority';

// requests and the database come first on a busy machine (server/workers/lowPriority.ts)
lowerThreadPriority();

/** `create`: POST …/designs ({ name, document? } or { name, copyOf }); `update`: PUT …/designs/:designId. */
export type DesignBodyKind = 'create' | 'update';

export interface DesignBodyTask {
  bytes: Uint8Array;
  kind: DesignBodyKind;
}

export type DesignBodyResult =
  /** a document body, validated and ready to write; `version` is the one the save names (update only) */
  | { ok: true; write: PreparedInWorker; version: number | null }
  /** a body without a document ({ name, copyOf } or { name }): small, handed back for the ordinary path */
  | { ok: true; body: unknown }
  | { ok: false; code: 'bad_request' | 'validation_failed'; message: string; details?: FieldIssue[] };

const BAD_JSON = 'The request body is not valid JSON (or holds a NUL character, which the server does not store).';

/** The shape the result has in the worker: the jsonb bytes as a Uint8Array (a Buffer arrives as one anyway). */
export type PreparedInWorker = Omit<DesignWrite, 'documentJsonb' | 'documentJson'> & { documentJsonb: Uint8Array };

/**
 * jsonb binary input: the version byte 1, then the UTF-8 JSON text (PostgreSQL, jsonb_recv). Encoded here, in the
 * worker, into one pre-sized buffer, so the request thread neither encodes nor copies the text.
 */
function jsonbBytes(text: string): Uint8Array {
  const out = new Uint8Array(1 + Buffer.byteLength(text, 'utf8'));
  out[0] = 1;
  new TextEncoder().encodeInto(text, out.subarray(1));
  return out;
}

function prepared(doc: DesignDocument, version: number | null): DesignBodyResult {
  const documentJson = JSON.stringify(doc);
  const { sha256, worstRelBound } = computeFigures(doc);
  return { ok: true, version, write: { name: doc.name, documentJsonb: jsonbBytes(documentJson), siteCount: doc.sites.length, sha256, worstRelBound } };
}

export function parseDesignBody(bytes: Uint8Array, kind: DesignBodyKind): DesignBodyResult {
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
  const invalid = (issues: Parameters<typeof issuesToDetails>[0]): DesignBodyResult => ({
    ok: false,
    code: 'validation_failed',
    message: 'Some fields of the design need attention.',
    details: issuesToDetails(issues),
  });
  if (kind === 'update') {
    const r = designUpdateBodySchema.safeParse(body);
    if (!r.success) return invalid(r.error.issues);
    return prepared({ ...r.data.document, name: r.data.name ?? r.data.document.name }, r.data.version);
  }
  const documentBranch = designCreateBodySchema.options[1];
  if (typeof body !== 'object' || body === null || !('document' in body)) return { ok: true, body };
  const r = documentBranch.safeParse(body);
  if (!r.success) return invalid(r.error.issues);
  if (!r.data.document) return { ok: true, body };
  return prepared({ ...r.data.document, name: r.data.name }, null);
}

export default function run(task: DesignBodyTask): DesignBodyResult {
  return parseDesignBody(task.bytes, task.kind);
}
