import type { Knex } from 'knex';

// The crop list every install needs (README, "API": GET /api/crops): data, kept apart from the schema.
const CROPS = [
  { code: 'cereal_rye', label: 'Cereal rye', crop_class: 'cereal', sort_order: 1 },
  { code: 'triticale', label: 'Triticale', crop_class: 'cereal', sort_order: 2 },
  { code: 'barley', label: 'Barley', crop_class: 'cereal', sort_order: 3 },
  { code: 'oats', label: 'Oats', crop_class: 'cereal', sort_order: 4 },
  { code: 'wheat', label: 'Wheat', crop_class: 'cereal', sort_order: 5 },
  { code: 'legume', label: 'Legume', crop_class: 'legume', sort_order: 6 },
  { code: 'mix', label: 'Mix', crop_class: 'mix', sort_order: 7 },
  { code: 'other', label: 'Other', crop_class: 'other', sort_order: 8 },
];

export async function up(knex: Knex): Promise<void> {
  await knex('crops').insert(CROPS);
}

export async function down(knex: Knex): Promise<void> {
  // Crops still named by plantings stay; the registry's own rollback drops both tables after this.
  await knex('crops')
    .whereIn('code', CROPS.map((c) => c.code))
    .whereNotIn('code', knex('plantings').select('crop'))
    .del();
}
