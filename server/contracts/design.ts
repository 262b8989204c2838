/**
 * Runtime schema of the design document (format version 2).
 * Dependency-free apart from zod: imported by the server, the CLI and the app.
 * The matching plain types live in geometry/design/types.ts (a type-level test keeps them in step).
 *
 * Units: lengths in nm, energies in eV.
 * Limits (documented caps, each with a plain message):
 *   sites ≤ MAX_SITES = 100,000 — a 100k-site document is ~10 MB of JSON, the most an API body
 *   should carry, and far beyond what one finite-element solve resolves; the far-field check is
 *   linear in the number of sites (~1 ms per 1,000).
 *   lengths ≤ 10⁶ nm, 10⁻⁴ nm ≤ radii ≤ 10³ nm, 1 ≤ εr ≤ 10³, 0 < a ≤ 10 nm.
 *   Device (version 2): host.layers ≤ MAX_LAYERS = 16 touching layers bottom to top (only the ends
 *   unbounded, no site within ON_INTERFACE_NM of an interface); electrodes ≤ MAX_ELECTRODES = 32
 *   boxes of positive size, |voltageV| ≤ 100 V, no site inside one.
 *   Orbital radii (radiusNm, radiusZNm, sigmaNm): the floor MIN_RADIUS_NM = 10⁻⁴ nm lies below the
 *   smallest bound-electron envelope of any atom, the hydrogen-like 1s of a bare nucleus, a0/Z =
 *   0.0529177 nm / 92 = 5.75·10⁻⁴ nm (Bohr radius a0 from CODATA 2018; Bohr model a0/Z); a smaller
 *   number cannot be an envelope the models mean, and it would ask the mesher for ~10¹⁵ elements.
 *   The ceiling MAX_RADIUS_NM = 10³ nm (a micron) is 400 times the default donor envelope (2.5 nm,
 *   Kohn & Luttinger 1955, from memory) and already far beyond any shallow impurity state (common
 *   practice). Sizes inside these bounds but implausible for a donor in silicon (below a hundredth
 *   of the lattice constant, above 100 nm) are warnings of the far-field check, not refusals.
 * Sites outside the domain are valid documents (a design may be mid-edit); the far-field
 * check reports them as an error-level warning.
 *
 * The JSON Schema in design.schema.json is generated from `designSchema` by
 *   npx tsx -e "import('./server/contracts/design.ts').then((m) => process.stdout.write(m.designJsonSchemaText()))" > server/contracts/design.schema.json
 * and a test checks that the committed file equals the generated one.
 */
import { z } from 'zod';

export const DESIGN_FORMAT = 'tetrawell-design';
export const CURRENT_DESIGN_VERSION = 2;
export const MAX_SITES = 100_000;
/**
 * Donors sharing a cluster label form one array site: the generators make clusters of 1–4 donors, and a
 * hand-made cluster of up to 8 leaves room (common practice). The far-field check pairs every donor of a
 * cluster with every donor of each neighbouring cluster, so an unbounded cluster would make its pair list
 * grow like the square of the cluster size (a 100,000-site design in 50 clusters: ~10⁸ pairs, past what
 * V8 can hold) instead of like the site count.
 */
export const MAX_CLUSTER_SIZE = 8;
export const MAX_LENGTH_NM = 1e6;
export const MAX_RADIUS_NM = 1e3;
export const MIN_RADIUS_NM = 1e-4;

const coordinate = z.number().min(-MAX_LENGTH_NM).max(MAX_LENGTH_NM);
const radius = z.number().min(MIN_RADIUS_NM).max(MAX_RADIUS_NM);
export const vec3Schema = z.tuple([coordinate, coordinate, coordinate]);

export const speciesSchema = z.enum(['P', 'As', 'Sb', 'Bi', 'B']);

export const orbitalSchema = z.discriminatedUnion('model', [
  z.object({ model: z.literal('hydrogenic-1s'), radiusNm: radius }),
  z.object({ model: z.literal('anisotropic-1s'), radiusNm: radius, radiusZNm: radius }),
  z.object({ model: z.literal('gaussian'), sigmaNm: radius }),
]);

