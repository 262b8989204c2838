/**
 * What the design-body process (designBody.child.ts) does with one large design body (issue 8, item 7): JSON.parse,
 * the unstorable-text check, the zod contract of a design create or save, and the figures stored beside the document
 * (sha256 and the far-field worst bound, server/workers/designFigures.ts). A 100,000-site document is ~17 MB of JSON;
 * parsing and validating it took seconds of main-thread time on the 2-core test machine, during which /api/health and
 * every other request waited. The answer is the validated document as JSON text with the fields the repository writes.
 *
 * `storeDesign` then writes the validated document over the process's own database connection, with the same
 * functions the designs service uses (server/services/designWrites.ts: one transaction with its audit entries, the
 * optimistic-concurrency check, nothing written on error). Sending a 17 MB parameter to PostgreSQL is socket writes,
 * buffer copies and garbage of the document's size: they cost that process's time, not the request thread's.
 */
import type { Knex } from 'knex';
import { designCreateBodySchema, designUpdateBodySchema } from '../contracts/api';
import { AppError, type CurrentVersion } from '../services/errors';
import { insertDesign, savedMeta, writeVersion, type DesignMeta } from '../services/designWrites';
import type { DesignDocument } from '../contracts/design';
import type { DesignWrite } from '../repositories/designs';
import { issuesToDetails, type FieldIssue } from '../services/errors';
import { computeFigures } from '../workers/designFigures';
import { findTextProblems, textProblemsAnswer } from './wellFormed';

/** `create`: POST …/designs ({ name, document? } or { name, copyOf }); `update`: PUT …/designs/:designId. */
export type DesignBodyKind = 'create' | 'update';

/** a failure of the write that is not one of our AppErrors (e.g. the database is away): enough to tell 503 from 500 */
export interface StoreFailure {
  message: string;
  name: string;
  code?: string;
}

export type DesignBodyResult =
  /** a document body, validated and ready to write; `version` is the one the save names (update only) */
  | { ok: true; write: PreparedBody; version: number | null }
  /** a body without a document ({ name, copyOf } or { name }): small, handed back for the ordinary path */
  | { ok: true; body: unknown }
  /** `store` done: what was written, and the stored JSON text's UTF-8 bytes for the answer */
  | { ok: true; stored: DesignMeta; documentJson: Uint8Array }
  | { ok: false; code: AppError['code']; message: string; details?: FieldIssue[]; current?: CurrentVersion }
  | { ok: false; failure: StoreFailure };

/** the largest piece of the stored text the body process sends back at once: the answer's own piece size (routes/designs.ts) */
export const OUT_PIECE_BYTES = 256 * 1024;

const BAD_JSON = 'The request body is not valid JSON (or holds a NUL character, which the server does not store).';

/** The shape the result has in the body process: the jsonb bytes as a Uint8Array (a Buffer arrives as one anyway). */
export type PreparedBody = Omit<DesignWrite, 'documentJsonb' | 'documentJson'> & { documentJsonb: Uint8Array };

/**
 * jsonb binary input: the version byte 1, then the UTF-8 JSON text (PostgreSQL, jsonb_recv). Encoded here, in the
 * body process, into one pre-sized buffer, so the request thread neither encodes nor copies the text.
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

/** where a large body is written: a new design in `projectId` (designId null) or the next version of `designId` */
export interface DesignBodyStore {
  projectId: number;
  designId: number | null;
  userId: number;
}

/** Write a prepared body (the caller has checked the role); what was written, or the failure as plain data. */
export async function storeDesign(
  knex: Knex,
  r: Extract<DesignBodyResult, { write: PreparedBody }>,
  to: DesignBodyStore,
): Promise<DesignBodyResult> {
  const bytes = r.write.documentJsonb;
  // pg sends a Buffer parameter as it is (binary format: jsonb_recv's version byte, then the text)
  const w: DesignWrite = { ...r.write, documentJsonb: Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength) };
  try {
    let designId = to.designId;
    if (designId === null) designId = await insertDesign(knex, to.projectId, w, to.userId, undefined);
    else await writeVersion(knex, to.projectId, designId, w, r.version ?? 0, to.userId);
    return { ok: true, stored: await savedMeta(knex, to.projectId, designId), documentJson: bytes.subarray(1) };
  } catch (e) {
    if (e instanceof AppError) return { ok: false, code: e.code, message: e.message, details: e.details, current: e.current };
    const err = e as { message?: unknown; name?: unknown; code?: unknown };
    return { ok: false, failure: { message: String(err?.message ?? e), name: String(err?.name ?? 'Error'), ...(typeof err?.code === 'string' ? { code: err.code } : {}) } };
  }
}
