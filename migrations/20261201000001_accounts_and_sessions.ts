/**
 * Accounts and the session store.
 *
 * `sessions` follows the schema that connect-pg-simple expects (sid / sess / expire); the
 * server never lets the store create it, so every table has a migration.
 * E-mail addresses are stored lower-cased by the API (zod trims and lower-cases them); the
 * unique index is on lower(email) so a hand-written row cannot sneak in a case duplicate.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.increments('id').primary();
    t.text('email').notNullable();
    t.text('password_hash').notNullable();
    t.text('display_name').notNullable();
    t.text('site_role').notNullable().defaultTo('member');
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE users ADD CONSTRAINT users_site_role_check CHECK (site_role IN ('admin', 'member'))`);
  await knex.raw(`CREATE UNIQUE INDEX users_email_lower_unique ON users (lower(email))`);

  await knex.schema.createTable('sessions', (t) => {
    t.string('sid').notNullable().primary();
    t.json('sess').notNullable();
    t.timestamp('expire', { useTz: false, precision: 6 }).notNullable();
    t.index(['expire'], 'sessions_expire_idx');
  });

  await knex.schema.createTable('password_resets', (t) => {
    t.increments('id').primary();
    t.integer('user_id').notNullable().references('id').inTable('users').onDelete('CASCADE');
    // sha256 of the token in hex: the raw token only ever exists in the e-mail
    t.text('token_hash').notNullable().unique();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('used_at', { useTz: true });
    t.index(['user_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('password_resets');
  await knex.schema.dropTableIfExists('sessions');
  await knex.schema.dropTableIfExists('users');
}
