/**
 * The design document (format version 1) as plain TypeScript types.
 *
 * The numerical core never imports zod: the runtime schema lives in
 * `server/contracts/design.ts` and a type-level test asserts that the schema's
 * `z.infer` output is assignable to these types, so the two cannot drift apart.
 *
 * Units: lengths in nm, energies in eV, everywhere.
 */
export type Vec3 = [number, number, number];

export type Species = 'P' | 'As' | 'Sb' | 'Bi' | 'B';

export type Orbital =
  /** density ∝ exp(-2r/a), a = radiusNm */
  | { model: 'hydrogenic-1s'; radiusNm: number }
  /** density ∝ exp(-2 sqrt((x²+y²)/a² + z²/b²)), a = radiusNm, b = radiusZNm (z along [001]) */
  | { model: 'anisotropic-1s'; radiusNm: number; radiusZNm: number }
  /** density ∝ exp(-r²/2σ²), σ = sigmaNm per axis */
  | { model: 'gaussian'; sigmaNm: number };

export interface Site {
  id: string;
  species: Species;
  position: Vec3;
  /** electrons bound to the site (0, 1 or 2); 0 means an ionised core with no density */
  electrons: number;
  /** when omitted the species preset applies */
  orbital?: Orbital;
  /**
   * optional cluster label: donors sharing it form one array site (one node of the bond
   * graph); close pairs inside a cluster are expected and not flagged as overlapping
   */
  cluster?: string;
}

export interface Host {
  material: 'Si';
  epsilonR: number;
  latticeConstantNm: number;
}

export type Boundary = { kind: 'grounded' } | { kind: 'multipole'; order: number };

export interface Domain {
  center: Vec3;
  halfExtentsNm: Vec3;
  boundary: Boundary;
}

export interface Refinement {
  /** finite-element order: 1 (linear) or 2 (quadratic) */
  order: 1 | 2;
  targetRelError: number;
  maxElements: number;
}

export interface Design {
  format: 'tetrawell-design';
  version: 1;
  name: string;
  host: Host;
  sites: Site[];
  domain: Domain;
  refinement: Refinement;
}
