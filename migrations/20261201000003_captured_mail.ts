/**
 * Messages received by the development/test SMTP server (server/mail/fakeSmtp.ts).
 * Site admins read them in the app; tests read them to follow invitation and reset links.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('captured_mail', (t) => {
    t.increments('id').primary();
    t.timestamp('received_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('envelope_from').notNullable().defaultTo('');
    t.jsonb('recipients').notNullable().defaultTo('[]');
    t.text('subject').notNullable().defaultTo('');
    t.text('text').notNullable().defaultTo('');
    t.text('html');
    t.text('message_id');
    t.index(['received_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('captured_mail');
}
