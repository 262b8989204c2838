/**
 * Reading a design body (POST /api/projects/:projectId/designs, PUT …/designs/:designId) without holding up the
 * request thread.
 *
 *   small body (≤ offThreadBytes)   parsed by express.json; the route checks it with zod, as every other route
 *   large body                      kept raw by jsonBodies (server/http/bodies.ts) and parsed, checked,
 *                                   re-serialised and measured (sha256, worst bound) in a worker thread
 *                                   (designBody.worker.ts, piscina); the request thread only handles JSON text
 *
 * Either way the caller gets the same errors (400 / 422 with field paths).
 */
import { fileURLToPath } from 'node:url';
import { existsSync } from 'node:fs';
import type { Request } from 'express';
import Piscina from 'piscina';
import type { DesignWrite } from '../repositories/designs';
import { AppError } from '../services/errors';
import type { DesignBodyKind, DesignBodyResult, DesignBodyTask } from './designBody.worker';

/** A large body comes back ready to write (`prepared`); a small one as parsed JSON for the route's own zod check. */
export type DesignBody = { prepared: DesignWrite; version: number | null } | { prepared?: undefined; body: unknown };

export interface DesignBodyReader {
  read(req: Request, kind: DesignBodyKind): Promise<DesignBody>;
  destroy(): Promise<void>;
}

/** The worker is TypeScript under tsx and vitest (started with `--import tsx`), JavaScript in a build that emits it. */
function workerFile(): { filename: string; execArgv: string[] } {
  const ts = fileURLToPath(new URL('./designBody.worker.ts', import.meta.url));
  const js = fileURLToPath(new URL('./designBody.worker.js', import.meta.url));
  if (import.meta.url.endsWith('.ts') || !existsSync(js)) return { filename: ts, execArgv: ['--import', 'tsx'] };
  return { filename: js, execArgv: [] };
}

export function createDesignBodyReader(options: { maxThreads?: number } = {}): DesignBodyReader {
  let pool: Piscina | null = null;
  // started on first use: most servers never see a large design, and a tsx worker takes a moment to load
  const getPool = () =>
    (pool ??= new Piscina({ ...workerFile(), minThreads: 0, maxThreads: Math.max(1, options.maxThreads ?? 1), idleTimeout: 60_000 }));

  return {
    async read(req, kind) {
      if (!Buffer.isBuffer(req.body)) return { body: req.body };
      const buf = req.body;
      // hand the bytes over without a copy when the Buffer owns its whole ArrayBuffer
      const own = buf.byteOffset === 0 && buf.byteLength === buf.buffer.byteLength;
      const bytes = own ? new Uint8Array(buf.buffer, 0, buf.byteLength) : new Uint8Array(buf);
      req.body = undefined;
      const task: DesignBodyTask = { bytes, kind };
      const r = (await getPool().run(task, { transferList: [bytes.buffer as ArrayBuffer] })) as DesignBodyResult;
      if (!r.ok) throw new AppError(r.code, r.message, r.details);
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
