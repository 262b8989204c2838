/**
 * Far-field check: multipole moments (real solid harmonics, Racah normalisation, order ≤ 4),
 * the neglected-far-field envelope per orbital, and the maximum-principle bounds on U_i and
 * V_ij with a recommended domain.
 */
export { farFieldCheck, farFieldColumns, pairBoundAt, reportFromColumns, siteBoundAt, ALL_PAIRS_LIMIT, MODEL_ASSUMPTIONS, WARNING_CODES, ORBITAL_MIN_LATTICE_FRACTION, ORBITAL_MAX_PLAUSIBLE_NM } from './check';
export type { FarFieldColumns, FarFieldOptions, FarFieldReport, FarFieldWarning, PairBound, SiteBound, WarningCode } from './check';
export { clearanceFor, keptOrder, neglectedEnvelope } from './envelope';
export type { Envelope } from './envelope';
export { harmonicCount, irregularHarmonics, MAX_ORDER, multipolePotential, regularHarmonics } from './harmonics';
export { combinedMoments, orbitalMoments } from './moments';
export { createFarFieldSession, withElementEstimate } from './session';
export type { FarFieldChanges, FarFieldSession, FarFieldSessionOptions } from './session';
