import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, type TestApp } from '../../helpers/app';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';

/*
 * The database itself refuses rows that link two organisations (composite keys
 * (organisation_id, id) → (organisation_id, parent_id), migrations/20261202030000_…). Each check
 * writes straight through Knex, past every service, and has a same-organisation twin that succeeds,
 * so a refusal means the organisation mismatch and nothing else.
 */
const [{ id: A }, { id: B }] = DEMO_ORGANISATIONS;
const now = () => new Date().toISOString();
let t: TestApp;

beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.db.destroy();
});

const first = async (table: string, organisationId: string, where: Record<string, unknown> = {}) => {
  const row = await t.db(table).where({ organisation_id: organisationId, ...where }).first();
  expect(row, `a seeded ${table} row of ${organisationId}`).toBeTruthy();
  return row as { id: string };
};

const walkOf = (id: string, organisationId: string, plantingId: string, samplerId: string) => ({
  id,
  organisation_id: organisationId,
  planting_id: plantingId,
  sampler_id: samplerId,
  walked_on: '2026-03-02',
  status: 'draft',
  content_hash: 'f'.repeat(64),
  created_at: now(),
});

describe('links between organisations', () => {
  it('refuses a walk of organisation A that points at a planting of organisation B', async () => {
    const samplerA = await first('users', A);
    const plantingA = await first('plantings', A);
    const plantingB = await first('plantings', B);
    await t.db('field_walks').insert(walkOf('00000000-0000-4000-8000-0000000000a1', A, plantingA.id, samplerA.id));
    await expect(t.db('field_walks').insert(walkOf('00000000-0000-4000-8000-0000000000a2', A, plantingB.id, samplerA.id))).rejects.toThrow(/FOREIGN KEY/i);
  });

  it('refuses a walk made by another organisation’s user', async () => {
    const samplerB = await first('users', B);
    const plantingA = await first('plantings', A);
    await expect(t.db('field_walks').insert(walkOf('00000000-0000-4000-8000-0000000000a3', A, plantingA.id, samplerB.id))).rejects.toThrow(/FOREIGN KEY/i);
  });

  it('refuses a field of organisation A on a ranch of organisation B', async () => {
    const ranchA = await first('ranches', A);
    const ranchB = await first('ranches', B);
    const field = (id: string, ranchId: string) => ({ id, organisation_id: A, ranch_id: ranchId, name: `Test field ${id.slice(-2)}`, area_ha: 10, created_at: now(), updated_at: now() });
    await t.db('fields').insert(field('00000000-0000-4000-8000-0000000000b1', ranchA.id));
    await expect(t.db('fields').insert(field('00000000-0000-4000-8000-0000000000b2', ranchB.id))).rejects.toThrow(/FOREIGN KEY/i);
  });

  it('refuses moving a planting under another organisation’s field', async () => {
    // Two empty fields, one per organisation, so the planting's season is free on both.
    const field = (id: string, organisationId: string, ranchId: string) => ({ id, organisation_id: organisationId, ranch_id: ranchId, name: `Empty field ${id.slice(-2)}`, area_ha: 5, created_at: now(), updated_at: now() });
    await t.db('fields').insert(field('00000000-0000-4000-8000-0000000000c1', A, (await first('ranches', A)).id));
    await t.db('fields').insert(field('00000000-0000-4000-8000-0000000000c2', B, (await first('ranches', B)).id));
    const plantingA = await first('plantings', A);
    await t.db('plantings').where({ id: plantingA.id }).update({ field_id: '00000000-0000-4000-8000-0000000000c1' });
    await expect(t.db('plantings').where({ id: plantingA.id }).update({ field_id: '00000000-0000-4000-8000-0000000000c2' })).rejects.toThrow(/FOREIGN KEY/i);
  });

  it('refuses an assignment of organisation A for a planting of organisation B', async () => {
    const samplerA = await first('users', A);
    const plantingA = await first('plantings', A);
    const plantingB = await first('plantings', B);
    const assignment = (plantingId: string) => ({ organisation_id: A, planting_id: plantingId, sampler_id: samplerA.id, due_on: null, created_at: now() });
    await t.db('walk_assignments').insert(assignment(plantingA.id)).onConflict(['planting_id', 'sampler_id']).ignore();
    await expect(t.db('walk_assignments').insert(assignment(plantingB.id))).rejects.toThrow(/FOREIGN KEY/i);
  });
});
