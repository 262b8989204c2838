/**
 * Many designs per project, and every save kept.
 *
 *   designs            + name (backfilled from the document's name), site_count, worst_rel_bound,
 *                        created_by, created_at; the one-design-per-project unique constraint goes
 *   design_versions    append-only: (design_id, version) unique, the document, sha256 of its
 *                        canonical JSON (server/formats/canonical.ts), who and when
 *
 * Every existing design becomes its project's first design and gets a version row holding its
 * current document under its current version number, so nothing is lost. A trigger refuses
 * UPDATE on design_versions: meshes and solves (next issue) will point at a stored version.
 *
 * worst_rel_bound is the far-field check's worst relative boundary bound (geometry/farfield),
 * the same figure `npm run cli -- check` prints; backfilled here for documents that validate,
 * null for empty designs, designs with a site outside the box, and documents that do not parse.
 *
 * down() goes back to one design per project: it keeps each project's oldest design (its
 * current document) and drops the others and every stored version. Lossy by nature; only for
 * rolling back a fresh installation.
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { designSchema } from '../server/contracts/design';
import { canonicalJson } from '../server/formats/canonical';
import { farFieldCheck } from '../geometry/farfield';
import type { Design } from '../geometry/design/types';

function worstBound(document: unknown): { siteCount: number; worst: number | null } {
  const parsed = designSchema.safeParse(document);
  if (!parsed.success) {
    const sites = (document as { sites?: unknown } | null)?.sites;
    return { siteCount: Array.isArray(sites) ? sites.length : 0, worst: null };
  }
  const doc = parsed.data;
  if (doc.sites.length === 0) return { siteCount: 0, worst: null };
  const w = farFieldCheck(doc as Design).worstRelBound;
  return { siteCount: doc.sites.length, worst: w !== null && Number.isFinite(w) ? w : null };
}

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('designs', (t) => {
    t.text('name');
    t.integer('site_count').notNullable().defaultTo(0);
    t.double('worst_rel_bound');
    t.integer('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.schema.alterTable('designs', (t) => {
    t.dropUnique(['project_id']);
    t.index(['project_id']);
  });

  await knex.schema.createTable('design_versions', (t) => {
    t.increments('id').primary();
    t.integer('design_id').notNullable().references('id').inTable('designs').onDelete('CASCADE');
    t.integer('version').notNullable();
    t.text('name').notNullable();
    t.integer('site_count').notNullable();
    t.jsonb('document').notNullable();
    t.text('sha256').notNullable();
    t.integer('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['design_id', 'version']);
  });
  await knex.raw(`ALTER TABLE design_versions ADD CONSTRAINT design_versions_sha256_hex CHECK (sha256 ~ '^[0-9a-f]{64}$')`);
  // append-only: a stored version never changes (deleting the design removes its versions)
  await knex.raw(`
    CREATE FUNCTION design_versions_refuse_update() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'design_versions rows are append-only (design %, version %)', OLD.design_id, OLD.version;
    END $$`);
  await knex.raw(`CREATE TRIGGER design_versions_append_only BEFORE UPDATE ON design_versions FOR EACH ROW EXECUTE FUNCTION design_versions_refuse_update()`);

  // backfill, one design at a time (documents can be ~10 MB)
  const ids = (await knex('designs').orderBy('id').pluck('id')) as number[];
  for (const id of ids) {
    const row = (await knex('designs').where({ id }).first()) as { document: unknown; version: number; updated_by: number | null; updated_at: Date };
    const doc = row.document as { name?: unknown } | null;
    const name = typeof doc?.name === 'string' && doc.name.trim() !== '' ? doc.name.slice(0, 200) : 'Untitled design';
    const { siteCount, worst } = worstBound(row.document);
    await knex('designs').where({ id }).update({ name, site_count: siteCount, worst_rel_bound: worst, created_by: row.updated_by, created_at: row.updated_at });
    await knex('design_versions').insert({
      design_id: id,
      version: row.version,
      name,
      site_count: siteCount,
      document: JSON.stringify(row.document),
      sha256: createHash('sha256').update(canonicalJson(row.document), 'utf8').digest('hex'),
      created_by: row.updated_by,
      created_at: row.updated_at,
    });
  }
  await knex.raw(`ALTER TABLE designs ALTER COLUMN name SET NOT NULL`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('design_versions');
  await knex.raw('DROP FUNCTION IF EXISTS design_versions_refuse_update()');
  // one design per project again: keep the oldest of each project
  await knex.raw(`DELETE FROM designs d USING designs e WHERE d.project_id = e.project_id AND d.id > e.id`);
  await knex.schema.alterTable('designs', (t) => {
    t.dropIndex(['project_id']);
    t.unique(['project_id']);
    t.dropColumn('name');
    t.dropColumn('site_count');
    t.dropColumn('worst_rel_bound');
    t.dropColumn('created_by');
    t.dropColumn('created_at');
  });
}
