/** Arrays of donor sites: generators, placement disorder, bond graph, seeded generator. */
export { arrayPoints, clusterSites, disorderEnsemble, generateArray, MAX_ENSEMBLE_DONORS, MAX_GENERATED_SITES } from './generators';
export type { ArrayKind, ArraySpec, DisorderOptions } from './generators';
export { bondGraph, bondPairs, DEFAULT_SHELL_FACTOR } from './bonds';
export type { BondGraph, BondGraphOptions } from './bonds';
export { mulberry32 } from './prng';
