import type { Knex } from 'knex';

// Every message Crowntip sends, whether captured (no SMTP configured) or handed to SMTP: the admin
// Outbox page reads it, so what was sent can always be checked.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('mail_outbox', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).nullable().references('organisations.id').onDelete('CASCADE');
    t.string('to_address', 1000).notNullable();
    t.string('subject', 500).notNullable();
    t.text('text_body').notNullable();
    t.text('html_body').nullable();
    t.text('raw').nullable(); // the full MIME message when captured
    t.json('attachments').nullable(); // [{filename, contentType, size}]
    t.string('status', 16).notNullable(); // captured | sent | failed
    t.string('error', 1000).nullable();
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.index(['organisation_id', 'created_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('mail_outbox');
}
