import type { Knex } from 'knex';
import { HttpError } from '../platform/errors';
import type { Boundary } from '../../shared/registry/boundary';
import { boundaryAreaHa } from '../../shared/registry/boundary-area';
import { seasonOfDate, todayIso } from '../../shared/registry/season';
import type { FieldInput, PlantingInput, RanchInput } from '../../shared/schemas/registry';
import * as ranches from './ranches-db';
import * as fields from './fields-db';
import * as plantings from './plantings-db';
import { appendChange, type EntityType } from './history-db';
import { newFieldAreaHa } from './boundary-import';
import { historySummary } from './history-words';
import { inTransaction } from '../platform/database';

/**
 * Registry writes: each checks the rules that span records (the ranch is this organisation's,
 * names are unique, one planting per field and season), writes the record and its change-history
 * entry in one transaction, and returns the stored record.
 */
export interface Actor {
  id: string;
  name: string;
  organisationId: string;
}

const invalid = (field: string, message: string) => new HttpError('invalid', message, { [field]: message });

async function record(trx: Knex, actor: Actor, entityType: EntityType, entityId: string, action: 'create' | 'update' | 'delete', before: object | null, after: object | null, summary: string) {
  // Summaries are stored as read: crop names and field names in words, not codes and keys.
  await appendChange(trx, actor.organisationId, { entityType, entityId, action, user: actor, before, after, summary: historySummary(summary) });
}

/** The stored fields of a record, without computed totals, for the history's before/after. */
const ranchSnapshot = (r: ranches.Ranch) => ({ name: r.name, code: r.code, county: r.county, notes: r.notes, contactEmails: r.contactEmails });
const fieldSnapshot = (f: fields.Field) => ({ ranchId: f.ranchId, name: f.name, areaHa: f.areaHa, boundary: f.boundary, notes: f.notes });
const plantingSnapshot = (p: plantings.Planting) => ({
  fieldId: p.fieldId,
  season: p.season,
  crop: p.crop,
  variety: p.variety,
  seededOn: p.seededOn,
  seedingRateKgHa: p.seedingRateKgHa,
  plannedTerminationOn: p.plannedTerminationOn,
  terminatedOn: p.terminatedOn,
  notes: p.notes,
});

const currentSeason = () => seasonOfDate(todayIso());

/** Names of what changed between two snapshots, for the history summary. */
function changedKeys(before: Record<string, unknown>, after: Record<string, unknown>): string[] {
  return Object.keys(after).filter((k) => JSON.stringify(before[k] ?? null) !== JSON.stringify(after[k] ?? null));
}

// Ranches -------------------------------------------------------------------------------------

export async function createRanch(db: Knex, actor: Actor, input: RanchInput): Promise<ranches.Ranch> {
  return inTransaction(db, async (trx) => {
    if (await ranches.ranchNameTaken(trx, actor.organisationId, input.name)) throw invalid('name', 'A ranch with this name already exists.');
    const id = await ranches.insertRanch(trx, actor.organisationId, input);
    const created = (await ranches.getRanch(trx, actor.organisationId, id, currentSeason()))!;
    await record(trx, actor, 'ranch', id, 'create', null, ranchSnapshot(created), `Ranch “${created.name}” created`);
    return created;
  });
}

export async function updateRanch(db: Knex, actor: Actor, id: string, changes: Partial<RanchInput>): Promise<ranches.Ranch> {
  return inTransaction(db, async (trx) => {
    const before = await ranches.getRanch(trx, actor.organisationId, id, currentSeason());
    if (!before) throw new HttpError('not_found');
    if (changes.name && (await ranches.ranchNameTaken(trx, actor.organisationId, changes.name, id))) {
      throw invalid('name', 'A ranch with this name already exists.');
    }
    await ranches.updateRanch(trx, actor.organisationId, id, changes);
    const after = (await ranches.getRanch(trx, actor.organisationId, id, currentSeason()))!;
    const keys = changedKeys(ranchSnapshot(before), ranchSnapshot(after));
    if (keys.length) await record(trx, actor, 'ranch', id, 'update', ranchSnapshot(before), ranchSnapshot(after), `Ranch “${after.name}”: ${keys.join(', ')} changed`);
    return after;
  });
}

export async function deleteRanch(db: Knex, actor: Actor, id: string): Promise<void> {
  await inTransaction(db, async (trx) => {
    const before = await ranches.getRanch(trx, actor.organisationId, id, currentSeason());
    if (!before) throw new HttpError('not_found');
    if (before.fieldCount > 0) throw new HttpError('conflict', `“${before.name}” still has ${before.fieldCount} field(s): only an empty ranch can be deleted.`);
    await ranches.deleteRanch(trx, actor.organisationId, id);
    await record(trx, actor, 'ranch', id, 'delete', ranchSnapshot(before), null, `Ranch “${before.name}” deleted`);
  });
}

// Fields --------------------------------------------------------------------------------------

const boundaryArea = (b: Boundary | null | undefined) => (b ? boundaryAreaHa(b) : null);

export async function createField(db: Knex, actor: Actor, input: FieldInput): Promise<fields.Field> {
  return inTransaction(db, async (trx) => {
    const ranch = await ranches.getRanch(trx, actor.organisationId, input.ranchId, currentSeason());
    if (!ranch) throw invalid('ranchId', 'Choose one of your ranches.');
    if (await fields.fieldNameTaken(trx, actor.organisationId, input.ranchId, input.name)) {
      throw invalid('name', `“${ranch.name}” already has a field with this name.`);
    }
    const id = await fields.insertField(trx, actor.organisationId, { ...input, boundaryAreaHa: boundaryArea(input.boundary) });
    const created = (await fields.getField(trx, actor.organisationId, id))!;
    await record(trx, actor, 'field', id, 'create', null, fieldSnapshot(created), `Field “${created.name}” created on ${ranch.name}`);
    return created;
  });
}

