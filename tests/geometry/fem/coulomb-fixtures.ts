/** Small design builders shared by the Coulomb-layer tests (invented demo scenarios). */
import type { Boundary, Design, Orbital, Site, Vec3 } from '../../../geometry/design/types';
import { siliconDesign } from '../design-fixtures';

export function oneSite(orbital: Orbital, opts: { half?: number; boundary?: Boundary; order?: 1 | 2; tol?: number; position?: Vec3; center?: Vec3; maxElements?: number; epsilonR?: number } = {}): Design {
  const half = opts.half ?? 30;
  return siliconDesign({
    name: 'test donor',
    host: { epsilonR: opts.epsilonR },
    sites: [{ id: 'd1', species: 'P', position: opts.position ?? [0, 0, 0], electrons: 1, orbital }],
    domain: { center: opts.center ?? [0, 0, 0], halfExtentsNm: [half, half, half], boundary: opts.boundary ?? { kind: 'multipole', order: 0 } },
    refinement: { order: opts.order ?? 2, targetRelError: opts.tol ?? 1e-3, maxElements: opts.maxElements ?? 2_000_000 },
  });
}

export function withSites(base: Design, sites: Site[]): Design {
  return { ...base, sites };
}
