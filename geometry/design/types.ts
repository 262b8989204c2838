/**
 * The design document (format version 2) as plain TypeScript types.
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

/**
 * One layer of a planar stack along [001] (z), listed from bottom to top; `zMinNm` of the lowest
 * layer and `zMaxNm` of the highest may be null (unbounded). Layers touch: each layer's zMinNm is
 * the previous layer's zMaxNm.
 */
export interface HostLayer {
  name: string;
  epsilonR: number;
  zMinNm: number | null;
  zMaxNm: number | null;
}

export interface Host {
  material: 'Si';
  /** the host's relative permittivity everywhere when `layers` is absent (the version-1 meaning) */
  epsilonR: number;
  latticeConstantNm: number;
  /** a planar stack (silicon under an oxide and vacuum, …); absent: one homogeneous host */
  layers?: HostLayer[];
}

/**
 * A metal box at a set voltage, clipped to the domain box and cut out of it (a Dirichlet
 * boundary). A box spanning the domain's whole x–y cross-section is a metal plane (a top or back
 * gate). A heavily doped in-plane lead is modelled as such a metal box.
 */
export interface Electrode {
  name: string;
  minNm: Vec3;
  maxNm: Vec3;
  voltageV: number;
}

export type Boundary = { kind: 'grounded' } | { kind: 'multipole'; order: number };

/**
 * What the domain's walls are for the electrodes' (Laplace) problem of the lever arms:
 *   'grounded'           every wall at 0 V (a far grounded enclosure of the device)
 *   'zero-normal-field'  ∂φ/∂n = 0 on the walls (field lines leave no charge there; right for walls
 *                        that electrodes cross, wrong where real metal is near)
 */
export type ElectrodeWalls = 'grounded' | 'zero-normal-field';

export interface Domain {
  center: Vec3;
  halfExtentsNm: Vec3;
  boundary: Boundary;
  /** the walls of the electrodes' problem (default 'grounded') */
  electrodeWalls?: ElectrodeWalls;
}

export interface Refinement {
  /** finite-element order: 1 (linear) or 2 (quadratic) */
  order: 1 | 2;
  targetRelError: number;
  maxElements: number;
}

export interface Design {
  format: 'tetrawell-design';
  version: 2;
  name: string;
  host: Host;
  sites: Site[];
  domain: Domain;
  /** metal electrodes at set voltages (absent or empty: none) */
  electrodes?: Electrode[];
  refinement: Refinement;
}