export async function updateField(db: Knex, actor: Actor, id: string, changes: Partial<FieldInput>): Promise<fields.Field> {
  return inTransaction(db, async (trx) => {
    const before = await fields.getField(trx, actor.organisationId, id);
    if (!before) throw new HttpError('not_found');
    const ranchId = changes.ranchId ?? before.ranchId;
    if (changes.ranchId && !(await ranches.getRanch(trx, actor.organisationId, changes.ranchId, currentSeason()))) {
      throw invalid('ranchId', 'Choose one of your ranches.');
    }
    const name = changes.name ?? before.name;
    if ((changes.name || changes.ranchId) && (await fields.fieldNameTaken(trx, actor.organisationId, ranchId, name, id))) {
      throw invalid('name', 'That ranch already has a field with this name.');
    }
    const write = { ...changes } as Partial<fields.FieldWrite>;
    if (changes.boundary !== undefined) write.boundaryAreaHa = boundaryArea(changes.boundary);
    await fields.updateField(trx, actor.organisationId, id, write);
    const after = (await fields.getField(trx, actor.organisationId, id))!;
    const keys = changedKeys(fieldSnapshot(before), fieldSnapshot(after));
    if (keys.length) await record(trx, actor, 'field', id, 'update', fieldSnapshot(before), fieldSnapshot(after), `Field “${after.name}”: ${keys.join(', ')} changed`);
    return after;
  });
}

// Plantings -----------------------------------------------------------------------------------

async function checkPlanting(trx: Knex, actor: Actor, p: PlantingInput, exceptId?: string) {
  const field = await fields.getField(trx, actor.organisationId, p.fieldId);
  if (!field) throw invalid('fieldId', 'Choose one of your fields.');
  if (await plantings.plantingExists(trx, actor.organisationId, p.fieldId, p.season, exceptId)) {
    throw invalid('season', `“${field.name}” already has a planting for ${p.season}.`);
  }
  return field;
}

export async function createPlanting(db: Knex, actor: Actor, input: PlantingInput): Promise<plantings.Planting> {
  return inTransaction(db, async (trx) => {
    const field = await checkPlanting(trx, actor, input);
    const id = await plantings.insertPlanting(trx, actor.organisationId, input);
    const created = (await plantings.getPlanting(trx, actor.organisationId, id))!;
    await record(trx, actor, 'planting', id, 'create', null, plantingSnapshot(created), `Planting ${input.season} (${input.crop}) created on ${field.name}`);
    return created;
  });
}

export async function updatePlanting(db: Knex, actor: Actor, id: string, changes: Partial<PlantingInput>): Promise<plantings.Planting> {
  return inTransaction(db, async (trx) => {
    const before = await plantings.getPlanting(trx, actor.organisationId, id);
    if (!before) throw new HttpError('not_found');
    const merged = { ...plantingSnapshot(before), ...changes } as PlantingInput;
    if (merged.terminatedOn && merged.terminatedOn < merged.seededOn) throw invalid('terminatedOn', 'Termination cannot come before seeding.');
    if (merged.plannedTerminationOn && merged.plannedTerminationOn < merged.seededOn) {
      throw invalid('plannedTerminationOn', 'Planned termination cannot come before seeding.');
    }
    await checkPlanting(trx, actor, merged, id);
    await plantings.updatePlanting(trx, actor.organisationId, id, changes);
    const after = (await plantings.getPlanting(trx, actor.organisationId, id))!;
    const keys = changedKeys(plantingSnapshot(before), plantingSnapshot(after));
    if (keys.length) {
      await record(trx, actor, 'planting', id, 'update', plantingSnapshot(before), plantingSnapshot(after), `Planting ${after.season} on ${after.fieldName}: ${keys.join(', ')} changed`);
    }
    return after;
  });
}
// Single-query reads and writes the routes and pages use as they are (SQL stays in the db modules).
export { getPlanting, listCrops, listPlantings, varietySuggestions, type Planting } from './plantings-db';
export { getField, listFields, type Field } from './fields-db';
export { historyAuthors, listHistory } from './history-db';
export { getRanch, listRanches, ranchOptions, RANCH_SORTS, type Ranch, type RanchSort } from './ranches-db';

// Boundaries from a file --------------------------------------------------------------------------

/**
 * Writes a checked boundary import (boundary-import.ts) in one transaction: matched fields get
 * their boundary (their entered area stays), new fields take the boundary's area. Each write keeps
 * its own change-history entry; any failure writes nothing.
 */
export async function importBoundaries(db: Knex, actor: Actor, ranchId: string, rows: BoundaryImportRow[]): Promise<void> {
  await inTransaction(db, async (trx) => {
    for (const row of rows) {
      if (row.fieldId) await updateField(trx, actor, row.fieldId, { boundary: row.boundary });
      else await createField(trx, actor, { ranchId, name: row.name, areaHa: newFieldAreaHa(row.areaHa), boundary: row.boundary, notes: null } as FieldInput);
    }
  });
}

export interface BoundaryImportRow {
  name: string;
  areaHa: number;
  boundary: Boundary;
  fieldId?: string;
}
