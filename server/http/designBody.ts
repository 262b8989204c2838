/**
 * Reading a design body (POST /api/projects/:projectId/designs, PUT …/designs/:designId) without holding up the
 * request thread.
 *
 *   small body (≤ offThreadBytes)   parsed by express.json; the route checks it with zod, as every other route
 *   large body                      kept unread by jsonBodies (server/http/bodies.ts) and streamed, piece by piece
 *                                   as it arrives, into the design-body process (designBody.child.ts), which
 *                                   parses, checks, re-serialises and measures it (sha256, worst bound); the
 *                                   request thread only passes bytes along
 *
 *   large body, `store` given       as above, and that process also writes it (create or save, with its audit, in one
 *                                   transaction) over its own database connection and sends the stored text back in
 *                                   pieces for the answer: the request thread never sends the document to PostgreSQL
 *                                   nor joins it into one buffer (server/services/designWrites.ts; issue 8, item 7)
 *
 * Either way the caller gets the same errors (400 / 422 with field paths, 404, 409 with the current version, 503).
 * The process is started on first use at nice 10 for all its threads, and leaves after a minute without work.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import type { Duplex } from 'node:stream';
import { setPriority } from 'node:os';
import type { Request } from 'express';
import type { DesignWrite } from '../repositories/designs';
import { AppError } from '../services/errors';
import type { DesignMeta } from '../services/designWrites';
import type { DesignBodyKind, DesignBodyStore } from './designBodyParse';
import { ANSWER_FRAME, BODY_FRAME, type AnswerResult, type BeginFrame } from './designBodyProtocol';
import { frameHeader, frameReader } from './frames';
import { WORKER_NICE } from '../workers/lowPriority';
import { entryFile } from '../workers/entryFile';

export type { DesignBodyStore } from './designBodyParse';

/**
 * A large body comes back already written (`stored`, with the stored JSON text's bytes in pieces) when the reader has
 * a database and the caller said where to store it, else ready to write (`prepared`); a small one as parsed JSON
 * for the route's own zod check.
 */
export type DesignBody =
  | { stored: DesignMeta; documentJson: Buffer[]; prepared?: undefined }
  | { stored?: undefined; prepared: DesignWrite; version: number | null }
  | { stored?: undefined; prepared?: undefined; body: unknown };

export interface DesignBodyReader {
  /** `store`: the caller has checked the role (requireCapability); the write keeps the service's rules */
  read(req: Request, kind: DesignBodyKind, store?: DesignBodyStore): Promise<DesignBody>;
  destroy(): Promise<void>;
}


/** A failure of the child's write that is not an AppError, as an Error the error middleware can judge (503 or 500). */
function storeError(f: { message: string; name: string; code?: string }): Error {
  const e = new Error(f.message) as Error & { code?: string };
  e.name = f.name;
  if (f.code !== undefined) e.code = f.code;
  return e;
}

/** body-parser's errors for the same cases, so the error middleware answers them the same way (413, 400) */
const tooLarge = () => Object.assign(new Error('request entity too large'), { status: 413, type: 'entity.too.large' });
const badBody = (message: string) => Object.assign(new Error(message), { status: 400, type: 'request.aborted' });
/** the body process stopped (crashed, killed, out of memory) with this body in it: nothing was written by this answer */
const processGone = () => new AppError('unavailable', 'The server could not finish reading this design. Nothing was saved; please send it again.');

/** after this long without a body the process leaves (its heap after a 100,000-site design is hundreds of MB) */
const IDLE_MS = 60_000;
/** pieces of an already-read body (req.body) sent at once: the size a socket read gives */
const SEND_PIECE_BYTES = 64 * 1024;

interface Answer {
  result: AnswerResult;
  /** the OUT pieces that came before the result, as views of what the socket read */
  out: Buffer[];
}

interface Pending {
  resolve: (a: Answer) => void;
  reject: (e: Error) => void;
  out: Buffer[];
}

/** one body's way into the process */
interface BodyFeed {
  /** false: the socket holds more than its high-water mark; wait for `drained` before the next */
  piece(bytes: Uint8Array): boolean;
  end(): void;
  abort(): void;
  drained(then: () => void): void;
}

/**
 * Send the request's body to the body process piece by piece as it arrives (no buffer of the whole body on this
 * thread), then END. The request pauses while the process's socket is full. Resolves once the body is read; rejects
 * (413, 400) when it is over `limit`, shorter or longer than its Content-Length, or aborted, after an ABORT.
 */
