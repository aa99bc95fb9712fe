import type { Knex } from 'knex';
import { inOrganisation } from '../../platform/scope';

/** The organisation's ranch, field and planting keys, all the import's row checker needs of the registry. */
export async function registryKeys(db: Knex, organisationId: string) {
  const ranches: { id: string; name: string }[] = await inOrganisation(db, 'ranches', organisationId).select('id', 'name');
  const fields: { id: string; ranch_id: string; name: string; area_ha: number }[] = await inOrganisation(db, 'fields', organisationId).select('id', 'ranch_id', 'name', 'area_ha');
  const plantings: { field_id: string; season: string }[] = await inOrganisation(db, 'plantings', organisationId).select('field_id', 'season');
  return { ranches, fields, plantings };
}
