/**
 * The one error type of the numerical core: a refusal with a stable `code` and the figures behind
 * it in `details`, so the CLI and the server choose their own words (server/coreErrors.ts) without
 * parsing text. `message` is a plain default for developers and logs.
 *
 * The areas keep their names as subclasses (MeshError, CoulombError, HierarchyError,
 * MeshBinaryError) so `instanceof` still says where a refusal came from; every one of them is a
 * CoreError. Cancellation is CoreAbortError (code 'aborted', name 'AbortError' like the
 * platform's), thrown by every loop that watches a signal.
 *
 * A plain Error (or RangeError) from the core is a bug or a broken invariant, not a refusal.
 */
import { cooperate } from './cooperate';

export type CoreErrorCode =
  // the mesher (geometry/mesh)
  /** a domain extent is zero, negative or not a finite number */
  | 'degenerate-box'
  /** the element-count estimate (or the running count) exceeds maxElements or the server cap */
  | 'too-many-elements'
  /** a size-field parameter is not a positive finite number */
  | 'bad-size-field'
  /** more bisection generations than the Uint8 level arrays can hold (255) */
  | 'level-overflow'
  /** a marker array whose length does not match the mesh */
  | 'bad-marker'
  /** bytes that are not a readable TWMESH file */
  | 'bad-mesh-bytes'
  // the Coulomb problem (geometry/fem)
  | 'no-electrons'
  | 'no-sites'
  | 'unknown-site'
  | 'site-outside'
  | 'sites-coincide'
  | 'not-converged'
  | 'solver-failed'
  /** the mesh does not follow a layer interface or an electrode face of the design (issue 11) */
  | 'mesh-not-conforming'
  /** the free-space/reaction-field split was asked for an orbital model or pair without a closed form */
  | 'split-unavailable'
  /** the layered far field has no closed form for this stack (e.g. more than two interfaces between metals) */
  | 'no-layered-far-field'
  /** the bisection hierarchy the multigrid preconditioner needs is inconsistent */
  | 'bad-hierarchy'
  // layers and electrodes (issue 11)
  /** an electrode has no volume inside the domain, or no node of the mesh on it */
  | 'electrode-outside'
  /** the work was cancelled through its signal */
  | 'aborted';

export type CoreErrorDetails = Record<string, number | string | readonly string[]>;

export class CoreError<C extends CoreErrorCode = CoreErrorCode> extends Error {
  readonly code: C;
  /** figures and ids behind the refusal (e.g. { estimate, limit } or { siteId }) */
  readonly details: CoreErrorDetails;

  constructor(code: C, message: string, details: CoreErrorDetails = {}) {
    super(message);
    this.name = 'CoreError';
    this.code = code;
    this.details = details;
  }
}

/** Cancellation: the one abort error of the core. */
export class CoreAbortError extends CoreError<'aborted'> {
  constructor(message = 'cancelled') {
    super('aborted', message);
    this.name = 'AbortError';
  }
}

export function isCoreError(e: unknown): e is CoreError {
  return e instanceof CoreError;
}

/** A signal that may be an AbortSignal or any object with `aborted` (tests use plain objects). */
export type AbortLike = { readonly aborted: boolean };

/** Throws CoreAbortError when the signal has aborted. */
export function throwIfAborted(signal: AbortLike | undefined | null): void {
  // every abort check is also a point where a long computation may give way (cooperate.ts)
  cooperate();
  if (signal?.aborted) throw new CoreAbortError();
}