function streamBody(req: Request, to: BodyFeed, limit: number): Promise<void> {
  const declared = Number(req.headers['content-length']);
  return new Promise<void>((resolve, reject) => {
    let received = 0;
    let settled = false;
    const fail = (e: Error) => {
      if (settled) return;
      settled = true;
      to.abort();
      cleanup();
      // the rest of the body is not wanted: let it flow away unread
      req.resume();
      reject(e);
    };
    const onData = (chunk: Buffer) => {
      received += chunk.byteLength;
      if (received > limit) return fail(tooLarge());
      if (!to.piece(chunk)) {
        req.pause();
        to.drained(() => settled || req.resume());
      }
    };
    const onEnd = () => {
      if (settled) return;
      if (Number.isFinite(declared) && received !== declared) return fail(badBody('request size did not match content length'));
      settled = true;
      to.end();
      cleanup();
      resolve();
    };
    const onAborted = () => fail(badBody('request aborted'));
    // a connection closed before the whole body came (Node 20 emits 'aborted' too, but not for every way of closing)
    const onClose = () => {
      if (!req.complete) fail(badBody('request aborted'));
    };
    const onError = (e: Error) => fail(Object.assign(e, { status: 400 }));
    function cleanup() {
      req.off('data', onData);
      req.off('end', onEnd);
      req.off('aborted', onAborted);
      req.off('close', onClose);
      req.off('error', onError);
    }
    req.on('data', onData);
    req.on('end', onEnd);
    req.on('aborted', onAborted);
    req.on('close', onClose);
    req.on('error', onError);
    // the client may have gone while the route still checked roles: no event will come any more
    if (req.destroyed && !req.complete) fail(badBody('request aborted'));
  });
}

export interface DesignBodyReaderOptions {
  /** where the body process writes a body whose caller says where to store it */
  databaseUrl?: string;
  /** how long the process stays without a body before it leaves (default IDLE_MS) */
  idleMs?: number;
}

/** one running body process and the bodies it holds (a process that leaves fails only its own) */
interface BodyProcess {
  c: ChildProcess;
  /** fd 3 of the process: a socket pair carrying frames both ways (frames.ts) */
  sock: Duplex;
  pending: Map<number, Pending>;
  /** requests paused until the socket drains */
  waiting: Set<() => void>;
  open: boolean;
}

