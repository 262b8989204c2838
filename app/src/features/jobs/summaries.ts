/**
 * Shapes of a revision's `summary` (exactly the keys the CLI's --json prints; README "HTTP API: jobs and revisions").
 * The contract keeps `summary` open (a record), so the page checks the kind it draws and says so when it cannot.
 */
import { z } from 'zod';

export const coulombSummarySchema = z.object({
  order: z.number(),
  elements: z.number(),
  dofs: z.number(),
  iterations: z.number(),
  sites: z.array(z.object({ id: z.string(), uEv: z.number(), uErrorEv: z.number() })),
  pairs: z.array(z.object({ a: z.string(), b: z.string(), distanceNm: z.number(), vEv: z.number(), vErrorEv: z.number() })),
  notes: z.array(z.string()).optional(),
  /** issue 11, present (possibly empty) when the design has electrodes: each site's energy at the design's voltages (eV) */
  siteEnergies: z.array(z.object({ id: z.string(), eV: z.number() })).optional(),
  /** issue 11: ∂E_site/∂V_electrode (meV/V) with its error bar, sites × electrodes */
  leverArms: z.array(z.object({ site: z.string(), electrode: z.string(), meVPerV: z.number(), errorMeVPerV: z.number() })).optional(),
});
export type CoulombSummary = z.infer<typeof coulombSummarySchema>;

export const meshSummarySchema = z.object({
  vertices: z.number(),
  tets: z.number(),
  p2Nodes: z.number(),
  minDihedralDeg: z.number(),
  maxDihedralDeg: z.number(),
  volumeNm3: z.number(),
  levels: z.unknown(),
});
export type MeshSummary = z.infer<typeof meshSummarySchema>;

const refinementRow = z.object({ level: z.number(), elements: z.number(), dofs: z.number(), iterations: z.number(), uEv: z.array(z.number()), deltaEv: z.number().nullable() });
const boxRow = z.object({ factor: z.number(), halfWidthNm: z.number(), boundary: z.string(), dofs: z.number(), uEv: z.array(z.number()), uErrorEv: z.array(z.number()), boundaryBoundEv: z.array(z.number()) });

export const convergenceSummarySchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('refinement'), order: z.number(), siteIds: z.array(z.string()), rows: z.array(refinementRow), fittedRate: z.number().nullable(), theoreticalRate: z.number(), notes: z.array(z.string()) }),
  z.object({ kind: z.literal('box'), order: z.number(), siteIds: z.array(z.string()), rows: z.array(boxRow), fittedRate: z.number().nullable(), theoreticalRate: z.number(), notes: z.array(z.string()) }),
]);
export type ConvergenceSummary = z.infer<typeof convergenceSummarySchema>;

/** eV → meV for display (1 eV = 1000 meV) */
export const meV = (ev: number) => ev * 1000;

export const KIND_LABEL = { mesh: 'Mesh', coulomb: 'U and V', convergence: 'Convergence sweep' } as const;

export function optionsText(kind: string, options: { order?: number; adaptive?: boolean; sweep?: string }): string {
  const parts: string[] = [];
  if (options.order) parts.push(`P${options.order}`);
  if (options.adaptive) parts.push('adaptive');
  if (kind === 'convergence' && options.sweep) parts.push(options.sweep === 'box' ? 'box sizes' : 'refinement levels');
  return parts.join(', ');
}
