/**
 * The element estimate a run would be checked against, for the box and element order it would run with: the same
 * call the server makes before it queues a job (server/services/jobs.ts: estimateDesignElements(document, { order })).
 * Kept apart from the worker so tests run it in Node.
 */
import { estimateDesignElements } from '../../../../geometry/mesh/index';
import type { Design } from '../../../../geometry/design/types';

export interface RunEstimate {
  /** tetrahedra of the graded mesh (a lower bound when `atLeast`) */
  elements: number;
  atLeast: boolean;
  /** min(refinement.maxElements, the server's cap): a run above it is refused */
  limit: number;
  /** the limit is the design's refinement.maxElements (else the server's cap) */
  limitIsDesign: boolean;
}

export interface RunEstimateWorkerApi {
  estimate(design: Design, order: 1 | 2): RunEstimate;
}

export function estimateRun(design: Design, order: 1 | 2): RunEstimate {
  const e = estimateDesignElements(design, { order });
  return { elements: Math.round(e.estimate), atLeast: e.aborted, limit: e.limit, limitIsDesign: e.maxElements <= e.hardCap };
}
