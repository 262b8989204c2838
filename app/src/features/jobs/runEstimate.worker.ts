/// <reference lib="webworker" />
/**
 * The run's element estimate (runEstimateCore.ts) in a worker of its own: the page terminates it when an edit or a
 * new order makes its answer stale.
 */
import { expose } from 'comlink';
import { estimateRun, type RunEstimateWorkerApi } from './runEstimateCore';

const api: RunEstimateWorkerApi = { estimate: estimateRun };
expose(api);
