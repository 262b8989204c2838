/**
 * The element estimate of the document as it stands (its current domain) for the element order picked for the
 * run, worked out in a worker after edits pause; a stale run is terminated.
 */
import { useEffect, useState } from 'react';
import { releaseProxy, wrap } from 'comlink';
import type { DesignDocument } from '@contracts/design';
import type { RunEstimate, RunEstimateWorkerApi } from './runEstimateCore';

/** quiet time after the last edit before the estimate starts (ms; common practice) */
const DELAY_MS = 600;

export type RunEstimateState = { kind: 'pending' } | { kind: 'done'; estimate: RunEstimate } | { kind: 'error'; message: string };

export function useRunEstimate(document: DesignDocument, order: 1 | 2): RunEstimateState {
  const [state, setState] = useState<{ key: unknown; value: RunEstimateState }>({ key: null, value: { kind: 'pending' } });
  useEffect(() => {
    let alive = true;
    let worker: Worker | null = null;
    let release: (() => void) | null = null;
    const key = { document, order };
    const timer = setTimeout(() => {
      worker = new Worker(new URL('./runEstimate.worker.ts', import.meta.url), { type: 'module' });
      const remote = wrap<RunEstimateWorkerApi>(worker);
      release = () => remote[releaseProxy]();
      remote
        .estimate(document, order)
        .then((estimate) => alive && setState({ key, value: { kind: 'done', estimate } }))
        .catch((e: unknown) => alive && setState({ key, value: { kind: 'error', message: e instanceof Error ? e.message : String(e) } }));
    }, DELAY_MS);
    return () => {
      alive = false;
      clearTimeout(timer);
      release?.();
      worker?.terminate();
    };
  }, [document, order]);
  // an answer for an earlier document or order is not shown
  return state.key && (state.key as { document: unknown }).document === document && (state.key as { order: number }).order === order ? state.value : { kind: 'pending' };
}

export function runEstimateText(s: RunEstimateState): string {
  if (s.kind === 'pending') return 'estimating…';
  if (s.kind === 'error') return `no estimate (${s.message})`;
  const e = s.estimate;
  const n = e.elements.toLocaleString('en-US');
  const over = e.atLeast || e.elements > e.limit;
  return `${e.atLeast ? 'more than' : 'about'} ${n} elements (limit ${e.limit.toLocaleString('en-US')} elements, ${e.limitIsDesign ? 'the design’s maxElements' : 'the server’s cap'})${over ? ': over the limit, the server will refuse this run' : ''}`;
}
