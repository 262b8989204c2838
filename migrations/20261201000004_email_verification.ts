/**
 * E-mail confirmation at sign-up.
 *
 * `users.email_verified_at` is null while the owner of the address has not followed the
 * confirmation link; such an account cannot sign in. Accounts that existed before this
 * migration (the demo seed, earlier sign-ups) count as verified from their creation.
 * `email_verifications` holds the links' tokens the same way `password_resets` does: only a
 * sha256 hash, an expiry and a used mark.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('users', (t) => {
    t.timestamp('email_verified_at', { useTz: true });
  });
  await knex('users').whereNull('email_verified_at').update({ email_verified_at: knex.ref('created_at') });

  await knex.schema.createTable('email_verifications', (t) => {
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
  await knex.schema.dropTableIfExists('email_verifications');
  await knex.schema.alterTable('users', (t) => {
    t.dropColumn('email_verified_at');
  });
}
