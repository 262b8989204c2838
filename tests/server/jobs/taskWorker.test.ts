/**
 * The job thread's body (server/jobs/task.worker.ts), run in-process: a thread lives on between
 * jobs, so after each job it hands back the WebAssembly memory a big matrix grew (the spmv arena
 * above SPMV_KEEP_BYTES is dropped, and the next solve instantiates a fresh one-page arena; the block solver's
 * kernels keep their memory with their matrix and go with it).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import runTask from '../../../server/jobs/task.worker';
import { prepareSpmv, spmvArenaBytes, SPMV_KEEP_BYTES } from '../../../geometry/fem/spmv-wasm';
import type { Csr } from '../../../geometry/fem/csr';

const ROOT = path.resolve(import.meta.dirname, '../../..');
const PAIR_JSON = readFileSync(path.join(ROOT, 'tests/fixtures/designs/pair-coarse.json'), 'utf8');

/** a diagonal matrix of size n: its arena takes 4(n+1) + 12n + 16n bytes */
function diagonal(n: number): Csr {
  const rowPtr = new Uint32Array(n + 1);
  for (let i = 0; i <= n; i++) rowPtr[i] = i;
  return { n, rowPtr, cols: Uint32Array.from(rowPtr.subarray(0, n)), vals: new Float64Array(n).fill(2) };
}

describe('job thread', () => {
  it('drops the spmv arena a big matrix grew once the job is done; a small arena is kept', () => {
    // larger than SPMV_KEEP_BYTES
    prepareSpmv(diagonal(Math.ceil(SPMV_KEEP_BYTES / 32) + 1024));
    expect(spmvArenaBytes()).toBeGreaterThan(SPMV_KEEP_BYTES);
    const out = runTask({ kind: 'mesh', documentJson: PAIR_JSON, options: { order: 1 } });
    expect(out.ok).toBe(true);
    expect(spmvArenaBytes()).toBe(0);

    // a coulomb job solves in blocks of right-hand sides (geometry/fem/block-pcg.ts), whose kernels keep their
    // memory with their matrix (collected with it), not in this arena: after it the arena is within the threshold
    const solved = runTask({ kind: 'coulomb', documentJson: PAIR_JSON, options: { order: 1 } });
    expect(solved.ok).toBe(true);
    expect(spmvArenaBytes()).toBeLessThanOrEqual(SPMV_KEEP_BYTES);

    // an arena no larger than the threshold is kept for the next job
    prepareSpmv(diagonal(1024));
    const small = spmvArenaBytes();
    expect(small).toBeGreaterThan(0);
    expect(small).toBeLessThanOrEqual(SPMV_KEEP_BYTES);
    expect(runTask({ kind: 'mesh', documentJson: PAIR_JSON, options: { order: 1 } }).ok).toBe(true);
    expect(spmvArenaBytes()).toBe(small);
  });
});
