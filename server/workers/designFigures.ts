/**
 * The figures a design save stores beside the document: the sha256 of its canonical JSON and
 * the worst relative boundary bound of its far-field check (`farFieldCheck(...).worstRelBound`
 * from geometry/farfield, the number `npm run cli -- check` prints as worstRelBound).
 *
 * Both are linear in the site count (the check costs ~2 ms per 1,000 sites, the hash less), so
 * a small design is computed in place and a large one in a piscina worker thread: the event
 * loop stays free for other requests (health checks, other users) while a 100k-site design is
 * checked. The worker receives the document as JSON text (one string copy, no structured clone
 * of 100k objects) and parses it itself. Large uploads (`importSites`, server/formats) are read
 * in the same worker.
 */
import { createHash } from 'node:crypto';
import Piscina from 'piscina';
import { farFieldCheck } from '../../geometry/farfield';
import type { Design } from '../../geometry/design/types';
import type { DesignDocument } from '@contracts/design';
import { canonicalJson } from '../formats/canonical';
import { importSites, ImportRefused, type ImportContext, type ImportResult } from '../formats';
import { entryFile } from './entryFile';

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

/** Uploads smaller than this are parsed in place; larger ones in the worker. */
export const WORKER_THRESHOLD_BYTES = 256 * 1024;

/** What the worker returns for an import: the result, or the refusal to rethrow on this side. */
export type ImportOutcome = { ok: true; result: ImportResult } | { ok: false; reason: 'not_text' | 'unknown_format' | 'too_many_rows'; message: string };

export interface FigureComputer {
  compute(doc: DesignDocument, documentJson: string): Promise<DesignFigures>;
  /** `importSites` of server/formats, in the worker for large files (ImportRefused is rethrown here) */
  importSites(bytes: Uint8Array, fileName: string, ctx: ImportContext): Promise<ImportResult>;
  close(): Promise<void>;
}


export function figureComputer(opts: { threshold?: number; thresholdBytes?: number } = {}): FigureComputer {
  const threshold = opts.threshold ?? WORKER_THRESHOLD_SITES;
  const thresholdBytes = opts.thresholdBytes ?? WORKER_THRESHOLD_BYTES;
  let pool: Piscina | null = null;
  // one thread: saves of huge designs and big uploads are rare; it lives 30 s after the last one
  const getPool = () => (pool ??= new Piscina({ ...entryFile(import.meta.url, 'designFigures.worker'), minThreads: 0, maxThreads: 1, idleTimeout: 30_000 }));
  return {
    async compute(doc, documentJson) {
      if (doc.sites.length < threshold) return computeFigures(doc);
      return (await getPool().run(documentJson)) as DesignFigures;
    },
    async importSites(bytes, fileName, ctx) {
      if (bytes.byteLength < thresholdBytes) return importSites(bytes, fileName, ctx);
      const out = (await getPool().run({ bytes, fileName, ctx }, { name: 'importFile' })) as ImportOutcome;
      if (!out.ok) throw new ImportRefused(out.reason, out.message);
      return out.result;
    },
    async close() {
      const p = pool;
      pool = null;
      await p?.destroy();
    },
  };
}
