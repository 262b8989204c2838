/// <reference lib="webworker" />
/** The far-field worker: the design stays resident here; the page sends changes (see useFarField). */
import { expose } from 'comlink';
import { createWorkerCore } from './workerCore';

expose(createWorkerCore());
