/**
 * Reading a design update body (PUT /api/projects/:projectId/design) without holding up the request thread.
 *
 *   small body (≤ offThreadBytes)   parsed by express.json and checked with zod here, as every other route
 *   large body                      kept raw by jsonBodies (server/http/bodies.ts) and parsed, checked and
 *                                   re-serialised in a worker thread (designBody.worker.ts, piscina); the
 *                                   request thread only handles the validated JSON text
 *
 * Either way the caller gets the same shape and the same errors (400 / 422 with field paths).
 */
import { fileURLToPath } from 'node:url';
import { existsSync } from 'node:fs';
import type { Request } from 'express';
import Piscina from 'piscina';
import { projectDesignUpdateBodySchema } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { AppError, parseOr422 } from '../services/errors';
import type { DesignBodyResult, DesignBodyTask } from './designBody.worker';

export interface DesignUpdate {
  /** the document, or its validated JSON text for a large one */
  document: DesignDocument | { json: string };
  name: string;
  siteCount: number;
  version: number;
}

export interface DesignBodyReader {
  read(req: Request): Promise<DesignUpdate>;
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
    async read(req) {
      if (Buffer.isBuffer(req.body)) {
        const buf = req.body;
        // hand the bytes over without a copy when the Buffer owns its whole ArrayBuffer
        const own = buf.byteOffset === 0 && buf.byteLength === buf.buffer.byteLength;
        const bytes = own ? new Uint8Array(buf.buffer, 0, buf.byteLength) : new Uint8Array(buf);
        req.body = undefined;
        const task: DesignBodyTask = { bytes };
        const r = (await getPool().run(task, { transferList: [bytes.buffer as ArrayBuffer] })) as DesignBodyResult;
        if (!r.ok) throw new AppError(r.code, r.message, r.details);
        return { document: { json: r.json }, name: r.name, siteCount: r.siteCount, version: r.version };
      }
      const body = parseOr422(projectDesignUpdateBodySchema, req.body, 'design');
      return { document: body.design, name: body.design.name, siteCount: body.design.sites.length, version: body.version };
    },
    async destroy() {
      await pool?.destroy();
      pool = null;
    },
  };
}
