/**
 * The design-body process: a child of the server that reads, checks and writes large design bodies (issue 8,
 * item 7). The server streams each body in over a socket pair; this process assembles it, parses and checks it
 * (designBodyParse.ts), writes it over a database connection of its own, and streams the stored JSON text back for
 * the answer.
 *
 *   server (request thread)                         this process (every thread at nice 10)
 *   ── CONFIG {databaseUrl} ───────────────────────▶ where to write
 *   ── BEGIN id {kind, length, store?} ────────────▶ a buffer of `length` bytes
 *   ── PIECE id bytes … (as they arrive) ──────────▶ copied in
 *   ── END id ─────────────────────────────────────▶ queued: parse, check, figures, write (one body at a time)
 *   ◀──────────────── OUT id bytes … (256 KiB) ───── the stored JSON text (or the jsonb bytes, unwritten)
 *   ◀──────────────── RESULT id {result} ─────────── what was written, or the error as data
 *   ── ABORT id ───────────────────────────────────▶ the buffer dropped
 *
 * One socket (fd 3, a socket pair the server made at spawn) carries both directions in frames (frames.ts): the
 * bytes of a body go through untouched, with no serialisation on either side.
 *
 * Why a process and not a worker thread: a thread shares V8's platform threads with the request thread, and those
 * run the garbage collector's parallel work for every isolate. A 17 MB design leaves heaps of hundreds of megabytes,
 * and their collection cost 0.8–2.6 s of CPU per PUT at the request thread's own priority, on 2 cores, while
 * /api/health waited behind it. Here every thread, the collector's helpers included, runs at nice 10
 * (lowerProcessPriority), so the request thread and PostgreSQL get a core first.
 */
import { Socket } from 'node:net';
import type { Knex } from 'knex';
import { createKnex } from '../db/config';
import { lowerProcessPriority, WORKER_NICE } from '../workers/lowPriority';
import { OUT_PIECE_BYTES, parseDesignBody, storeDesign, type DesignBodyKind, type DesignBodyResult, type DesignBodyStore } from './designBodyParse';
import { frameHeader, frameReader } from './frames';
import { ANSWER_FRAME, BODY_FRAME, type AnswerResult, type BeginFrame } from './designBodyProtocol';

interface Incoming {
  kind: DesignBodyKind;
  store?: DesignBodyStore;
  /** from Content-Length (the server checked it against the limit), or null for a chunked body */
  length: number | null;
  buf: Uint8Array;
  n: number;
}

/**
 * A body's buffer starts at 1 MiB at most and doubles as bytes arrive (up to its Content-Length): a declared length
 * is a promise, not bytes, and several slow senders declaring 40 MB each must not hold 40 MB each before sending it.
 */
const FIRST_BUFFER_BYTES = 1024 * 1024;

const incoming = new Map<number, Incoming>();
let databaseUrl: string | undefined;
let db: Knex | null = null;
/** bodies are handled one at a time: four parsed 100,000-site designs at once would hold ~1 GB */
let queue: Promise<void> = Promise.resolve();

const channel = new Socket({ fd: 3, readable: true, writable: true });

function sendFrame(type: number, id: number, payload: Uint8Array): void {
  // header and payload in one writev(2)
  channel.cork();
  channel.write(frameHeader(type, id, payload.byteLength));
  if (payload.byteLength > 0) channel.write(payload);
  channel.uncork();
}

function sendResult(id: number, result: AnswerResult): void {
  sendFrame(ANSWER_FRAME.result, id, Buffer.from(JSON.stringify(result), 'utf8'));
}

/** bytes that go back ahead of their RESULT, in frames of OUT_PIECE_BYTES (the server keeps the views it reads) */
function sendOut(id: number, bytes: Uint8Array): void {
  for (let at = 0; at < bytes.byteLength; at += OUT_PIECE_BYTES) sendFrame(ANSWER_FRAME.out, id, bytes.subarray(at, Math.min(bytes.byteLength, at + OUT_PIECE_BYTES)));
}

/** one connection: one body at a time. Its PostgreSQL backend works at this process's priority too (config.ts). */
function database(): Knex {
  if (!databaseUrl) throw new Error('the design-body process has no database URL (createDesignBodyReader({ databaseUrl }))');
  return (db ??= createKnex(databaseUrl, { poolMax: 1, backendNice: WORKER_NICE }));
}

