/**
 * Words for the far-field check's boundary-bound codes (issue 11), shared by the CLI
 * (server/cli/checkText.ts) and the studio's far-field panel, so both say the same thing.
 * Dependency-free: no imports at all. The codes mirror geometry/farfield/layered.ts `BoundKind`
 * and `BoundReason` (the core gives codes and leaves words to its callers); a type check in
 * app/src/features/studio/farfield/boundWords.ts keeps the two unions equal.
 */

/** Whether a site's boundary bound is rigorous or an estimate (geometry/farfield `BoundKind`). */
export type BoundKindCode = 'rigorous' | 'estimated';
/** Why a site's bound is what it is (geometry/farfield `BoundReason`). */
export type BoundReasonCode = 'image-series' | 'density-leaks' | 'electrode-not-plane' | 'too-many-interfaces' | 'layers-invalid';

/** Every reason code, in a fixed order (the studio's worker transport codes a reason by its place here). */
export const BOUND_REASON_CODES: readonly BoundReasonCode[] = ['image-series', 'density-leaks', 'electrode-not-plane', 'too-many-interfaces', 'layers-invalid'];

/** The kind each reason gives (geometry/farfield/layered.ts: only the image series of a valid stack is rigorous). */
export const BOUND_REASON_KIND: Record<BoundReasonCode, BoundKindCode> = {
  'image-series': 'rigorous',
  'density-leaks': 'estimated',
  'electrode-not-plane': 'estimated',
  'too-many-interfaces': 'estimated',
  'layers-invalid': 'estimated',
};

/** What a reason means, in one clause, without its kind. */
export const BOUND_REASON_CLAUSE: Record<BoundReasonCode, string> = {
  'image-series': 'the largest potential on the walls from the image series of the stack (maximum principle)',
  'density-leaks': 'the image series of the stack, but part of the density lies across an interface, where images are an approximation',
  'electrode-not-plane': 'the multipole walls take their values from the stack without the finite electrodes, which change the far field',
  'too-many-interfaces': 'no closed form for more than two interfaces between metals; the homogeneous bound with the smallest εr of the layers',
  'layers-invalid': 'the layers do not form a valid stack; the homogeneous bound with the smallest εr of the layers',
};

/** What a bound's reason means, in one clause led by its kind ("rigorous: …"), as `check` prints it. */
export const BOUND_REASON_WORDS = Object.fromEntries(
  BOUND_REASON_CODES.map((r) => [r, `${BOUND_REASON_KIND[r]}: ${BOUND_REASON_CLAUSE[r]}`]),
) as Record<BoundReasonCode, string>;