export const siteSchema = z.object({
  id: z.string().min(1).max(64),
  species: speciesSchema,
  position: vec3Schema,
  electrons: z.number().int().min(0).max(2),
  orbital: orbitalSchema.optional(),
  /** donors sharing a cluster label form one array site */
  cluster: z.string().min(1).max(64).optional(),
});

export const boundarySchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('grounded') }),
  z.object({ kind: z.literal('multipole'), order: z.number().int().min(0).max(4) }),
]);

const halfExtent = z.number().positive().max(MAX_LENGTH_NM);

/** At most this many layers and electrodes: a device stack, not a superlattice. Common practice. */
export const MAX_LAYERS = 16;
export const MAX_ELECTRODES = 32;
/** |voltageV| ≤ 100 V: beyond any gate on a nanometre oxide (SiO₂ breaks down near 1 V/nm; from memory). */
export const MAX_VOLTAGE_V = 100;
/** A site closer than this to an interface counts as on it (its density would straddle the interface). */
export const ON_INTERFACE_NM = 1e-6;

export const layerSchema = z.object({
  name: z.string().min(1).max(64),
  epsilonR: z.number().min(1).max(1000),
  zMinNm: coordinate.nullable(),
  zMaxNm: coordinate.nullable(),
});

export const electrodeSchema = z.object({
  name: z.string().min(1).max(64),
  minNm: vec3Schema,
  maxNm: vec3Schema,
  voltageV: z.number().min(-MAX_VOLTAGE_V).max(MAX_VOLTAGE_V),
});

const fmt = (x: number) => `${+x.toPrecision(6)} nm`;

/** Stack rules: ordered bottom to top, touching, only the ends unbounded, names unique. */
function checkLayers(layers: readonly z.infer<typeof layerSchema>[], ctx: z.RefinementCtx): void {
  const names = new Map<string, number>();
  layers.forEach((l, k) => {
    const at = names.get(l.name);
    if (at === undefined) names.set(l.name, k);
    else ctx.addIssue({ code: 'custom', path: ['host', 'layers', k, 'name'], message: `repeats the name "${l.name}" of layer ${at}; every layer needs its own name` });
    if (l.zMinNm === null && k > 0)
      ctx.addIssue({ code: 'custom', path: ['host', 'layers', k, 'zMinNm'], message: 'may be null (unbounded) only on the lowest layer' });
    if (l.zMaxNm === null && k < layers.length - 1)
      ctx.addIssue({ code: 'custom', path: ['host', 'layers', k, 'zMaxNm'], message: 'may be null (unbounded) only on the highest layer' });
    if (l.zMinNm !== null && l.zMaxNm !== null && !(l.zMaxNm > l.zMinNm))
      ctx.addIssue({ code: 'custom', path: ['host', 'layers', k, 'zMaxNm'], message: `must be above zMinNm (${fmt(l.zMinNm)}); layers are listed from bottom to top` });
    if (k > 0) {
      const below = layers[k - 1].zMaxNm;
      if (below !== null && l.zMinNm !== null && l.zMinNm !== below)
        ctx.addIssue({
          code: 'custom',
          path: ['host', 'layers', k, 'zMinNm'],
          message: `is ${fmt(l.zMinNm)} but the layer below ends at ${fmt(below)}; layers touch, listed from bottom to top`,
        });
    }
  });
}

/** Interfaces (z, nm) of a valid stack, bottom to top. */
export function layerInterfaces(layers: readonly { zMinNm: number | null; zMaxNm: number | null }[]): number[] {
  const out: number[] = [];
  for (let k = 1; k < layers.length; k++) {
    const z = layers[k].zMinNm ?? layers[k - 1].zMaxNm;
    if (z !== null) out.push(z);
  }
  return out;
}

