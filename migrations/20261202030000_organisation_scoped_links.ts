import type { Knex } from 'knex';

/*
 * The database itself refuses a link between two organisations' rows: each parent gets a unique
 * key (organisation_id, id) and each child references its parent through (organisation_id,
 * parent_id), so a walk of one organisation can never point at another's planting. The
 * single-column keys stay. Links to the user who made or reviewed something are left out where
 * they are SET NULL on delete (a composite key would null the organisation too).
 *
 * On SQLite, Knex rebuilds each child table to add its keys (rows are copied across), which needs
 * foreign-key checks off while the old table is dropped; SQLite ignores that switch inside a
 * transaction, so this migration runs outside Knex's transaction (Knex checks the keys after each
 * rebuild) and wraps its own on PostgreSQL.
 */
export const config = { transaction: false };

const inTransaction = (knex: Knex, work: (db: Knex) => Promise<void>) =>
  knex.client.config.client === 'better-sqlite3' ? work(knex) : knex.transaction((trx) => work(trx));
const PARENTS = ['users', 'ranches', 'fields', 'plantings', 'field_walks', 'calibration_datasets', 'calibrations', 'registers'];

type Link = { column: string; parent: string; onDelete: 'RESTRICT' | 'CASCADE' };
const CHILDREN: [string, Link[]][] = [
  ['fields', [{ column: 'ranch_id', parent: 'ranches', onDelete: 'RESTRICT' }]],
  ['plantings', [{ column: 'field_id', parent: 'fields', onDelete: 'RESTRICT' }]],
  [
    'field_walks',
    [
      { column: 'planting_id', parent: 'plantings', onDelete: 'RESTRICT' },
      { column: 'sampler_id', parent: 'users', onDelete: 'RESTRICT' },
    ],
  ],
  ['walk_plants', [{ column: 'walk_id', parent: 'field_walks', onDelete: 'CASCADE' }]],
  ['walk_photos', [{ column: 'walk_id', parent: 'field_walks', onDelete: 'CASCADE' }]],
  [
    'walk_assignments',
    [
      { column: 'planting_id', parent: 'plantings', onDelete: 'CASCADE' },
      { column: 'sampler_id', parent: 'users', onDelete: 'CASCADE' },
    ],
  ],
  ['calibrations', [{ column: 'dataset_id', parent: 'calibration_datasets', onDelete: 'RESTRICT' }]],
  ['calibration_assignments', [{ column: 'calibration_id', parent: 'calibrations', onDelete: 'RESTRICT' }]],
  [
    'registers',
    [
      { column: 'ranch_id', parent: 'ranches', onDelete: 'RESTRICT' },
      { column: 'previous_id', parent: 'registers', onDelete: 'RESTRICT' },
    ],
  ],
];

const uniqueName = (table: string) => `${table}_organisation_id_id_unique`;
const foreignName = (table: string, column: string) => `${table}_organisation_id_${column}_foreign`;

export const up = (knex: Knex) => inTransaction(knex, addKeys);
export const down = (knex: Knex) => inTransaction(knex, dropKeys);

async function addKeys(knex: Knex): Promise<void> {
  for (const table of PARENTS) {
    await knex.schema.alterTable(table, (t) => {
      t.unique(['organisation_id', 'id'], { indexName: uniqueName(table) });
    });
  }
  for (const [table, links] of CHILDREN) {
    await knex.schema.alterTable(table, (t) => {
      for (const link of links) {
        t.foreign(['organisation_id', link.column], foreignName(table, link.column))
          .references(['organisation_id', 'id'])
          .inTable(link.parent)
          .onDelete(link.onDelete);
      }
    });
  }
}

async function dropKeys(knex: Knex): Promise<void> {
  for (const [table, links] of [...CHILDREN].reverse()) {
    await knex.schema.alterTable(table, (t) => {
      for (const link of links) t.dropForeign(['organisation_id', link.column], foreignName(table, link.column));
    });
  }
  for (const table of [...PARENTS].reverse()) {
    await knex.schema.alterTable(table, (t) => {
      t.dropUnique(['organisation_id', 'id'], uniqueName(table));
    });
  }
}