export function createDesignBodyReader(options: DesignBodyReaderOptions = {}): DesignBodyReader {
  let proc: BodyProcess | null = null;
  let nextId = 1;
  /** after destroy() (server stop) no process is started again */
  let destroyed = false;
  let idle: NodeJS.Timeout | null = null;

  /** a closed socket drops the frame: the 'exit' handler then fails what the process held */
  const send = (p: BodyProcess, type: number, id: number, payload?: Uint8Array): boolean => {
    if (!p.open) return true;
    const n = payload?.byteLength ?? 0;
    // header and payload in one writev(2)
    p.sock.cork();
    let ok = p.sock.write(frameHeader(type, id, n));
    if (n > 0) ok = p.sock.write(payload);
    p.sock.uncork();
    return ok;
  };
  const sendJson = (p: BodyProcess, type: number, id: number, value: unknown) => send(p, type, id, Buffer.from(JSON.stringify(value), 'utf8'));

  // started on first use: most servers never see a large design, and a tsx child takes a moment to load
  const start = (): BodyProcess => {
    // one that is leaving (idle, socket ended) takes no new body
    if (proc?.open) return proc;
    if (destroyed) throw processGone();
    const { filename, execArgv } = entryFile(import.meta.url, 'designBody.child');
    const c = spawn(process.execPath, [...execArgv, filename], { stdio: ['ignore', 'inherit', 'inherit', 'pipe'] });
    // a failed spawn (EMFILE, EAGAIN) reports 'error' on the next tick and has no stdio: listen first, refuse with 503
    const sock = c.stdio?.[3] as Duplex | undefined | null;
    if (!sock) {
      c.on('error', () => {});
      throw processGone();
    }
    // at once, while node is still starting: the threads it starts next (V8's platform threads) inherit nice 10,
    // and loading the code runs lowered too; the child lowers whatever thread it still finds (designBody.child.ts)
    if (c.pid !== undefined) {
      try {
        setPriority(c.pid, WORKER_NICE);
      } catch {
        // refused here (or already gone): the child lowers itself
      }
    }
    const p: BodyProcess = { c, sock, pending: new Map(), waiting: new Set(), open: true };
    proc = p;
    let frame = { type: 0, id: 0, json: [] as Buffer[] };
    sock.on(
      'data',
      frameReader({
        start(type, id) {
          frame = { type, id, json: [] };
        },
        data(bytes) {
          if (frame.type === ANSWER_FRAME.out) p.pending.get(frame.id)?.out.push(bytes);
          else frame.json.push(bytes);
        },
        end() {
          if (frame.type !== ANSWER_FRAME.result) return;
          const w = p.pending.get(frame.id);
          // an aborted body's late answer: nobody waits for it
          if (!w) return;
          p.pending.delete(frame.id);
          w.resolve({ result: JSON.parse(Buffer.concat(frame.json).toString('utf8')) as AnswerResult, out: w.out });
          idleLater();
        },
      }),
    );
    sock.on('drain', () => {
      const w = [...p.waiting];
      p.waiting.clear();
      for (const f of w) f();
    });
    const ended = () => {
      p.open = false;
      if (proc === p) proc = null;
      const gone = [...p.pending.values()];
      p.pending.clear();
      for (const w of gone) w.reject(processGone());
      // paused requests go on to their end, where the rejection above answers them
      for (const f of p.waiting) f();
      p.waiting.clear();
    };
    // 'close': the process has exited and its socket is closed, so every frame it sent has been read first
    c.on('close', ended);
    c.on('error', ended);
    // EPIPE and the like: the process is going; 'close' follows
    sock.on('error', () => {
      p.open = false;
    });
    sendJson(p, BODY_FRAME.config, 0, { databaseUrl: options.databaseUrl });
    return p;
  };

  function idleLater() {
    if (idle) clearTimeout(idle);
    idle = null;
    const p = proc;
    if (!p || p.pending.size > 0) return;
    idle = setTimeout(() => {
      idle = null;
      if (p.pending.size > 0 || !p.open) return;
      // the process leaves when its socket ends (designBody.child.ts)
      p.open = false;
      if (proc === p) proc = null;
      p.sock.end();
    }, options.idleMs ?? IDLE_MS);
    idle.unref();
  }

  /** one body through the process: `feed` sends its pieces and END (or rejects after an ABORT) */
  async function run(kind: DesignBodyKind, length: number | null, store: DesignBodyStore | undefined, feed: (to: BodyFeed) => Promise<void>): Promise<Answer> {
    if (idle) clearTimeout(idle);
    idle = null;
    const p = start();
    const id = nextId;
    // ids are u32 in the frames (frames.ts)
    nextId = nextId >= 0xffffffff ? 1 : nextId + 1;
    const answer = new Promise<Answer>((resolve, reject) => {
      p.pending.set(id, { resolve, reject, out: [] });
    });
    // the process may leave while the body is still arriving: the rejection is read after `feed`
    answer.catch(() => {});
    sendJson(p, BODY_FRAME.begin, id, { kind, length, ...(store ? { store } : {}) } satisfies BeginFrame);
    const to: BodyFeed = {
      piece: (bytes) => send(p, BODY_FRAME.piece, id, bytes),
      end: () => void send(p, BODY_FRAME.end, id),
      abort: () => void send(p, BODY_FRAME.abort, id),
      drained: (then) => (p.open ? p.waiting.add(then) : then()),
    };
    try {
      await feed(to);
    } catch (e) {
      p.pending.delete(id);
      idleLater();
      throw e;
    }
    return answer;
  }

  return {
    async read(req, kind, store) {
      const where = store && options.databaseUrl ? store : undefined;
      let r: Answer;
      if (req.designBodyStream) {
        // unread (server/http/bodies.ts): streamed into the process, which assembles it in a buffer of its own
        const limit = req.designBodyStream.limit;
        const declared = Number(req.headers['content-length']);
        try {
          r = await run(kind, Number.isFinite(declared) ? declared : null, where, (to) => streamBody(req, to, limit));
        } finally {
          req.designBodyStream = undefined;
        }
      } else {
        if (!Buffer.isBuffer(req.body)) return { body: req.body };
        const buf = req.body;
        req.body = undefined;
        r = await run(kind, buf.byteLength, where, async (to) => {
          for (let at = 0; at < buf.byteLength; at += SEND_PIECE_BYTES) {
            if (!to.piece(buf.subarray(at, Math.min(buf.byteLength, at + SEND_PIECE_BYTES)))) await new Promise<void>((go) => to.drained(go));
          }
          to.end();
        });
      }
      const { result, out } = r;
      if (!result.ok) {
        if ('failure' in result) throw storeError(result.failure);
        throw new AppError(result.code, result.message, result.details, result.current);
      }
      if (!('outBytes' in result)) return { body: result.body };
      // the frames arrive in order on one socket; a shortfall would be a fault of ours, not the client's
      if (out.reduce((n, b) => n + b.byteLength, 0) !== result.outBytes) throw new Error('the design-body process sent fewer bytes than it announced');
      if ('stored' in result) return { stored: result.stored, documentJson: out };
      // the jsonb bytes (version byte, then the text) as one Buffer: pg sends a Buffer parameter in binary format
      return { prepared: { ...result.write, documentJsonb: Buffer.concat(out, result.outBytes) }, version: result.version };
    },
    async destroy() {
      destroyed = true;
      if (idle) clearTimeout(idle);
      idle = null;
      const p = proc;
      proc = null;
      if (!p) return;
      const { c } = p;
      if (c.exitCode !== null || c.signalCode !== null) return;
      // a body being written is rolled back with its transaction when the connection drops
      p.open = false;
      await new Promise<void>((resolve) => {
        c.once('exit', () => resolve());
        c.kill('SIGKILL');
      });
    },
  };
}