export const designSchema = z
  .object({
    format: z.literal(DESIGN_FORMAT),
    version: z.literal(2),
    name: z.string().min(1).max(200),
    host: z.object({
      material: z.literal('Si'),
      epsilonR: z.number().min(1).max(1000),
      latticeConstantNm: z.number().positive().max(10),
      layers: z.array(layerSchema).min(1).max(MAX_LAYERS).optional(),
    }),
    sites: z.array(siteSchema).max(MAX_SITES, { error: (iss) => tooManySites(Array.isArray(iss.input) ? iss.input.length : undefined) }),
    domain: z.object({
      center: vec3Schema,
      halfExtentsNm: z.tuple([halfExtent, halfExtent, halfExtent]),
      boundary: boundarySchema,
      electrodeWalls: z.enum(['grounded', 'zero-normal-field']).optional(),
    }),
    electrodes: z.array(electrodeSchema).max(MAX_ELECTRODES).optional(),
    refinement: z.object({
      order: z.union([z.literal(1), z.literal(2)]),
      targetRelError: z.number().gt(0).lt(1),
      maxElements: z.number().int().positive().max(1e9),
    }),
  })
  .superRefine((doc, ctx) => {
    const first = new Map<string, number>();
    doc.sites.forEach((s, i) => {
      const at = first.get(s.id);
      if (at === undefined) first.set(s.id, i);
      else ctx.addIssue({ code: 'custom', path: ['sites', i, 'id'], message: `repeats the id "${s.id}" of site ${at}; every site needs its own id` });
    });
    const layers = doc.host.layers;
    if (layers) {
      checkLayers(layers, ctx);
      const faces = layerInterfaces(layers);
      doc.sites.forEach((s, i) => {
        const z = s.position[2];
        const face = faces.find((f) => Math.abs(z - f) < ON_INTERFACE_NM);
        if (face !== undefined)
          ctx.addIssue({
            code: 'custom',
            path: ['sites', i, 'position', 2],
            message: `puts the site on the interface at z = ${fmt(face)}; a site must lie inside one layer (move it off the interface)`,
          });
      });
    }
    const electrodes = doc.electrodes ?? [];
    const enames = new Map<string, number>();
    electrodes.forEach((e, k) => {
      const at = enames.get(e.name);
      if (at === undefined) enames.set(e.name, k);
      else ctx.addIssue({ code: 'custom', path: ['electrodes', k, 'name'], message: `repeats the name "${e.name}" of electrode ${at}; every electrode needs its own name` });
      for (let a = 0; a < 3; a++)
        if (!(e.maxNm[a] > e.minNm[a]))
          ctx.addIssue({ code: 'custom', path: ['electrodes', k, 'maxNm', a], message: `must be above minNm[${a}] (${fmt(e.minNm[a])}); an electrode is a box of positive size` });
    });
    if (electrodes.length > 0)
      doc.sites.forEach((s, i) => {
        const p = s.position;
        const k = electrodes.findIndex((e) => p.every((x, a) => x >= e.minNm[a] && x <= e.maxNm[a]));
        if (k >= 0)
          ctx.addIssue({ code: 'custom', path: ['sites', i, 'position'], message: `lies inside electrode "${electrodes[k].name}"; sites sit in the host, not in metal` });
      });
    const members = new Map<string, number>();
    doc.sites.forEach((s, i) => {
      if (s.cluster === undefined) return;
      const k = (members.get(s.cluster) ?? 0) + 1;
      members.set(s.cluster, k);
      // reported once per cluster, at the first site past the limit
      if (k === MAX_CLUSTER_SIZE + 1)
        ctx.addIssue({
          code: 'custom',
          path: ['sites', i, 'cluster'],
          message: `puts a ${MAX_CLUSTER_SIZE + 1}th site into cluster "${s.cluster}"; a cluster is one array site of at most ${MAX_CLUSTER_SIZE} donors`,
        });
    });
  });

export type DesignDocument = z.infer<typeof designSchema>;

function tooManySites(n: number | undefined): string {
  return `holds ${n === undefined ? 'too many' : n.toLocaleString('en-US')} sites; a design may hold at most ${MAX_SITES.toLocaleString('en-US')}. Split the array into parts or use fewer cells.`;
}

// ---------------------------------------------------------------- plain-words issues

