import type { Knex } from 'knex';

/*
 * Signed registers: each finalised version keeps a chain hash (SHA-256 of the previous version's
 * chain hash and its own content hash), an HMAC-SHA256 signature of it, and the id of the key that
 * signed. Versions finalised before this stay unsigned (null) and say so; they are never signed
 * after the fact.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('registers', (t) => {
    t.string('chain_hash', 64).nullable();
    t.string('signature', 64).nullable();
    t.string('signing_key_id', 32).nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('registers', (t) => {
    t.dropColumn('signing_key_id');
    t.dropColumn('signature');
    t.dropColumn('chain_hash');
  });
}
