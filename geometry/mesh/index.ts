/**
 * Public API of the mesher (geometry/mesh):
 *
 *   kuhnBox(opts)            → BisectionMesh   initial Kuhn mesh of a box, tagged for bisection
 *   refine(mesh, marked)     → BisectionMesh   bisect marked tets once, then close (in place)
 *   refineUniform(mesh, n)   → BisectionMesh   n rounds of bisecting every tet
 *   toTetMesh(mesh)          → TetMesh         exact-length, positively oriented copy for FEM/export
 *
 * A BisectionMesh keeps the Maubach vertex order and tags, so refine() can be called again on the
 * result (the adaptive FEM loop calls it with Dörfler marks).
 */
export { kuhnBox, refine, refineWithStats, refineUniform, refineToSize, toTetMesh } from './bisection';
export type { BisectionMesh, KuhnBoxOptions, RefineOptions, RefineStats, TooLarge } from './bisection';
export { MeshError } from './errors';
export type { MeshErrorCode } from './errors';
export type { TetMesh } from './types';
export { NO_PARENT } from './types';

/*
 *   meshDesign(design, options?) → { mesh, sizeField, estimate, stats }
 *       graded mesh of a design: size field from the sites (sizefield.ts), element-count estimate
 *       and refusal above maxElements / the server cap (estimate.ts), bisection to the size field.
 */
export { meshDesign, estimateDesignElements, checkElementEstimate, CHECK_ESTIMATE_MAX_LEAVES, chooseInitialCells, DEFAULT_HARD_CAP } from './mesh-design';
export type { MeshDesignOptions, MeshDesignResult, MeshDesignStats, DesignEstimate } from './mesh-design';
export { SizeField, sizeFieldFromDesign, gradingExponent, autoCoreSize, orbitalLength } from './sizefield';
export type { SizeFieldSpec, SizeFieldParams, SizeFieldOptions, SizeClassSpec } from './sizefield';
export { estimateTetCount, LADDER_MEAN_CONSTANT } from './estimate';
export type { EstimateResult } from './estimate';

/*
 *   layers and electrodes (device.ts): grid planes at interfaces and electrode faces, region per
 *   layer, ELECTRODE_REGION inside electrodes, vertexElectrode (NO_ELECTRODE elsewhere).
 */
export { ELECTRODE_REGION, NO_ELECTRODE, hasDevice, clippedElectrodes, deviceGrid, layerIndexAt, electrodeEdgeSegments } from './device';
export type { DeviceGrid, ClippedElectrode } from './device';
export { electrodeEdgeExponent, ELECTRODE_EDGE_DIVISOR } from './sizefield';
export type { ElectrodeEdgeSpec } from './sizefield';
/* the default electrode-edge size of a nested family's finest mesh (edge-rule.ts) */
export { electrodeEdgeRule, nearestEdgeDistance, EDGE_RULE_RATE, EDGE_RULE_CONSTANT, EDGE_RULE_EXPONENT, EDGE_WEIGHT_POWER } from './edge-rule';
export type { EdgeRule } from './edge-rule';