export interface DesignIssue {
  /** field path, e.g. ["sites", 3, "position", 1] */
  path: (string | number)[];
  /** what is wrong, in plain words (without the path) */
  message: string;
}

/** "sites[3].position[1]" for display. */
export function formatPath(path: readonly (string | number | symbol)[]): string {
  let s = '';
  for (const p of path) s += typeof p === 'number' ? `[${p}]` : s === '' ? String(p) : `.${String(p)}`;
  return s === '' ? '(document)' : s;
}

function describe(input: unknown): string {
  if (input === null) return 'null';
  if (input === undefined) return 'nothing';
  if (typeof input === 'number') return Number.isNaN(input) ? 'NaN' : String(input);
  if (typeof input === 'string') return input.length > 40 ? `the text "${input.slice(0, 40)}…"` : `the text "${input}"`;
  if (Array.isArray(input)) return `a list of ${input.length}`;
  if (typeof input === 'object') return 'an object';
  return typeof input;
}

const ARTICLE: Record<string, string> = {
  number: 'a number',
  int: 'a whole number',
  string: 'text',
  object: 'an object',
  array: 'a list',
  tuple: 'a list',
  boolean: 'true or false',
};

/**
 * A zod error map giving plain-words messages ("must be a number, not null"). Use as
 * `schema.safeParse(x, { error: plainIssueMessage })`; returns undefined for issues it leaves
 * to zod (custom messages set in the schema win anyway).
 */
export function plainIssueMessage(iss: z.core.$ZodRawIssue): string | undefined {
  const input = (iss as { input?: unknown }).input;
  switch (iss.code) {
    case 'invalid_type': {
      if (input === undefined) return 'is missing';
      const want = ARTICLE[iss.expected as string] ?? String(iss.expected);
      if (typeof input === 'number' && !Number.isFinite(input)) return `must be a finite number, not ${describe(input)}`;
      return `must be ${want}, not ${describe(input)}`;
    }
    case 'too_small': {
      const origin = (iss as { origin?: string }).origin;
      if (origin === 'string') return iss.minimum === 1 ? 'must not be empty' : `must have at least ${iss.minimum} characters`;
      if (origin === 'array') return `must hold at least ${iss.minimum} items`;
      return iss.inclusive ? `must be at least ${iss.minimum}, not ${describe(input)}` : `must be greater than ${iss.minimum}, not ${describe(input)}`;
    }
    case 'too_big': {
      const origin = (iss as { origin?: string }).origin;
      if (origin === 'string') return `must have at most ${iss.maximum} characters`;
      if (origin === 'array') return `holds ${Array.isArray(input) ? input.length : 'too many'} items; at most ${iss.maximum} are allowed`;
      return iss.inclusive ? `must be at most ${iss.maximum}, not ${describe(input)}` : `must be less than ${iss.maximum}, not ${describe(input)}`;
    }
    case 'invalid_value': {
      const vals = iss.values.map((v) => JSON.stringify(v));
      return vals.length === 1 ? `must be ${vals[0]}, not ${describe(input)}` : `must be one of ${vals.join(', ')}, not ${describe(input)}`;
    }
    case 'invalid_union': {
      const u = iss as { discriminator?: string; options?: unknown[] };
      if (u.options) return `must be one of ${u.options.map((v) => JSON.stringify(v)).join(', ')}, not ${describe(input)}`;
      return 'does not match any allowed form';
    }
    default:
      return undefined;
  }
}

// ---------------------------------------------------------------- migration and parsing

type Migration = (doc: Record<string, unknown>) => Record<string, unknown>;

/**
 * MIGRATIONS[v] turns a version-v document into version v+1, keeping every other field as it is.
 *   1 → 2: the box the solvers work in is called `domain` (the trade's word) instead of `enclosure`;
 *          same content (centre, half-extents, boundary). A version-1 document that already has a
 *          `domain` and no `enclosure` keeps it, so the validator then names what is wrong.
 */
export const MIGRATIONS: Record<number, Migration> = {
  1: (doc) => {
    const { enclosure, ...rest } = doc;
    return { ...rest, version: 2, ...(enclosure !== undefined || !('domain' in rest) ? { domain: enclosure } : {}) };
  },
};

