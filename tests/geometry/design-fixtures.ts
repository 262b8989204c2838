/**
 * Design documents for the geometry tests (invented demo scenarios). The document header and the
 * silicon host are filled in here, so each test states only what it is about: sites, box and
 * refinement.
 */
import type { Design, Host, Site, Vec3 } from '../../geometry/design/types';
import { SI_EPSILON_R, SI_LATTICE_CONSTANT_NM } from '../../geometry/units';

export type DesignParts = Pick<Design, 'name' | 'sites' | 'domain' | 'refinement'> & { host?: Partial<Host> };

/** A design in silicon: εr and lattice constant from geometry/units unless `host` overrides them. */
export function siliconDesign({ name, host, sites, domain, refinement }: DesignParts): Design {
  return {
    format: 'tetrawell-design',
    version: 1,
    name,
    host: { material: 'Si', epsilonR: host?.epsilonR ?? SI_EPSILON_R, latticeConstantNm: host?.latticeConstantNm ?? SI_LATTICE_CONSTANT_NM },
    sites,
    domain,
    refinement,
  };
}

/**
 * Sites s0, s1, … (a P donor with one electron at the origin, unless the entry says otherwise) in a
 * grounded box centred at the origin: the mesher tests' usual layout.
 */
export function boxDesign(
  name: string, sites: Partial<Site>[], half: Vec3, order: 1 | 2, tol: number, maxElements = 5_000_000,
): Design {
  return siliconDesign({
    name,
    // the rounded lattice constant these tests were written with (the mesher does not read it)
    host: { latticeConstantNm: 0.5431 },
    sites: sites.map((s, i) => ({ id: `s${i}`, species: 'P', position: [0, 0, 0], electrons: 1, ...s })),
    domain: { center: [0, 0, 0], halfExtentsNm: half, boundary: { kind: 'grounded' } },
    refinement: { order, targetRelError: tol, maxElements },
  });
}