function append(body: Incoming, bytes: Uint8Array): void {
  if (body.n + bytes.byteLength > body.buf.byteLength) {
    const need = body.n + bytes.byteLength;
    let size = Math.max(2 * body.buf.byteLength, need);
    // no further than the declared length when there is one (the server ends a body that passes it)
    if (body.length !== null && body.length >= need) size = Math.min(size, body.length);
    const bigger = new Uint8Array(size);
    bigger.set(body.buf.subarray(0, body.n));
    body.buf = bigger;
  }
  body.buf.set(bytes, body.n);
  body.n += bytes.byteLength;
}

const failure = (e: unknown): AnswerResult => ({ ok: false, failure: { message: String((e as Error)?.message ?? e), name: String((e as Error)?.name ?? 'Error') } });

async function handle(id: number, body: Incoming): Promise<void> {
  const r = parseDesignBody(body.buf.subarray(0, body.n), body.kind);
  body.buf = new Uint8Array(0);
  if (!r.ok || !('write' in r)) return sendResult(id, r as AnswerResult);
  if (!body.store) {
    const { documentJsonb, ...write } = r.write;
    sendOut(id, documentJsonb);
    sendResult(id, { ok: true, write, version: r.version, outBytes: documentJsonb.byteLength });
    return flushed();
  }
  let out: DesignBodyResult;
  try {
    out = await storeDesign(database(), r, body.store);
  } catch (e) {
    out = failure(e) as DesignBodyResult;
  }
  if (!out.ok || !('stored' in out)) return sendResult(id, out as AnswerResult);
  sendOut(id, out.documentJson);
  sendResult(id, { ok: true, stored: out.stored, outBytes: out.documentJson.byteLength });
  // The next body's parse is seconds of synchronous work: let this answer leave first. Otherwise a saved design's
  // answer waits behind it, and if this process died in that parse the server would answer 503 for a body that was
  // written.
  await flushed();
}

/** resolves once the socket has handed everything written so far to the kernel */
function flushed(): Promise<void> {
  if (!channel.writableNeedDrain) return Promise.resolve();
  return new Promise((go) => {
    const done = () => {
      channel.off('drain', done);
      channel.off('close', done);
      go();
    };
    channel.on('drain', done);
    channel.on('close', done);
  });
}

/** the current frame: its type, id, and the JSON payload's pieces (CONFIG, BEGIN) */
let frame: { type: number; id: number; json: Buffer[] } = { type: 0, id: 0, json: [] };

const read = frameReader({
  start(type, id) {
    frame = { type, id, json: [] };
  },
  data(bytes) {
    if (frame.type === BODY_FRAME.piece) {
      const body = incoming.get(frame.id);
      if (body) append(body, bytes);
    } else {
      frame.json.push(Buffer.from(bytes));
    }
  },
  end() {
    const { type, id } = frame;
    if (type === BODY_FRAME.config) {
      databaseUrl = (JSON.parse(Buffer.concat(frame.json).toString('utf8')) as { databaseUrl?: string }).databaseUrl;
    } else if (type === BODY_FRAME.begin) {
      const b = JSON.parse(Buffer.concat(frame.json).toString('utf8')) as BeginFrame;
      incoming.set(id, { kind: b.kind, store: b.store, length: b.length, buf: new Uint8Array(Math.min(b.length ?? FIRST_BUFFER_BYTES, FIRST_BUFFER_BYTES)), n: 0 });
    } else if (type === BODY_FRAME.abort) {
      incoming.delete(id);
    } else if (type === BODY_FRAME.end) {
      const body = incoming.get(id);
      if (!body) return;
      incoming.delete(id);
      queue = queue.then(() => handle(id, body)).catch((e: unknown) => sendResult(id, failure(e)));
    }
  },
});

// every thread that exists now (the server lowered the main thread at spawn; this catches any thread started before
// that), and through inheritance every later one
lowerProcessPriority(WORKER_NICE);
channel.on('data', read);
// the server went away (or ended the channel when idle): nothing more can arrive and no answer can be delivered
const leave = () => {
  void (db?.destroy() ?? Promise.resolve()).finally(() => process.exit(0));
};
channel.on('end', leave);
channel.on('error', leave);
