import type { Knex } from 'knex';

// One-time links (invitations and password resets). Only a hash of the token is kept, so a copy
// of the database cannot be used to take over an account.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('user_tokens', (t) => {
    t.string('id', 36).primary();
    t.string('user_id', 36).notNullable().references('users.id').onDelete('CASCADE');
    t.string('purpose', 16).notNullable(); // invite | reset
    t.string('token_hash', 64).notNullable().unique();
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('used_at', { useTz: true }).nullable();
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.index(['user_id', 'purpose']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('user_tokens');
}
