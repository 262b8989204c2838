/**
 * Arrays of donor sites: generators, placement disorder, bond graph, seeded generator — what the app,
 * the server and the seed use (the far field reaches bonds.ts and live-bonds.ts by path; tests reach
 * arrayPoints, clusterSites and bondPairs the same way). `mulberry32` stays for the tests of other
 * folders that take it from here.
 */
export { disorderEnsemble, generateArray, MAX_ENSEMBLE_DONORS } from './generators';
export type { ArrayKind, ArraySpec, DisorderOptions } from './generators';
export { bondGraph } from './bonds';
export type { BondGraph, BondGraphOptions } from './bonds';
export { mulberry32 } from './prng';
