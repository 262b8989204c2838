/**
 * The array-builder form schema and its run. Counts are plain counting (n_x·n_y sites per grid,
 * two per honeycomb cell); distances use the Si lattice constant a = 0.5431020511 nm (CODATA 2018).
 * Square-grid spacing: the generator snaps each target to the nearest diamond site; 8a is a lattice
 * translation ((32, 0, 0) in a/4 units), so snapped neighbours are exactly 8a apart.
 */
import { describe, expect, it } from 'vitest';
import { MAX_SITES } from '@contracts/design';
import { GENERATOR_DEFAULTS, generatorFormSchema, runGenerator } from '../../app/src/features/studio/generatorSchema';

const A = 0.5431020511;
const form = (over: Partial<typeof GENERATOR_DEFAULTS>) => ({ ...GENERATOR_DEFAULTS, ...over });

describe('generator form schema', () => {
  it('reads the defaults as a 3 × 3 square grid at 8 lattice constants', () => {
    const parsed = generatorFormSchema.parse(form({}));
    expect(parsed).toMatchObject({ kind: 'square', nx: 3, ny: 3, spacing: 8, spacingUnit: 'a', clusterSize: 1 });
  });
  it('gives a message per bad field', () => {
    const r = generatorFormSchema.safeParse(form({ nx: '2.5', spacing: '-1', electrons: '3', clusterSize: '5', seed: 'x' }));
    expect(r.success).toBe(false);
    const fields = new Map(r.error!.issues.map((i) => [i.path[0], i.message]));
    expect(fields.get('nx')).toMatch(/whole number/);
    expect(fields.get('spacing')).toMatch(/more than 0/);
    expect(fields.get('electrons')).toMatch(/0, 1 or 2/);
    expect(fields.get('clusterSize')).toMatch(/1, 2, 3 or 4/);
    expect(fields.get('seed')).toMatch(/number/);
  });
  it('refuses an array over the design site limit', () => {
    const r = generatorFormSchema.safeParse(form({ nx: '400', ny: '300', clusterSize: '1' }));
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].message).toContain(MAX_SITES.toLocaleString('en'));
  });
});

describe('runGenerator', () => {
  it('builds 9 sites 8a apart for the default form', () => {
    const sites = runGenerator(generatorFormSchema.parse(form({})), A);
    expect(sites).toHaveLength(9);
    const d = Math.hypot(sites[1].position[0] - sites[0].position[0], sites[1].position[1] - sites[0].position[1], sites[1].position[2] - sites[0].position[2]);
    expect(d).toBeCloseTo(8 * A, 9);
  });
  it('counts two sites per honeycomb cell and multiplies by the cluster size', () => {
    expect(runGenerator(generatorFormSchema.parse(form({ kind: 'honeycomb', nx: '2', ny: '2', spacing: '4', spacingUnit: 'nm' })), A)).toHaveLength(8);
    expect(runGenerator(generatorFormSchema.parse(form({ kind: 'chain', nx: '6', spacing: '4', spacingUnit: 'nm', clusterSize: '2' })), A)).toHaveLength(12);
  });
  it('draws the same disordered sample for the same seed, and a different one for another seed', () => {
    const base = form({ disorderRadiusNm: '1', seed: '42', sample: '2' });
    const a1 = runGenerator(generatorFormSchema.parse(base), A);
    const a2 = runGenerator(generatorFormSchema.parse(base), A);
    const b = runGenerator(generatorFormSchema.parse({ ...base, seed: '43' }), A);
    expect(a1).toEqual(a2);
    expect(a1).not.toEqual(b);
    const nominal = runGenerator(generatorFormSchema.parse(form({})), A);
    // every donor stays within the disorder radius of its nominal site
    a1.forEach((s, i) => expect(Math.hypot(...s.position.map((v, k) => v - nominal[i].position[k]))).toBeLessThanOrEqual(1 + 1e-9));
  });
});
