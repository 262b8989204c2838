/**
 * geometry/pipeline: plain functions that return data. The mesh artifact's summary is the quality
 * report's figures, its bytes are deterministic, and the solve reports progress as data
 * ({ phase, level, site, fraction }: fractions never go back, levels and sites are the design's).
 * Checks: the domain volume is exact (a box's volume, elementary geometry); the rest are
 * invariants (common practice).
 */
import { describe, expect, it } from 'vitest';
import { buildMeshArtifact, encodeMesh, coulombResults, type CoreProgress } from '../../../geometry/pipeline/index';
import { siliconDesign } from '../design-fixtures';

const design = siliconDesign({
  name: 'pipeline pair (invented)',
  sites: [
    { id: 'west', species: 'P', position: [-2, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 1 } },
    { id: 'east', species: 'P', position: [2, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 1 } },
    { id: 'far', species: 'P', position: [30, 0, 0], electrons: 1 },
  ],
  domain: { center: [0, 0, 0], halfExtentsNm: [12, 12, 12], boundary: { kind: 'multipole', order: 2 } },
  refinement: { order: 1, targetRelError: 0.1, maxElements: 200_000 },
});

describe('buildMeshArtifact', () => {
  it('returns the mesh, the size field at its vertices, the summary and the sites it cannot grade', () => {
    const events: CoreProgress[] = [];
    const a = buildMeshArtifact(design, { onProgress: (p) => events.push(p) });
    expect(a.order).toBe(1);
    expect(a.sizeField.length).toBe(a.mesh.coords.length / 3);
    expect(Math.min(...a.sizeField)).toBeGreaterThan(0);
    expect(a.summary.tets).toBe(a.mesh.tets.length / 4);
    expect(a.summary.vertices).toBe(a.mesh.coords.length / 3);
    expect(a.summary.levels.reduce((s, n) => s + n, 0)).toBe(a.summary.tets);
    // the mesh fills the box exactly: 24³ nm³ (elementary geometry)
    expect(a.summary.volumeNm3).toBeCloseTo(24 ** 3, 6);
    expect(a.outsideSiteIds).toEqual(['far']);
    expect(a.pointData).toEqual([]);
    expect(events.map((e) => e.phase)).toEqual(['mesh', 'quality']);
  });

  it('encodes the same bytes every time', () => {
    const a = buildMeshArtifact(design);
    const b = buildMeshArtifact(design);
    for (const f of ['vtu', 'vtk', 'binary'] as const) expect(Buffer.from(encodeMesh(a, f)).equals(Buffer.from(encodeMesh(b, f)))).toBe(true);
  });
});

describe('coulombResults progress', () => {
  it('is data: phase, level, site and a fraction that never goes back, ending at 1', () => {
    const inside = { ...design, sites: design.sites.slice(0, 2) };
    const events: CoreProgress[] = [];
    const out = coulombResults(inside, { levels: 2, pairs: 'all', onProgress: (p) => events.push(p) });
    expect(out.hasNumbers).toBe(true);
    expect(out.json.sites.map((s) => s.id)).toEqual(['west', 'east']);
    expect(out.table.rows.length).toBe(3); // U of two sites, V of one pair
    for (const e of events) expect(Object.keys(e).every((k) => ['phase', 'level', 'site', 'fraction'].includes(k))).toBe(true);
    for (let k = 1; k < events.length; k++) expect(events[k].fraction).toBeGreaterThanOrEqual(events[k - 1].fraction);
    expect(events[0].phase).toBe('mesh');
    expect(events.at(-1)).toEqual({ phase: 'done', fraction: 1 });
    const solving = events.filter((e) => e.phase === 'solve' || e.phase === 'load');
    expect(new Set(solving.map((e) => e.site))).toEqual(new Set(['west', 'east']));
    expect(new Set(solving.map((e) => e.level))).toEqual(new Set([1, 2]));
  });
});
