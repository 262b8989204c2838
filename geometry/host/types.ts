/**
 * Input and output types of the layered host (issue 11). The field names of `HostLayer` and
 * `Electrode` are the design document's (`host.layers`, `electrodes`, geometry/design/types.ts).
 *
 * Units: lengths in nm, potentials in V, energies in eV (meV/V for lever arms).
 */
import type { Electrode, HostLayer } from '../design/types';

export type { Electrode, HostLayer };

/**
 * A planar stack after checking: `interfaces[k]` (nm, strictly increasing) separates region k
 * (below) from region k + 1 (above); `epsilon[k]` is region k's relative permittivity, `Infinity`
 * for metal. Region 0 extends to z = −∞ and the last region to z = +∞.
 *
 *        region m     ε[m]      (z > interfaces[m−1])
 *     ───────────────────────── interfaces[m−1]
 *           ...
 *     ───────────────────────── interfaces[0]
 *        region 0     ε[0]      (z < interfaces[0])
 */
export interface PlanarStack {
  interfaces: Float64Array;
  epsilon: Float64Array;
  /** name of each region (the layer's name, or the electrode's for a metal plane) */
  names: string[];
}

/** Codes of the layered host's findings; words belong to the CLI and the app. */
export type HostCode =
  | 'no-layers'
  | 'layer-order' // a layer's zMinNm differs from the previous layer's zMaxNm (gap, overlap or wrong order)
  | 'layer-empty' // zMaxNm ≤ zMinNm
  | 'layer-epsilon' // εr not finite and positive
  | 'bounded-end' // lowest zMinNm or highest zMaxNm is not null: the end layer is taken as unbounded
  | 'inner-unbounded' // a null bound on an inner layer
  | 'on-interface' // a point lies on an interface (within 1e-9 nm)
  | 'in-metal' // a charge lies inside metal
  | 'too-many-interfaces' // more than two interfaces between the nearest metals: no closed form here
  | 'series-capped' // the image series hit its term cap before its tolerance; the bound says by how much
  | 'electrode-not-plane' // an electrode that does not span the domain's cross-section (needs the FEM)
  | 'electrode-straddles' // a metal plane has sites on both sides
  | 'no-domain' // electrodes given without a domain box: planes cannot be recognised
  | 'not-between-plates' // lever arms in closed form need metal on both sides and dielectrics between
  | 'density-leaks' // a noticeable share of a density lies across an interface (point-image approximation)
  | 'pairs-not-given' // too many sites for all pairs and no pair list given
  | 'point-image'; // a pair without a closed-form interaction: the image interaction uses 1/R

export interface HostFinding {
  code: HostCode;
  /** index of the layer, electrode or site concerned, when there is one */
  index?: number;
  /** a figure that goes with the code (nm, fraction or bound), when there is one */
  value?: number;
}
