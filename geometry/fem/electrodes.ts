/**
 * The electrodes in the finite-element problem: which degrees of freedom are Dirichlet and at what
 * value. One function for both problems that fix them: the charge problem (coulomb-level.ts: every
 * electrode at 0 V, walls per the box's boundary) and the electrodes' Laplace problem (lever.ts).
 * εr per region and the conformity check are device.ts's.
 *
 * A dof belongs to electrode g when its node lies in or on g's clipped box (within LAYER_SNAP_NM;
 * geometry/mesh/device.ts electrodeOfPoints, the mesher's own rule for its vertices): the P1
 * vertices, and for P2 the edge midpoints. On a conforming mesh (device.ts deviceMesh) an edge
 * midpoint lies in a box exactly when both endpoints do (the box is convex, and an edge with one
 * endpoint outside crosses no face, so its midpoint is outside). The domain walls of the
 * electrodes' problem are Dirichlet at 0 V ('grounded') or natural (∂φ/∂n = 0,
 * 'zero-normal-field') per design.domain.electrodeWalls; a wall node on an electrode keeps the
 * electrode's value.
 */
import type { Design, ElectrodeWalls } from '../design/types';
import { NO_ELECTRODE, clippedElectrodes, electrodeOfPoints } from '../mesh/device';
import { LAYER_SNAP_NM } from './device';
import type { FeSpace } from './space';

export interface ElectrodeDofs {
  /** electrode index of each dof in or on an electrode, NO_ELECTRODE elsewhere */
  electrodeOfDof: Uint8Array;
  /** 1 for every Dirichlet dof of the electrodes' problem (electrodes, and the walls when grounded) */
  fixed: Uint8Array;
  walls: ElectrodeWalls;
  /** Dirichlet dofs per electrode (an electrode clipped away or unresolved has none) */
  perElectrode: number[];
}

/** The electrodes' dofs on a space over a conforming mesh (device.ts deviceMesh or meshDesign). */
export function electrodeDofs(space: FeSpace, design: Design): ElectrodeDofs {
  const n = space.nDofs;
  const walls: ElectrodeWalls = design.domain.electrodeWalls ?? 'grounded';
  const electrodeOfDof = electrodeOfPoints(clippedElectrodes(design), space.dofCoords, LAYER_SNAP_NM);
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
