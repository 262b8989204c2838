/**
 * The live far-field check: a Web Worker keeps the design resident and gets only the changes
 * (diffDesign). Edits that arrive while the worker is busy are folded into one update, so a drag
 * never queues up stale work. The bounds come back first; the element estimate of the graded
 * mesh follows once edits pause (it can take longer than the bounds).
 */
import { useEffect, useRef, useState } from 'react';
import { releaseProxy, wrap, type Remote } from 'comlink';
import type { DesignDocument } from '@contracts/design';
import type { FarFieldReport } from '../../../../../geometry/farfield';
import { diffDesign } from './diffDesign';
import type { FarFieldWorkerApi } from './workerCore';

export interface FarFieldState {
  report: FarFieldReport | null;
  /** the worker is updating the bounds for a newer document */
  computing: boolean;
  error: string | null;
  /** the bounds are current, the element estimate is still being worked out */
  elementsPending: boolean;
}

/** Quiet time after the last edit before the element estimate runs (ms). */
const ELEMENTS_DELAY_MS = 250;

function describe(e: unknown): string {
  const msg = e instanceof Error ? e.message : String(e);
  return `The far-field check failed: ${msg}`;
}

export function useFarField(document: DesignDocument): FarFieldState {
  const [state, setState] = useState<FarFieldState>({ report: null, computing: true, error: null, elementsPending: false });
  const api = useRef<Remote<FarFieldWorkerApi> | null>(null);
  // the document the worker holds, the newest one waiting, whether a call is out
  const sent = useRef<DesignDocument | null>(null);
  const waiting = useRef<DesignDocument | null>(null);
  const busy = useRef(false);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const alive = useRef(true);
  const pumpRef = useRef<() => void>(() => {});

  useEffect(() => {
    alive.current = true;
    const worker = new Worker(new URL('./farfield.worker.ts', import.meta.url), { type: 'module' });
    const remote = wrap<FarFieldWorkerApi>(worker);
    api.current = remote;
    sent.current = null;
    worker.addEventListener('error', (e) => {
      if (alive.current) setState((s) => ({ ...s, computing: false, error: describe(e.message || 'the worker stopped') }));
    });

    const elements = async () => {
      timer.current = null;
      if (busy.current || waiting.current || !alive.current) return;
      busy.current = true;
      try {
        const report = await remote.withElements();
        if (alive.current && !waiting.current) setState({ report, computing: false, error: null, elementsPending: false });
      } catch (e) {
        if (alive.current) setState((s) => ({ ...s, elementsPending: false, error: describe(e) }));
      } finally {
        busy.current = false;
        if (waiting.current) pumpRef.current();
      }
    };

    pumpRef.current = async () => {
      if (busy.current || !waiting.current || !alive.current) return;
      const doc = waiting.current;
      waiting.current = null;
      if (timer.current) clearTimeout(timer.current);
      timer.current = null;
      busy.current = true;
      setState((s) => (s.computing ? s : { ...s, computing: true }));
      try {
        const diff = diffDesign(sent.current, doc);
        let report: FarFieldReport | null = null;
        if (diff.kind === 'reset') report = await remote.reset(diff.design);
        else if (diff.kind === 'changes') report = await remote.apply(diff.changes);
        sent.current = doc;
        if (alive.current && !waiting.current) {
          setState((s) => ({ report: report ?? s.report, computing: false, error: null, elementsPending: true }));
          timer.current = setTimeout(elements, ELEMENTS_DELAY_MS);
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
      if (timer.current) clearTimeout(timer.current);
      remote[releaseProxy]();
      worker.terminate();
      api.current = null;
      busy.current = false;
    };
  }, []);

  useEffect(() => {
    waiting.current = document;
    pumpRef.current();
  }, [document]);

  return state;
}
