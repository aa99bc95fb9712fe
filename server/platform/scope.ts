import type { Knex } from 'knex';

/**
 * The one way to reach an organisation's rows: every data function starts its query here, so a
 * query without the organisation filter cannot be written by accident. An id from another
 * organisation then simply finds nothing (404), as the API contract asks.
 */
export function inOrganisation(db: Knex, table: string, organisationId: string): Knex.QueryBuilder {
  if (!organisationId) throw new Error(`query on ${table} without an organisation`);
  return db(table).where(`${table}.organisation_id`, organisationId);
}

export const nowIso = () => new Date().toISOString();
