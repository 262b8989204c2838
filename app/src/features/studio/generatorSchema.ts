/**
 * The array-builder form: its zod schema (form strings in, typed spec out, messages written for the
 * modeller) and the run that turns a valid spec into sites with geometry/arrays.
 */
import { z } from 'zod';
import { MAX_SITES } from '@contracts/design';
import { disorderEnsemble, generateArray, MAX_ENSEMBLE_DONORS } from '../../../../geometry/arrays';
import type { Site } from '../../../../geometry/design/types';

export const ARRAY_KINDS = ['chain', 'square', 'rectangular', 'triangular', 'honeycomb'] as const;
export const ARRAY_KIND_LABELS: Record<(typeof ARRAY_KINDS)[number], string> = {
  chain: 'Chain (a row of sites)',
  square: 'Square grid',
  rectangular: 'Rectangular grid',
  triangular: 'Triangular grid',
  honeycomb: 'Honeycomb flake',
};

const num = (what: string) => z.coerce.number({ error: `${what} must be a number.` }).refine(Number.isFinite, `${what} must be a number.`);
const count = (what: string) => num(what).pipe(z.number().int(`${what} must be a whole number.`).min(1, `${what} must be at least 1.`).max(1000, `${what} can be at most 1,000.`));

export const generatorFormSchema = z
  .object({
    kind: z.enum(ARRAY_KINDS),
    nx: count('Sites along the first direction'),
    ny: count('Sites along the second direction'),
    spacing: num('Spacing').pipe(z.number().positive('Spacing must be more than 0.').max(1000, 'Spacing can be at most 1,000.')),
    /** the spacing's unit: nanometres or lattice constants of the host */
    spacingUnit: z.enum(['nm', 'a']),
    /** second spacing for rectangular grids, same unit */
    spacingY: num('Second spacing').pipe(z.number().positive('Second spacing must be more than 0.').max(1000)),
    angleDeg: num('Angle').pipe(z.number().min(-360, 'Angle must be between −360° and 360°.').max(360, 'Angle must be between −360° and 360°.')),
    planeZNm: num('Donor plane height').pipe(z.number().min(-1e4).max(1e4, 'Donor plane height is at most 10,000 nm from the origin.')),
    clusterSize: num('Donors per array site').pipe(z.number().int('Donors per array site must be 1, 2, 3 or 4.').min(1, 'Donors per array site must be 1, 2, 3 or 4.').max(4, 'Donors per array site must be 1, 2, 3 or 4.')),
    species: z.enum(['P', 'As', 'Sb', 'Bi', 'B']),
    electrons: num('Electrons').pipe(z.number().int().min(0, 'Electrons must be 0, 1 or 2.').max(2, 'Electrons must be 0, 1 or 2.')),
    /** placement disorder: 0 keeps the nominal sites; otherwise every donor moves to a lattice site within this radius */
    disorderRadiusNm: num('Disorder radius').pipe(z.number().min(0, 'Disorder radius cannot be negative.').max(50, 'Disorder radius is at most 50 nm.')),
    /** seed of the disorder draw (same seed, same sites) */
    seed: num('Seed').pipe(z.number().int('Seed must be a whole number.').min(0, 'Seed must be 0 or more.').max(2 ** 32 - 1)),
    /** which member of the seeded ensemble to place (1 = the first draw) */
    sample: num('Sample number').pipe(z.number().int('Sample number must be a whole number.').min(1, 'Sample number starts at 1.').max(1000, 'Sample number is at most 1,000.')),
    mode: z.enum(['replace', 'add']),
  })
  .superRefine((v, ctx) => {
    const cells = v.kind === 'chain' ? v.nx : v.nx * v.ny * (v.kind === 'honeycomb' ? 2 : 1);
    const total = cells * v.clusterSize;
    if (total > MAX_SITES) ctx.addIssue({ code: 'custom', path: ['nx'], message: `That makes ${total.toLocaleString('en')} sites; a design holds at most ${MAX_SITES.toLocaleString('en')}.` });
    if (v.disorderRadiusNm > 0 && total * v.sample > MAX_ENSEMBLE_DONORS)
      ctx.addIssue({ code: 'custom', path: ['sample'], message: `Drawing sample ${v.sample} of ${total} sites needs ${(total * v.sample).toLocaleString('en')} draws; the limit is ${MAX_ENSEMBLE_DONORS.toLocaleString('en')}.` });
  });

export type GeneratorForm = z.infer<typeof generatorFormSchema>;
export type GeneratorFormInput = z.input<typeof generatorFormSchema>;

export const GENERATOR_DEFAULTS: Record<keyof GeneratorFormInput, string> = {
  kind: 'square',
  nx: '3',
  ny: '3',
  spacing: '8',
  spacingUnit: 'a',
  spacingY: '8',
  angleDeg: '0',
  planeZNm: '0',
  clusterSize: '1',
  species: 'P',
  electrons: '1',
  disorderRadiusNm: '0',
  seed: '1',
  sample: '1',
  mode: 'replace',
};

/** The sites a valid form asks for, in a host of lattice constant `a` (nm), centred at `center`. */
export function runGenerator(form: GeneratorForm, a: number, center: readonly [number, number, number] = [0, 0, 0]): Site[] {
  const unit = form.spacingUnit === 'a' ? a : 1;
  const sites = generateArray({
    kind: form.kind,
    nx: form.nx,
    ny: form.kind === 'chain' ? undefined : form.ny,
    spacingNm: form.spacing * unit,
    spacingYNm: form.kind === 'rectangular' ? form.spacingY * unit : undefined,
    angleDeg: form.angleDeg,
    center: [center[0], center[1], form.planeZNm],
    clusterSize: form.clusterSize,
    species: form.species,
    electrons: form.electrons,
    latticeConstantNm: a,
  });
  if (form.disorderRadiusNm === 0) return sites;
  const ensemble = disorderEnsemble(sites, { radiusNm: form.disorderRadiusNm, samples: form.sample, seed: form.seed, latticeConstantNm: a });
  return ensemble[form.sample - 1];
}
