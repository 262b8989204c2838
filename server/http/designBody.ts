/**
 * Reading a design body (POST /api/projects/:projectId/designs, PUT …/designs/:designId) without holding up the
 * request thread.
 *
 *   small body (≤ offThreadBytes)   parsed by express.json; the route checks it with zod, as every other route
 *   large body                      kept raw by jsonBodies (server/http/bodies.ts) and parsed, checked,
 *                                   re-serialised and measured (sha256, worst bound) in a worker thread
 *                                   (designBody.worker.ts, piscina); the request thread only handles JSON text
 *
 *   large body, `store` given       as above, and the worker also writes it (create or save, with its audit, in one
 *                                   transaction) over its own database connection: the request thread never sends
 *                                   the document to PostgreSQL (server/services/designWrites.ts; issue 8, item 7)
 *
 * Either way the caller gets the same errors (400 / 422 with field paths, 404, 409 with the current version, 503).
 */
import { fileURLToPath } from 'node:url';
import { existsSync } from 'node:fs';
import { MessageChannel, type MessagePort } from 'node:worker_threads';
import type { Request } from 'express';
import Piscina from 'piscina';
import type { DesignWrite } from '../repositories/designs';
import { AppError } from '../services/errors';
import type { DesignMeta } from '../services/designWrites';
import type { DesignBodyKind, DesignBodyResult, DesignBodyTask, DesignBodyWorkerData } from './designBody.worker';

/**
 * A large body comes back already written (`stored`, with the stored JSON text's bytes) when the reader has a
 * database and the caller said where to store it, else ready to write (`prepared`); a small one as parsed JSON
 * for the route's own zod check.
 */
export type DesignBody =
  | { stored: DesignMeta; documentJson: Buffer; prepared?: undefined }
  | { stored?: undefined; prepared: DesignWrite; version: number | null }
  | { stored?: undefined; prepared?: undefined; body: unknown };

/** where a large body is written: a new design in `projectId` (designId null) or the next version of `designId` */
export interface DesignBodyStore {
  projectId: number;
  designId: number | null;
  userId: number;
}

export interface DesignBodyReader {
  /** `store`: the caller has checked the role (requireCapability); the write keeps the service's rules */
  read(req: Request, kind: DesignBodyKind, store?: DesignBodyStore): Promise<DesignBody>;
  destroy(): Promise<void>;
}

/** The worker is TypeScript under tsx and vitest (started with `--import tsx`), JavaScript in a build that emits it. */
function workerFile(): { filename: string; execArgv: string[] } {
  const ts = fileURLToPath(new URL('./designBody.worker.ts', import.meta.url));
  const js = fileURLToPath(new URL('./designBody.worker.js', import.meta.url));
  if (import.meta.url.endsWith('.ts') || !existsSync(js)) return { filename: ts, execArgv: ['--import', 'tsx'] };
  return { filename: js, execArgv: [] };
}

/** A failure of the worker's write that is not an AppError, as an Error the error middleware can judge (503 or 500). */
function storeError(f: { message: string; name: string; code?: string }): Error {
  const e = new Error(f.message) as Error & { code?: string };
  e.name = f.name;
  if (f.code !== undefined) e.code = f.code;
  return e;
}

/** body-parser's errors for the same cases, so the error middleware answers them the same way (413, 400) */
const tooLarge = () => Object.assign(new Error('request entity too large'), { status: 413, type: 'entity.too.large' });
const badBody = (message: string) => Object.assign(new Error(message), { status: 400, type: 'request.aborted' });

/**
 * Hand one piece of the body to the worker. Node's HTTP parser gives each body piece a fresh ArrayBuffer of its own
 * (up to 64 KiB), which nothing else on this thread holds: it is transferred, not copied. A structured clone of a
 * Buffer serialises its whole ArrayBuffer into the message and the worker allocates it again, which is a second copy
 * of the 17 MB body and 17 MB of external memory on this thread per body, counted towards V8's external-memory GC
 * trigger until a collection sweeps it (issue 8, item 7). A piece that shares its ArrayBuffer (a view of a pool or
 * of a larger buffer) is still copied: transferring it would detach memory other code may hold.
 */
export function postPiece(port: MessagePort, chunk: Buffer): void {
  const ab = chunk.buffer;
  if (ab instanceof ArrayBuffer && chunk.byteOffset === 0 && chunk.byteLength === ab.byteLength && ab.byteLength > 0) {
    const piece = new Uint8Array(ab);
    try {
      port.postMessage(piece, [ab]);
      return;
    } catch {
      // an ArrayBuffer Node marked untransferable: copy it instead (below)
    }
  }
  port.postMessage(chunk);
}

