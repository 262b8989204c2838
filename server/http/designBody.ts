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

export function createDesignBodyReader(options: { maxThreads?: number; databaseUrl?: string } = {}): DesignBodyReader {
  let pool: Piscina | null = null;
  const workerData: DesignBodyWorkerData = { databaseUrl: options.databaseUrl };
  // started on first use: most servers never see a large design, and a tsx worker takes a moment to load
  const getPool = () =>
    (pool ??= new Piscina({ ...workerFile(), workerData, minThreads: 0, maxThreads: Math.max(1, options.maxThreads ?? 1), idleTimeout: 60_000 }));

  return {
    async read(req, kind, store) {
      if (!Buffer.isBuffer(req.body)) return { body: req.body };
      const buf = req.body;
      // hand the bytes over without a copy when the Buffer owns its whole ArrayBuffer
      const own = buf.byteOffset === 0 && buf.byteLength === buf.buffer.byteLength;
      const bytes = own ? new Uint8Array(buf.buffer, 0, buf.byteLength) : new Uint8Array(buf);
      req.body = undefined;
      const task: DesignBodyTask = { bytes, kind, ...(store && options.databaseUrl ? { store } : {}) };
      const r = (await getPool().run(task, { transferList: [bytes.buffer as ArrayBuffer] })) as DesignBodyResult;
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
