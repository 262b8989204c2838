/// <reference lib="webworker" />
/** The far-field worker: the design stays resident here; the page sends changes (see useFarField). */
import { expose, transfer } from 'comlink';
import { createWorkerCore, type FarFieldWorkerApi } from './workerCore';
import { packedBuffers } from './transport';

const core = createWorkerCore();
// the report's typed arrays are moved to the page, not copied
const api: FarFieldWorkerApi = {
  reset: (design) => {
    const p = core.reset(design);
    return transfer(p, packedBuffers(p));
  },
  apply: (changes) => {
    const p = core.apply(changes);
    return transfer(p, packedBuffers(p));
  },
};
expose(api);
