/**
 * Words for the numerical core's refusals (geometry/errors.ts CoreError), shared by the command
 * line and the job worker: the code picks what went wrong in the modeller's terms, the core's
 * message adds the figures. Cancellation has its own words and is never a refusal.
 */
import { CoreError, type CoreErrorCode } from '../geometry/pipeline/index';

/** What a refusal stops: building the mesh, computing U and V, or reading mesh bytes. */
export type RefusalArea = 'mesh' | 'solve' | 'read' | 'cancelled';

const AREA: Record<CoreErrorCode, RefusalArea> = {
  'degenerate-box': 'mesh',
  'too-many-elements': 'mesh',
  'bad-size-field': 'mesh',
  'level-overflow': 'mesh',
  'bad-marker': 'mesh',
  'bad-mesh-bytes': 'read',
  'no-electrons': 'solve',
  'no-sites': 'solve',
  'unknown-site': 'solve',
  'site-outside': 'solve',
  'sites-coincide': 'solve',
  'not-converged': 'solve',
  'solver-failed': 'solve',
  'mesh-not-conforming': 'solve',
  'split-unavailable': 'solve',
  'no-layered-far-field': 'solve',
  'bad-hierarchy': 'solve',
  'electrode-outside': 'solve',
  aborted: 'cancelled',
};

/** The first words of a refusal, by area (the CLI names the file, a job names nothing). */
const LEAD: Record<RefusalArea, string> = {
  mesh: 'cannot mesh the design',
  solve: 'cannot compute U and V',
  read: 'cannot read the mesh',
  cancelled: 'cancelled',
};

export function refusalArea(e: CoreError): RefusalArea {
  return AREA[e.code] ?? 'solve';
}

/** One line for a refusal: "<what could not be done>: <the core's figures>". */
export function describeRefusal(e: CoreError, lead?: string): string {
  const area = refusalArea(e);
  if (area === 'cancelled') return 'The run was cancelled.';
  return `${lead ?? LEAD[area]}: ${e.message}`;
}

/** A refusal of the core (not a cancel), or null for anything else. */
export function asRefusal(e: unknown): CoreError | null {
  return e instanceof CoreError && e.code !== 'aborted' ? e : null;
}

export function isCoreAbort(e: unknown): boolean {
  return e instanceof CoreError && e.code === 'aborted';
}
