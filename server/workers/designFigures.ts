/**
 * The figures a design save stores beside the document: the sha256 of its canonical JSON and
 * the worst relative boundary bound of its far-field check (`farFieldCheck(...).worstRelBound`
 * from geometry/farfield, the number `npm run cli -- check` prints as worstRelBound).
 *
 * Both are linear in the site count (the check costs ~2 ms per 1,000 sites, the hash less), so
 * a small design is computed in place and a large one in a piscina worker thread: the event
 * loop stays free for other requests (health checks, other users) while a 100k-site design is
 * checked. The worker receives the document as JSON text (one string copy, no structured clone
 * of 100k objects) and parses it itself.
 */
import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import Piscina from 'piscina';
import { farFieldCheck } from '../../geometry/farfield';
import type { Design } from '../../geometry/design/types';
import type { DesignDocument } from '@contracts/design';
import { canonicalJson } from '../formats/canonical';

export interface DesignFigures {
  sha256: string;
  /** null with no sites, or when a site is outside (or on) the box: no bound exists then */
  worstRelBound: number | null;
}

export function sha256OfDocument(doc: unknown): string {
  return createHash('sha256').update(canonicalJson(doc), 'utf8').digest('hex');
}

export function worstRelBoundOf(doc: DesignDocument): number | null {
  if (doc.sites.length === 0) return null;
  const w = farFieldCheck(doc as Design).worstRelBound;
  return w !== null && Number.isFinite(w) ? w : null;
}

/** In-place computation (also the worker's body). */
export function computeFigures(doc: DesignDocument): DesignFigures {
  return { sha256: sha256OfDocument(doc), worstRelBound: worstRelBoundOf(doc) };
}

/** Below this many sites the figures are computed in place (≲ 4 ms); at or above, in a worker. */
export const WORKER_THRESHOLD_SITES = 2_000;

export interface FigureComputer {
  compute(doc: DesignDocument, documentJson: string): Promise<DesignFigures>;
  close(): Promise<void>;
}

function workerFile(): { filename: string; execArgv: string[] } {
  const ts = fileURLToPath(new URL('./designFigures.worker.ts', import.meta.url));
  const js = fileURLToPath(new URL('./designFigures.worker.js', import.meta.url));
  // under tsx or vitest this file is TypeScript: the worker thread loads its .ts through tsx
  if (import.meta.url.endsWith('.ts') || !existsSync(js)) return { filename: ts, execArgv: ['--import', 'tsx'] };
  return { filename: js, execArgv: [] };
}

export function figureComputer(opts: { threshold?: number } = {}): FigureComputer {
  const threshold = opts.threshold ?? WORKER_THRESHOLD_SITES;
  let pool: Piscina | null = null;
  return {
    async compute(doc, documentJson) {
      if (doc.sites.length < threshold) return computeFigures(doc);
      // one thread: saves of huge designs are rare; it lives 30 s after the last one
      pool ??= new Piscina({ ...workerFile(), minThreads: 0, maxThreads: 1, idleTimeout: 30_000 });
      return (await pool.run(documentJson)) as DesignFigures;
    },
    async close() {
      const p = pool;
      pool = null;
      await p?.destroy();
    },
  };
}
