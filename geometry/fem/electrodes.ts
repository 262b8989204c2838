/**
 * Layers and electrodes in the finite-element problem: εr per region, and which degrees of
 * freedom are Dirichlet in the electrodes' (Laplace) problem and at what value.
 *
 *   region id (TetMesh.tetRegion)   εr
 *   k < 255                         host.layers[k].epsilonR   (host.epsilonR without layers)
 *   ELECTRODE_REGION = 255          1 (metal: any positive value serves, every dof of such a tet
 *                                   is Dirichlet, so it carries no energy)
 *
 * Dirichlet dofs of electrode g: the P1 vertices in or on its box (TetMesh.vertexElectrode) and,
 * for P2, the edge nodes whose two endpoints are in or on it (the box is convex, so the edge and
 * its midpoint lie in it; an edge with one endpoint outside crosses no face of a conforming mesh,
 * so its midpoint is outside). The domain walls are Dirichlet at 0 V ('grounded') or natural
 * (∂φ/∂n = 0, 'zero-normal-field') per design.domain.electrodeWalls; a wall node on an electrode
 * keeps the electrode's value.
 */
import type { Design, ElectrodeWalls } from '../design/types';
import { ELECTRODE_REGION, NO_ELECTRODE } from '../mesh/device';
import type { FeSpace } from './space';

/** εr of the metal region: any positive value (its dofs are all fixed). */
export const METAL_EPSILON = 1;

/** εr per region id (256 entries), from the design's layers (or host.epsilonR everywhere). */
export function epsByRegion(design: Design): Float64Array {
  const eps = new Float64Array(256).fill(design.host.epsilonR);
  const layers = design.host.layers ?? [];
  layers.forEach((l, k) => (eps[k] = l.epsilonR));
  eps[ELECTRODE_REGION] = METAL_EPSILON;
  return eps;
}

export interface ElectrodeDofs {
  /** electrode index of each dof in or on an electrode, NO_ELECTRODE elsewhere */
  electrodeOfDof: Uint8Array;
  /** 1 for every Dirichlet dof of the electrodes' problem (electrodes, and the walls when grounded) */
  fixed: Uint8Array;
  walls: ElectrodeWalls;
  /** Dirichlet dofs per electrode (an electrode clipped away or unresolved has none) */
  perElectrode: number[];
}

/** The Dirichlet dofs of the electrodes' problem on a space whose mesh came from meshDesign. */
export function electrodeDofs(space: FeSpace, design: Design): ElectrodeDofs {
  const ve = space.mesh.vertexElectrode;
  const nV = space.nVertices;
  const n = space.nDofs;
  const walls: ElectrodeWalls = design.domain.electrodeWalls ?? 'grounded';
  const electrodeOfDof = new Uint8Array(n).fill(NO_ELECTRODE);
  if (ve) {
    electrodeOfDof.set(ve.subarray(0, nV));
    const edges = space.edges;
    for (let e = 0; e < edges.length / 2; e++) {
      const a = ve[edges[2 * e]];
      if (a !== NO_ELECTRODE && a === ve[edges[2 * e + 1]]) electrodeOfDof[nV + e] = a;
    }
  }
  const fixed = new Uint8Array(n);
  const perElectrode = new Array<number>(design.electrodes?.length ?? 0).fill(0);
  for (let i = 0; i < n; i++) {
    const g = electrodeOfDof[i];
    if (g !== NO_ELECTRODE) {
      fixed[i] = 1;
      perElectrode[g]++;
    } else if (walls === 'grounded' && space.boundaryDof[i]) fixed[i] = 1;
  }
  return { electrodeOfDof, fixed, walls, perElectrode };
}

/** Dirichlet values with electrode g at `volts` and every other electrode and grounded wall at 0. */
export function electrodeValues(dofs: ElectrodeDofs, g: number, volts = 1): Float64Array {
  const v = new Float64Array(dofs.electrodeOfDof.length);
  for (let i = 0; i < v.length; i++) if (dofs.electrodeOfDof[i] === g) v[i] = volts;
  return v;
}
