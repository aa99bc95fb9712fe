import type { Knex } from 'knex';

export async function countOrganisations(db: Knex): Promise<number> {
  const row = await db('organisations').count({ n: '*' }).first();
  return Number(row?.n ?? 0);
}
