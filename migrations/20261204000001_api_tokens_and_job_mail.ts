/**
 * Scripted use (issue 10): personal API tokens and the per-user job e-mail switch.
 *
 *   api_tokens           one row per personal token: its owner, the name the owner gave it, the sha256 of the
 *                        secret in hex (the secret itself is shown once, at creation, and never stored), the
 *                        first characters of the secret (to tell tokens apart in the list), when it was made
 *                        and last used, and when it was revoked (revoked rows stay for the record)
 *   users.notify_job_mail  e-mail me when a long job of mine finishes or fails (on by default)
 *   jobs.notified_at     when that e-mail was claimed for the job (at most one per job)
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('api_tokens', (t) => {
    t.increments('id').primary();
    t.integer('user_id').notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.text('name').notNullable();
    t.text('secret_hash').notNullable().unique();
    t.text('prefix').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('last_used_at', { useTz: true });
    t.timestamp('revoked_at', { useTz: true });
    t.index(['user_id']);
  });
  await knex.schema.alterTable('users', (t) => {
    t.boolean('notify_job_mail').notNullable().defaultTo(true);
  });
  await knex.schema.alterTable('jobs', (t) => {
    t.timestamp('notified_at', { useTz: true });
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('jobs', (t) => {
    t.dropColumn('notified_at');
  });
  await knex.schema.alterTable('users', (t) => {
    t.dropColumn('notify_job_mail');
  });
  await knex.schema.dropTableIfExists('api_tokens');
}
