/**
 * What the far-field workers do, without the workers: a resident session of the design (the
 * bounds), and the element estimate the command line prints (`npm run cli -- check`:
 * estimateDesignElements with no cap, rounded). Kept apart from the worker files so tests run
 * them in Node and compare them with the CLI.
 */
import { createFarFieldSession, type FarFieldChanges, type FarFieldSession } from '../../../../../geometry/farfield';
import { estimateDesignElements } from '../../../../../geometry/mesh/index';
import type { Design, Vec3 } from '../../../../../geometry/design/types';
import { packReport, type PackedReport } from './transport';

export interface FarFieldWorkerApi {
  /** take a whole design (first document, or after an error); returns the bounds, packed (unpackReport) */
  reset(design: Design): PackedReport;
  /** apply edits to the resident design; returns the bounds (no element estimate), packed */
  apply(changes: FarFieldChanges): PackedReport;
}

export interface ElementsWorkerApi {
  /** elements the graded mesh of `design` would need with these half-extents */
  estimate(design: Design, halfExtentsNm: Vec3): number;
}

/** The CLI's element count for a box: the mesher's estimate, uncapped, rounded. */
export function estimateElementsFor(design: Design, halfExtentsNm: Vec3): number {
  return Math.round(estimateDesignElements({ ...design, enclosure: { ...design.enclosure, halfExtentsNm } }, { maxElements: Infinity, hardCap: Infinity }).estimate);
}

export function createWorkerCore(): FarFieldWorkerApi {
  let session: FarFieldSession | null = null;
  return {
    reset(design) {
      session = createFarFieldSession(design);
      return packReport(session.report());
    },
    apply(changes) {
      if (!session) throw new Error('the far-field worker has no design yet');
      return packReport(session.applyChanges(changes));
    },
  };
}
