/**
 * The options a job runs with, filled in from the design so that two requests that mean the
 * same computation get the same key (the reuse lookup compares `optionsKey`).
 *
 *   mesh         { order }              (the CLI's `mesh --order N`)
 *   coulomb      { order, adaptive }    (the CLI's `coulomb --order N [--adaptive]`)
 *   convergence  { order, sweep }       (the CLI's `convergence --kind <sweep> --order N`)
 *
 * `order` defaults to the design's refinement.order, as on the command line.
 */
import type { JobKind, JobOptions } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { canonicalJson } from '../formats/canonical';

export type OptionsProblem = { path: string[]; message: string };

export function normalizeOptions(kind: JobKind, options: JobOptions, design: DesignDocument): { options: JobOptions } | { problems: OptionsProblem[] } {
  const problems: OptionsProblem[] = [];
  const order = options.order ?? design.refinement.order;
  if (kind !== 'coulomb' && options.adaptive !== undefined) problems.push({ path: ['options', 'adaptive'], message: `applies only to coulomb jobs, not ${kind}` });
  if (kind !== 'convergence' && options.sweep !== undefined) problems.push({ path: ['options', 'sweep'], message: `applies only to convergence jobs, not ${kind}` });
  if (kind === 'convergence' && options.sweep === undefined) problems.push({ path: ['options', 'sweep'], message: "is required for a convergence job: 'refinement' or 'box'" });
  if (problems.length) return { problems };
  if (kind === 'mesh') return { options: { order } };
  if (kind === 'coulomb') return { options: { order, adaptive: options.adaptive ?? false } };
  return { options: { order, sweep: options.sweep } };
}

/** The text revisions are looked up by (canonical JSON: key order does not matter). */
export const optionsKey = (options: JobOptions): string => canonicalJson(options);
