/**
 * Progress of the numerical core as data, never prose: the CLI words it on standard error and a
 * job stores it (the job's `progress` contract in server/contracts/api.ts has the same fields).
 */
export type CorePhase =
  /** building a graded mesh (or one level of a family) */
  | 'mesh'
  /** a site's density load on the mesh */
  | 'load'
  /** conjugate gradients for one site */
  | 'solve'
  /** mesh quality figures */
  | 'quality'
  /** writing bytes */
  | 'encode'
  | 'done';

export interface CoreProgress {
  phase: CorePhase;
  /** 1-based: the mesh of a nested family, the round of adaptive refinement, or the step of a sweep */
  level?: number;
  /** the site being loaded or solved for */
  site?: string;
  /** overall fraction done, 0..1 */
  fraction: number;
}
