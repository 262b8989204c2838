/**
 * Jobs and revisions (issue 10).
 *
 *   jobs              our record of every mesh / coulomb / convergence request: the API reads only
 *                     this table. pg-boss (its own schema `pgboss`, created by pg-boss at start) moves
 *                     the work; `boss_job_id` links the two.
 *   revisions         one immutable row per finished job (a trigger refuses UPDATE): the design
 *                     version and the sha256 of its document, the options, the software version,
 *                     timings and the summary (the CLI's --json keys). `job_id` is unique, so a job
 *                     retried after a worker died can never store two revisions.
 *   revision_files    one row per downloadable file: name, content type, its size in bytes and the
 *                     bytes it takes in the database (compressed)
 *   revision_chunks   the file bytes, split into pieces of at most 1 MiB of the original, each piece
 *                     zlib-compressed on its own (fflate), so a download streams piece by piece
 *
 * Revision, files and chunks are written in one transaction: no partial mesh is ever readable.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('jobs', (t) => {
    t.increments('id').primary();
    t.integer('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.integer('design_id').notNullable().references('id').inTable('designs').onDelete('CASCADE');
    t.integer('design_version').notNullable();
    t.text('design_sha256').notNullable();
    t.text('kind').notNullable();
    t.jsonb('options').notNullable();
    t.text('state').notNullable().defaultTo('queued');
    t.jsonb('progress').notNullable();
    t.integer('revision_id');
    t.text('error');
    t.integer('attempts').notNullable().defaultTo(0);
    t.text('boss_job_id');
    t.integer('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('started_at', { useTz: true });
    t.timestamp('finished_at', { useTz: true });
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['project_id', 'id']);
    t.index(['project_id', 'state']);
  });
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_kind_check CHECK (kind IN ('mesh', 'coulomb', 'convergence'))`);
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_state_check CHECK (state IN ('queued', 'running', 'succeeded', 'failed', 'cancelled'))`);

  await knex.schema.createTable('revisions', (t) => {
    t.increments('id').primary();
    t.integer('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.integer('job_id').unique().references('id').inTable('jobs').onDelete('SET NULL');
    t.integer('design_id').notNullable().references('id').inTable('designs').onDelete('CASCADE');
    t.integer('design_version').notNullable();
    t.text('design_sha256').notNullable();
    t.text('kind').notNullable();
    t.jsonb('options').notNullable();
    /** canonical JSON of the options, for the reuse lookup */
    t.text('options_key').notNullable();
    t.text('software_version').notNullable();
    t.text('software_commit');
    t.jsonb('timings').notNullable();
    t.jsonb('summary').notNullable();
    t.bigInteger('stored_bytes').notNullable().defaultTo(0);
    t.integer('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['project_id', 'id']);
    t.index(['design_sha256', 'kind', 'options_key']);
  });
  await knex.raw(`ALTER TABLE revisions ADD CONSTRAINT revisions_sha256_hex CHECK (design_sha256 ~ '^[0-9a-f]{64}$')`);
  await knex.raw(`
    CREATE FUNCTION revisions_refuse_update() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      -- the job link may go when its job row is deleted (ON DELETE SET NULL); nothing else changes
      IF NEW.job_id IS NULL AND OLD.job_id IS NOT NULL AND (to_jsonb(NEW) - 'job_id') = (to_jsonb(OLD) - 'job_id') THEN
        RETURN NEW;
      END IF;
      RAISE EXCEPTION 'revisions are immutable (revision %)', OLD.id;
    END $$`);
  await knex.raw(`CREATE TRIGGER revisions_immutable BEFORE UPDATE ON revisions FOR EACH ROW EXECUTE FUNCTION revisions_refuse_update()`);

  await knex.schema.alterTable('jobs', (t) => {
    t.foreign('revision_id').references('id').inTable('revisions').onDelete('SET NULL');
  });

  await knex.schema.createTable('revision_files', (t) => {
    t.integer('revision_id').notNullable().references('id').inTable('revisions').onDelete('CASCADE');
    t.text('name').notNullable();
    t.text('content_type').notNullable();
    t.bigInteger('bytes').notNullable();
    t.bigInteger('stored_bytes').notNullable();
    t.integer('chunks').notNullable();
    t.primary(['revision_id', 'name']);
  });
  await knex.schema.createTable('revision_chunks', (t) => {
    t.integer('revision_id').notNullable().references('id').inTable('revisions').onDelete('CASCADE');
    t.text('file').notNullable();
    t.integer('seq').notNullable();
    t.binary('bytes').notNullable();
    t.primary(['revision_id', 'file', 'seq']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('revision_chunks');
  await knex.schema.dropTableIfExists('revision_files');
  await knex.schema.alterTable('jobs', (t) => t.dropForeign(['revision_id']));
  await knex.schema.dropTableIfExists('revisions');
  await knex.raw('DROP FUNCTION IF EXISTS revisions_refuse_update()');
  await knex.schema.dropTableIfExists('jobs');
}
