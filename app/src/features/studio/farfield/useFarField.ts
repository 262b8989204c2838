/**
 * The live far-field check. A Web Worker keeps the design resident and gets only the changes
 * (diffDesign); edits that arrive while it is busy are folded into one update, so a drag never
 * queues stale work. The element estimate of the graded mesh (slow for big designs) runs in a
 * second worker once edits pause for ELEMENTS_DELAY_MS, and that worker is terminated as soon as
 * an edit makes its answer stale: the bounds stay live during drags.
 */
import { useEffect, useRef, useState } from 'react';
import { releaseProxy, wrap, type Remote } from 'comlink';
import type { DesignDocument } from '@contracts/design';
import { withElementEstimate, type FarFieldReport } from '../../../../../geometry/farfield';
import { diffDesign } from './diffDesign';
import { unpackReport } from './transport';
import type { ElementsWorkerApi, FarFieldWorkerApi } from './workerCore';

export interface FarFieldState {
  report: FarFieldReport | null;
  /** the worker is updating the bounds for a newer document */
  computing: boolean;
  error: string | null;
  /** the bounds are current, the element estimate is still being worked out */
  elementsPending: boolean;
}

/** Quiet time after the last edit before the element estimate starts (ms). */
const ELEMENTS_DELAY_MS = 250;

function describe(e: unknown): string {
  const msg = e instanceof Error ? e.message : String(e);
  return `The far-field check failed: ${msg}`;
}

interface Estimator {
  worker: Worker;
  remote: Remote<ElementsWorkerApi>;
}

export function useFarField(document: DesignDocument): FarFieldState {
  const [state, setState] = useState<FarFieldState>({ report: null, computing: true, error: null, elementsPending: false });
  // the document the bounds worker holds, the newest one waiting, whether a call is out
  const sent = useRef<DesignDocument | null>(null);
  const waiting = useRef<DesignDocument | null>(null);
  const busy = useRef(false);
  const alive = useRef(true);
  const pumpRef = useRef<() => void>(() => {});
  const cancelEstimate = useRef<() => void>(() => {});
  // the last bounds from the worker (no element estimate)
  const lastBounds = useRef<FarFieldReport | null>(null);

  useEffect(() => {
    alive.current = true;
    const worker = new Worker(new URL('./farfield.worker.ts', import.meta.url), { type: 'module' });
    const remote = wrap<FarFieldWorkerApi>(worker);
    sent.current = null;
    lastBounds.current = null;
    worker.addEventListener('error', (e) => {
      if (alive.current) setState((s) => ({ ...s, computing: false, error: describe(e.message || 'the worker stopped') }));
    });

    // ---- the element estimate: one run at a time, terminated when stale
    let estimator: Estimator | null = null;
    let timer: ReturnType<typeof setTimeout> | null = null;
    let token = 0;
    let running = false;
    const stopEstimator = () => {
      if (!estimator) return;
      estimator.remote[releaseProxy]();
      estimator.worker.terminate();
      estimator = null;
    };
    cancelEstimate.current = () => {
      if (timer) clearTimeout(timer);
      timer = null;
      token++;
      // a run in flight is stale now: stop it rather than wait for it
      if (running) stopEstimator();
    };
    const estimate = async (doc: DesignDocument, report: FarFieldReport) => {
      timer = null;
      const mine = ++token;
      if (!estimator) {
        const w = new Worker(new URL('./elements.worker.ts', import.meta.url), { type: 'module' });
        estimator = { worker: w, remote: wrap<ElementsWorkerApi>(w) };
      }
      running = true;
      try {
        const rec = report.recommendedHalfExtentsNm;
        const n = await estimator.remote.estimate(doc, [rec[0], rec[1], rec[2]]);
        if (alive.current && mine === token) setState((s) => ({ ...s, report: withElementEstimate(report, n, doc.refinement.maxElements), elementsPending: false }));
      } catch (e) {
        if (alive.current && mine === token) setState((s) => ({ ...s, elementsPending: false, error: describe(e) }));
      } finally {
        if (mine === token) running = false;
      }
    };

    // ---- the bounds
    pumpRef.current = async () => {
      if (busy.current || !waiting.current || !alive.current) return;
      const doc = waiting.current;
      waiting.current = null;
      busy.current = true;
      setState((s) => (s.computing ? s : { ...s, computing: true }));
      try {
        const diff = diffDesign(sent.current, doc);
        const report =
          diff.kind === 'reset' ? unpackReport(await remote.reset(diff.design)) : diff.kind === 'changes' ? unpackReport(await remote.apply(diff.changes)) : lastBounds.current;
        sent.current = doc;
        lastBounds.current = report;
        if (alive.current && !waiting.current && report) {
          // the CLI gives no estimate when no box size meets the target; nor do we
          const estimable = report.recommendedHalfExtentsNm.every(Number.isFinite);
          setState({ report, computing: false, error: null, elementsPending: estimable });
          if (estimable) timer = setTimeout(() => void estimate(doc, report), ELEMENTS_DELAY_MS);
        }
      } catch (e) {
        // the worker's copy may be out of step: send the whole document next time
        sent.current = null;
        if (alive.current) setState((s) => ({ ...s, computing: false, error: describe(e) }));
      } finally {
        busy.current = false;
        if (waiting.current) pumpRef.current();
      }
    };
    if (waiting.current) pumpRef.current();

    return () => {
      alive.current = false;
      if (timer) clearTimeout(timer);
      stopEstimator();
      remote[releaseProxy]();
      worker.terminate();
      busy.current = false;
    };
  }, []);

  useEffect(() => {
    waiting.current = document;
    cancelEstimate.current();
    pumpRef.current();
  }, [document]);

  return state;
}
