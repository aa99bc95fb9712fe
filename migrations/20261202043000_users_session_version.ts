import type { Knex } from 'knex';

/*
 * A counter on each user that every session carries from its sign-in: raising it (a password
 * change, a reset, a deactivation) ends every session made before, since a session whose number
 * differs from the user's is refused when it loads (server/people/passport.ts).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('users', (t) => {
    t.integer('session_version').notNullable().defaultTo(0);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('users', (t) => {
    t.dropColumn('session_version');
  });
}
