/**
 * Runtime schema of the design document (format version 1).
 * Dependency-free apart from zod: imported by the server, the CLI and the app.
 * The matching plain types live in geometry/design/types.ts.
 */
import { z } from 'zod';

const finite = z.number().finite();
const positive = z.number().finite().positive();
export const vec3Schema = z.tuple([finite, finite, finite]);

export const speciesSchema = z.enum(['P', 'As', 'Sb', 'Bi', 'B']);

export const orbitalSchema = z.discriminatedUnion('model', [
  z.object({ model: z.literal('hydrogenic-1s'), radiusNm: positive }),
  z.object({ model: z.literal('anisotropic-1s'), radiusNm: positive, radiusZNm: positive }),
  z.object({ model: z.literal('gaussian'), sigmaNm: positive }),
]);

export const siteSchema = z.object({
  id: z.string().min(1).max(64),
  species: speciesSchema,
  position: vec3Schema,
  electrons: z.number().int().min(0).max(2),
  orbital: orbitalSchema.optional(),
});

export const boundarySchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('grounded') }),
  z.object({ kind: z.literal('multipole'), order: z.number().int().min(0).max(4) }),
]);

export const designSchema = z.object({
  format: z.literal('tetrawell-design'),
  version: z.literal(1),
  name: z.string().min(1).max(200),
  host: z.object({
    material: z.literal('Si'),
    epsilonR: positive,
    latticeConstantNm: positive,
  }),
  sites: z.array(siteSchema).max(100_000),
  enclosure: z.object({
    center: vec3Schema,
    halfExtentsNm: z.tuple([positive, positive, positive]),
    boundary: boundarySchema,
  }),
  refinement: z.object({
    order: z.union([z.literal(1), z.literal(2)]),
    targetRelError: z.number().finite().gt(0).lt(1),
    maxElements: z.number().int().positive(),
  }),
});

export type DesignDocument = z.infer<typeof designSchema>;