/**
 * Post the request's body to `port` piece by piece as it arrives (each piece transferred, `postPiece`: no buffer of
 * the whole body on this thread), then `null` for the end; `{ abort }` tells the worker to stop. Resolves once the
 * body is read; rejects (413, 400) when it is over `limit`, shorter or longer than its Content-Length, or aborted.
 */
function streamBody(req: Request, port: MessagePort, limit: number): Promise<void> {
  const declared = Number(req.headers['content-length']);
  return new Promise<void>((resolve, reject) => {
    let received = 0;
    let settled = false;
    const fail = (e: Error) => {
      if (settled) return;
      settled = true;
      port.postMessage({ abort: e.message });
      cleanup();
      // the rest of the body is not wanted: let it flow away unread
      req.resume();
      reject(e);
    };
    const onData = (chunk: Buffer) => {
      received += chunk.byteLength;
      if (received > limit) return fail(tooLarge());
      postPiece(port, chunk);
    };
    const onEnd = () => {
      if (settled) return;
      if (Number.isFinite(declared) && received !== declared) return fail(badBody('request size did not match content length'));
      settled = true;
      port.postMessage(null);
      cleanup();
      resolve();
    };
    const onAborted = () => fail(badBody('request aborted'));
    const onError = (e: Error) => fail(Object.assign(e, { status: 400 }));
    function cleanup() {
      req.off('data', onData);
      req.off('end', onEnd);
      req.off('aborted', onAborted);
      req.off('error', onError);
    }
    req.on('data', onData);
    req.on('end', onEnd);
    req.on('aborted', onAborted);
    req.on('error', onError);
  });
}

export function createDesignBodyReader(options: { maxThreads?: number; databaseUrl?: string } = {}): DesignBodyReader {
  let pool: Piscina | null = null;
  const workerData: DesignBodyWorkerData = { databaseUrl: options.databaseUrl };
  // started on first use: most servers never see a large design, and a tsx worker takes a moment to load
  const getPool = () =>
    (pool ??= new Piscina({ ...workerFile(), workerData, minThreads: 0, maxThreads: Math.max(1, options.maxThreads ?? 1), idleTimeout: 60_000 }));

  return {
    async read(req, kind, store) {
      const where = store && options.databaseUrl ? { store } : {};
      let r: DesignBodyResult;
      if (req.designBodyStream) {
        // unread (server/http/bodies.ts): streamed into the worker, which assembles it in a buffer of its own
        const { port1, port2 } = new MessageChannel();
        const declared = Number(req.headers['content-length']);
        const task: DesignBodyTask = { stream: port2, length: Number.isFinite(declared) ? declared : null, kind, ...where };
        const running = getPool().run(task, { transferList: [port2] }) as Promise<DesignBodyResult>;
        try {
          await streamBody(req, port1, req.designBodyStream.limit);
        } catch (e) {
          // the worker stops at the abort message; its answer no longer matters
          running.catch(() => {});
          throw e;
        } finally {
          req.designBodyStream = undefined;
        }
        r = await running;
        port1.close();
      } else {
        if (!Buffer.isBuffer(req.body)) return { body: req.body };
        const buf = req.body;
        // hand the bytes over without a copy when the Buffer owns its whole ArrayBuffer
        const own = buf.byteOffset === 0 && buf.byteLength === buf.buffer.byteLength;
        const bytes = own ? new Uint8Array(buf.buffer, 0, buf.byteLength) : new Uint8Array(buf);
        req.body = undefined;
        const task: DesignBodyTask = { bytes, kind, ...where };
        r = (await getPool().run(task, { transferList: [bytes.buffer as ArrayBuffer] })) as DesignBodyResult;
      }
      if (!r.ok) {
        if ('failure' in r) throw storeError(r.failure);
        throw new AppError(r.code, r.message, r.details, r.current);
      }
      if ('stored' in r) {
        const d = r.documentJson;
        return { stored: r.stored, documentJson: Buffer.from(d.buffer, d.byteOffset, d.byteLength) };
      }
      if (!('write' in r)) return { body: r.body };
      // a Buffer view of the bytes that came back (no copy): pg sends a Buffer parameter in binary format
      const b = r.write.documentJsonb;
      return { prepared: { ...r.write, documentJsonb: Buffer.from(b.buffer, b.byteOffset, b.byteLength) }, version: r.version };
    },
    async destroy() {
      await pool?.destroy();
      pool = null;
    },
  };
}
