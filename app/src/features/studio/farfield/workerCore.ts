/**
 * What the far-field worker does, without the worker: a resident session of the design and the
 * element estimate the command line prints (`npm run cli -- check`: estimateDesignElements with no
 * cap, rounded). Kept apart from farfield.worker.ts so tests run it in Node and compare it with
 * the CLI.
 */
import { createFarFieldSession, type FarFieldChanges, type FarFieldReport, type FarFieldSession } from '../../../../../geometry/farfield';
import { estimateDesignElements } from '../../../../../geometry/mesh/index';
import type { Design } from '../../../../../geometry/design/types';

export interface FarFieldWorkerApi {
  /** take a whole design (first document, or after an error); returns the bounds */
  reset(design: Design): FarFieldReport;
  /** apply edits to the resident design; returns the bounds (no element estimate) */
  apply(changes: FarFieldChanges): FarFieldReport;
  /** the current report with the element estimate and its budget warning */
  withElements(): FarFieldReport;
}

export function createWorkerCore(): FarFieldWorkerApi {
  let session: FarFieldSession | null = null;
  return {
    reset(design) {
      session = createFarFieldSession(design, {
        estimateElements: (halfExtentsNm, d) =>
          Math.round(estimateDesignElements({ ...d, enclosure: { ...d.enclosure, halfExtentsNm } }, { maxElements: Infinity, hardCap: Infinity }).estimate),
      });
      return session.report();
    },
    apply(changes) {
      if (!session) throw new Error('the far-field worker has no design yet');
      return session.applyChanges(changes);
    },
    withElements() {
      if (!session) throw new Error('the far-field worker has no design yet');
      return session.reportWithElements();
    },
  };
}
