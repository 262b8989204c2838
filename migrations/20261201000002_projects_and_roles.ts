/**
 * Projects, who belongs to them, invitations, the design document and the audit trail.
 *
 * Everything two people can edit carries a `version` column (optimistic concurrency: an
 * update names the version it read and is refused with 409 when the row moved on).
 * Audit rows outlive their project (project_id is set to NULL on delete) so the history
 * of a deleted project can still be read by an administrator from the database.
 */
import type { Knex } from 'knex';

const ROLE_CHECK = `IN ('owner', 'editor', 'viewer')`;

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('projects', (t) => {
    t.increments('id').primary();
    t.text('name').notNullable();
    t.text('description').notNullable().defaultTo('');
    t.integer('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('memberships', (t) => {
    t.increments('id').primary();
    t.integer('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.integer('user_id').notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.text('role').notNullable();
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['project_id', 'user_id']);
    t.index(['user_id']);
  });
  await knex.raw(`ALTER TABLE memberships ADD CONSTRAINT memberships_role_check CHECK (role ${ROLE_CHECK})`);

  await knex.schema.createTable('invitations', (t) => {
    t.increments('id').primary();
    t.integer('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.text('email').notNullable();
    t.text('role').notNullable();
    t.text('token_hash').notNullable().unique();
    t.integer('invited_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('accepted_at', { useTz: true });
    t.integer('accepted_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('revoked_at', { useTz: true });
    t.index(['project_id']);
  });
  await knex.raw(`ALTER TABLE invitations ADD CONSTRAINT invitations_role_check CHECK (role ${ROLE_CHECK})`);

  await knex.schema.createTable('designs', (t) => {
    t.increments('id').primary();
    t.integer('project_id').notNullable().unique().references('id').inTable('projects').onDelete('CASCADE');
    t.jsonb('document').notNullable();
    t.integer('version').notNullable().defaultTo(1);
    t.integer('updated_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('audit_events', (t) => {
    t.bigIncrements('id').primary();
    t.integer('project_id').references('id').inTable('projects').onDelete('SET NULL');
    t.integer('actor_id').references('id').inTable('users').onDelete('SET NULL');
    t.text('action').notNullable();
    t.jsonb('detail').notNullable().defaultTo('{}');
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['project_id', 'at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('audit_events');
  await knex.schema.dropTableIfExists('designs');
  await knex.schema.dropTableIfExists('invitations');
  await knex.schema.dropTableIfExists('memberships');
  await knex.schema.dropTableIfExists('projects');
}
