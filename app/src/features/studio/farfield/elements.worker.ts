/// <reference lib="webworker" />
/**
 * The element estimate for the recommended box, in a worker of its own: it can take far longer
 * than the bounds for a big design, and the page terminates this worker when an edit makes its
 * answer stale, so the bounds worker is never held up.
 */
import { expose } from 'comlink';
import { estimateElementsFor, type ElementsWorkerApi } from './workerCore';

const api: ElementsWorkerApi = { estimate: estimateElementsFor };
expose(api);
