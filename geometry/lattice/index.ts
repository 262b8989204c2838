/**
 * The silicon diamond lattice (diamond.ts): what the app, the server and the rest of the core use.
 * Tests reach the other helpers (sublattice, region and nearest-site queries) through diamond.ts by path.
 */
export { isLatticeSite, latticeOffsetNm, NEAREST_A, siteToNm, sitesInSphere, snapToLattice } from './diamond';
export type { LatticeIndex } from './diamond';