export type MigrationResult = { ok: true; doc: Record<string, unknown> } | { ok: false; issues: DesignIssue[] };

/** Bring a stored document of any known version to the current one (identity for the current version). */
export function migrateDesign(doc: unknown): MigrationResult {
  if (typeof doc !== 'object' || doc === null || Array.isArray(doc)) return { ok: false, issues: [{ path: [], message: `must be a JSON object, not ${describe(doc)}` }] };
  const d = doc as Record<string, unknown>;
  if (d.format !== DESIGN_FORMAT)
    return { ok: false, issues: [{ path: ['format'], message: d.format === undefined ? `is missing; a design document has "format": "${DESIGN_FORMAT}"` : `must be "${DESIGN_FORMAT}", not ${describe(d.format)}` }] };
  let v = d.version;
  if (typeof v !== 'number' || !Number.isInteger(v) || v < 1)
    return { ok: false, issues: [{ path: ['version'], message: v === undefined ? 'is missing' : `must be a whole number ≥ 1, not ${describe(v)}` }] };
  if (v > CURRENT_DESIGN_VERSION)
    return { ok: false, issues: [{ path: ['version'], message: `is ${v}, newer than this build understands (it reads versions 1 to ${CURRENT_DESIGN_VERSION}); update Tetrawell` }] };
  let cur: Record<string, unknown> = d;
  while ((v as number) < CURRENT_DESIGN_VERSION) {
    const step = MIGRATIONS[v as number];
    if (!step) return { ok: false, issues: [{ path: ['version'], message: `version ${v} has no migration to version ${(v as number) + 1}` }] };
    cur = step(cur);
    v = cur.version;
  }
  return { ok: true, doc: cur };
}

/**
 * The design schema for inputs (API bodies): a document of an older format version is migrated
 * first, so a file saved by an earlier build uploads as it is. Output type: the current document.
 */
export const designInputSchema = z.preprocess((v) => {
  const m = migrateDesign(v);
  return m.ok ? m.doc : v;
}, designSchema);

export type ParseDesignResult = { ok: true; design: DesignDocument } | { ok: false; issues: DesignIssue[] };

/**
 * Validate any value as a design document: migrate, cap the site count early (so a 10⁶-site
 * document is refused without parsing every site), then parse with plain-words messages.
 */
export function parseDesign(input: unknown): ParseDesignResult {
  const m = migrateDesign(input);
  if (!m.ok) return m;
  const sites = m.doc.sites;
  if (Array.isArray(sites) && sites.length > MAX_SITES) return { ok: false, issues: [{ path: ['sites'], message: tooManySites(sites.length) }] };
  const r = designSchema.safeParse(m.doc, { error: plainIssueMessage });
  if (r.success) return { ok: true, design: r.data };
  return { ok: false, issues: r.error.issues.map((i) => ({ path: i.path.map((p) => (typeof p === 'symbol' ? String(p) : p)), message: i.message })) };
}

/** "sites[3].position[1]: must be a number, not null" lines for people. */
export function describeIssues(issues: readonly DesignIssue[]): string[] {
  return issues.map((i) => `${formatPath(i.path)}: ${i.message}`);
}

/** The JSON Schema of the design document (input side), as committed in design.schema.json. */
export function designJsonSchema(): Record<string, unknown> {
  const schema = z.toJSONSchema(designSchema, { io: 'input' }) as Record<string, unknown>;
  return {
    $schema: schema.$schema,
    $id: 'https://tetrawell.invalid/schema/design-v2.json',
    title: 'Tetrawell design document, format version 2',
    description: 'Lengths in nm, energies in eV. Generated from server/contracts/design.ts with zod z.toJSONSchema; do not edit by hand.',
    ...Object.fromEntries(Object.entries(schema).filter(([k]) => k !== '$schema')),
  };
}

export function designJsonSchemaText(): string {
  return `${JSON.stringify(designJsonSchema(), null, 2)}\n`;
}
