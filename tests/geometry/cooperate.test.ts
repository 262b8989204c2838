/**
 * Turn-taking points (geometry/cooperate.ts): the mesher, the exports and every abort check call the installed hook,
 * often enough that no stretch of work between two calls is long (the server's job threads pause there while
 * requests are being served), and the hook changes nothing in the result (same input, same bytes).
 */
import { afterEach, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { setCooperationHook, cooperate } from '../../geometry/cooperate';
import { buildMeshArtifact, encodeMesh } from '../../geometry/pipeline/index';
import { throwIfAborted } from '../../geometry/errors';
import type { Design } from '../../geometry/design/types';

const PLAQUETTE = JSON.parse(readFileSync(fileURLToPath(new URL('../fixtures/designs/plaquette.json', import.meta.url)), 'utf8')) as Design;

afterEach(() => setCooperationHook(null));

describe('cooperate', () => {
  it('does nothing without a hook, and calls the hook once per call with one', () => {
    cooperate();
    let n = 0;
    setCooperationHook(() => n++);
    cooperate();
    throwIfAborted(undefined);
    expect(n).toBe(2);
  });

  it('meshing and encoding call the hook throughout, and the files are byte-identical with and without it', () => {
    const plain = buildMeshArtifact(PLAQUETTE, { order: 2 });
    const plainVtu = encodeMesh(plain, 'vtu');
    const plainVtk = encodeMesh(plain, 'vtk');
    let calls = 0;
    setCooperationHook(() => calls++);
    const hooked = buildMeshArtifact(PLAQUETTE, { order: 2 });
    const afterMesh = calls;
    const vtu = encodeMesh(hooked, 'vtu');
    const afterVtu = calls;
    const vtk = encodeMesh(hooked, 'vtk');
    expect(afterMesh).toBeGreaterThan(10);
    expect(afterVtu).toBeGreaterThan(afterMesh);
    expect(calls).toBeGreaterThan(afterVtu);
    expect(Buffer.from(vtu).equals(Buffer.from(plainVtu))).toBe(true);
    expect(Buffer.from(vtk).equals(Buffer.from(plainVtk))).toBe(true);
    expect(Buffer.from(encodeMesh(hooked, 'binary')).equals(Buffer.from(encodeMesh(plain, 'binary')))).toBe(true);
  });
});
