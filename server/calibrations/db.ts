import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import type { Fit, ModelKind } from '../../shared/calc';
import { inOrganisation, nowIso } from '../platform/scope';
import { flag, isoTime, jsonValue } from '../platform/column-values';
import type { Assignment, BiomassUnit, Calibration, CalibrationStatus, Dataset, DatasetPoint, LengthUnit } from './types';

export * from './types';


// '' in storage means "not given" (see the migration); null at this edge.
const blankToNull = (v: unknown) => (typeof v === 'string' && v !== '' ? v : null);
const nullToBlank = (v: string | null | undefined) => (v ?? '').trim();
const num = (v: unknown) => (v == null ? null : Number(v));

// Uploads waiting for preview -----------------------------------------------------------------

const UPLOAD_LIFETIME_MS = 24 * 3600 * 1000;

export interface Upload {
  id: string;
  fileName: string;
  content: string;
  byteSize: number;
  createdAt: string;
}

/** Keeps an uploaded CSV for its preview, and drops this organisation's uploads older than a day. */
export async function insertUpload(db: Knex, organisationId: string, upload: { uploadedBy: string; fileName: string; content: string; byteSize: number }): Promise<string> {
  const id = randomUUID();
  await inOrganisation(db, 'calibration_uploads', organisationId)
    .where('created_at', '<', new Date(Date.now() - UPLOAD_LIFETIME_MS).toISOString())
    .delete();
  await db('calibration_uploads').insert({
    id,
    organisation_id: organisationId,
    uploaded_by: upload.uploadedBy,
    file_name: upload.fileName.slice(0, 255),
    content: upload.content,
    byte_size: upload.byteSize,
    created_at: nowIso(),
  });
  return id;
}

export async function getUpload(db: Knex, organisationId: string, id: string): Promise<Upload | undefined> {
  const r = await inOrganisation(db, 'calibration_uploads', organisationId).where('id', id).first();
  return r ? toUpload(r) : undefined;
}

const toUpload = (r: Record<string, unknown>): Upload => ({
  id: r.id as string,
  fileName: r.file_name as string,
  content: r.content as string,
  byteSize: Number(r.byte_size),
  createdAt: isoTime(r.created_at)!,
});

export async function deleteUpload(db: Knex, organisationId: string, id: string): Promise<void> {
  await inOrganisation(db, 'calibration_uploads', organisationId).where('id', id).delete();
}

// Data sets -----------------------------------------------------------------------------------

export interface DatasetWrite {
  name: string;
  fileName?: string | null;
  lengthUnit: LengthUnit;
  biomassUnit: BiomassUnit;
  points: DatasetPoint[];
  uploadedBy: string | null;
}

export async function insertDataset(db: Knex, organisationId: string, d: DatasetWrite, id: string = randomUUID()): Promise<string> {
  await db('calibration_datasets').insert({
    id,
    organisation_id: organisationId,
    name: d.name,
    file_name: d.fileName ?? null,
    length_unit: d.lengthUnit,
    biomass_unit: d.biomassUnit,
    row_count: d.points.length,
    points: JSON.stringify(d.points),
    uploaded_by: d.uploadedBy,
    created_at: nowIso(),
  });
  return id;
}

export async function getDataset(db: Knex, organisationId: string, id: string): Promise<Dataset | undefined> {
  const r = await inOrganisation(db, 'calibration_datasets', organisationId)
    .leftJoin('users', 'users.id', 'calibration_datasets.uploaded_by')
    .where('calibration_datasets.id', id)
    .first('calibration_datasets.*', 'users.name as uploaded_by_name');
  return r ? toDataset(r) : undefined;
}

/** A calibration_datasets row, with its uploader's name, as a data set. */
const toDataset = (r: Record<string, unknown>): Dataset => ({
  id: r.id as string,
  name: r.name as string,
  fileName: (r.file_name as string) ?? null,
  lengthUnit: r.length_unit as LengthUnit,
  biomassUnit: r.biomass_unit as BiomassUnit,
  rowCount: Number(r.row_count),
  points: jsonValue<DatasetPoint[]>(r.points) ?? [],
  uploadedByName: (r.uploaded_by_name as string) ?? null,
  createdAt: isoTime(r.created_at)!,
});

async function datasetInUse(db: Knex, organisationId: string, datasetId: string): Promise<boolean> {
  return Boolean(await inOrganisation(db, 'calibrations', organisationId).where('dataset_id', datasetId).first('id'));
}

// Calibrations --------------------------------------------------------------------------------

export interface CalibrationWrite {
  datasetId: string;
  crop: string;
  variety?: string | null;
  region?: string | null;
  model: ModelKind | null;
  fit: Fit | null;
  n: number;
  xRange: [number, number];
  createdBy: string | null;
}

const fitColumns = (fit: Fit | null) => ({
  fit: fit ? JSON.stringify(fit) : null,
  r_squared: fit?.rSquared ?? null,
  residual_std_error: fit?.residualStdError ?? null,
  loo_rmse: fit?.looRmse ?? null,
});

/** A new draft. */
export async function insertCalibration(db: Knex, organisationId: string, c: CalibrationWrite, id: string = randomUUID()): Promise<string> {
  const now = nowIso();
  await db('calibrations').insert({
    id,
    organisation_id: organisationId,
    dataset_id: c.datasetId,
    crop: c.crop,
    variety: nullToBlank(c.variety),
    region: nullToBlank(c.region),
    status: 'draft',
    version: null,
    label: null,
    model: c.model,
    ...fitColumns(c.fit),
    n: c.n,
    x_min: c.xRange[0],
    x_max: c.xRange[1],
    created_by: c.createdBy,
    created_at: now,
    updated_at: now,
  });
  return id;
}

function baseQuery(db: Knex, organisationId: string) {
  return inOrganisation(db, 'calibrations', organisationId)
    .join('calibration_datasets', 'calibration_datasets.id', 'calibrations.dataset_id')
    .join('crops', 'crops.code', 'calibrations.crop')
    .leftJoin('users as creator', 'creator.id', 'calibrations.created_by')
    .leftJoin('users as publisher', 'publisher.id', 'calibrations.published_by')
    .leftJoin('users as retirer', 'retirer.id', 'calibrations.retired_by')
    .select(
      'calibrations.*',
      'calibration_datasets.name as dataset_name',
      'crops.label as crop_label',
      'crops.sort_order as crop_sort',
      'creator.name as created_by_name',
      'publisher.name as published_by_name',
      'retirer.name as retired_by_name',
      db.raw(
        'case when exists (select 1 from calibration_assignments a where a.calibration_id = calibrations.id) then 1 else 0 end as is_assigned',
      ),
    );
}

function toCalibration(r: Record<string, unknown>): Calibration {
  return {
    id: r.id as string,
    datasetId: r.dataset_id as string,
    datasetName: r.dataset_name as string,
    crop: r.crop as string,
    cropLabel: (r.crop_label as string) ?? (r.crop as string),
    variety: blankToNull(r.variety),
    region: blankToNull(r.region),
    status: r.status as CalibrationStatus,
    version: num(r.version),
    label: (r.label as string) ?? null,
    model: (r.model as ModelKind) ?? null,
    fit: jsonValue<Fit>(r.fit),
    n: Number(r.n),
    rSquared: num(r.r_squared),
    residualStdError: num(r.residual_std_error),
    looRmse: num(r.loo_rmse),
    xRange: [Number(r.x_min), Number(r.x_max)],
    createdByName: (r.created_by_name as string) ?? null,
    createdAt: isoTime(r.created_at)!,
    updatedAt: isoTime(r.updated_at)!,
    publishedByName: (r.published_by_name as string) ?? null,
    publishedAt: isoTime(r.published_at),
    retiredByName: (r.retired_by_name as string) ?? null,
    retiredAt: isoTime(r.retired_at),
    assigned: flag(r.is_assigned),
  };
}

export interface CalibrationListQuery {
  statuses: readonly CalibrationStatus[];
  crop?: string;
  limit: number;
  offset: number;
}

/** Published first, then drafts, then retired; within a crop, newest version first. */
export async function listCalibrations(db: Knex, organisationId: string, query: CalibrationListQuery): Promise<{ items: Calibration[]; total: number }> {
  const filter = (q: Knex.QueryBuilder) => {
    q.whereIn('calibrations.status', [...query.statuses]);
    if (query.crop) q.where('calibrations.crop', query.crop);
    return q;
  };
  const [{ total }] = await filter(inOrganisation(db, 'calibrations', organisationId)).count({ total: '*' });
  const rows = await filter(baseQuery(db, organisationId))
    .orderBy('crops.sort_order')
    .orderBy('calibrations.variety')
    .orderBy('calibrations.region')
    .orderByRaw("case calibrations.status when 'published' then 0 when 'draft' then 1 else 2 end")
    .orderBy('calibrations.version', 'desc')
    .orderBy('calibrations.created_at', 'desc')
    .limit(query.limit)
    .offset(query.offset);
  return { items: rows.map(toCalibration), total: Number(total) };
}

export async function getCalibration(db: Knex, organisationId: string, id: string): Promise<Calibration | undefined> {
  const r = await baseQuery(db, organisationId).where('calibrations.id', id).first();
  return r ? toCalibration(r) : undefined;
}

export interface DraftPatch {
  variety?: string | null;
  region?: string | null;
  label?: string | null;
  model?: ModelKind | null;
  fit?: Fit | null;
}

/**
 * Changes a draft. The status condition sits in the UPDATE itself, so a draft published meanwhile
 * is never changed; returns false when no draft was there to change.
 */
export async function updateDraft(db: Knex, organisationId: string, id: string, patch: DraftPatch): Promise<boolean> {
  const set: Record<string, unknown> = { updated_at: nowIso() };
  if (patch.variety !== undefined) set.variety = nullToBlank(patch.variety);
  if (patch.region !== undefined) set.region = nullToBlank(patch.region);
  if (patch.label !== undefined) set.label = patch.label;
  if (patch.model !== undefined) set.model = patch.model;
  if (patch.fit !== undefined) Object.assign(set, fitColumns(patch.fit));
  const count = await inOrganisation(db, 'calibrations', organisationId).where({ id, status: 'draft' }).update(set);
  return count === 1;
}

/** The next version number for this crop, variety and region (1 for the first). */
export async function nextVersion(db: Knex, organisationId: string, c: { crop: string; variety: string | null; region: string | null }): Promise<number> {
  const row = await inOrganisation(db, 'calibrations', organisationId)
    .where({ crop: c.crop, variety: nullToBlank(c.variety), region: nullToBlank(c.region) })
    .max({ v: 'version' })
    .first();
  return Number(row?.v ?? 0) + 1;
}

/** draft → published with its final model, fit, version and name; false if it was not a draft. */
export async function markPublished(
  db: Knex,
  organisationId: string,
  id: string,
  p: { model: ModelKind; fit: Fit; version: number; label: string; publishedBy: string },
): Promise<boolean> {
  const now = nowIso();
  const count = await inOrganisation(db, 'calibrations', organisationId)
    .where({ id, status: 'draft' })
    .update({ status: 'published', model: p.model, ...fitColumns(p.fit), version: p.version, label: p.label, published_by: p.publishedBy, published_at: now, updated_at: now });
  return count === 1;
}

/** published → retired; false if it was not published. */
export async function markRetired(db: Knex, organisationId: string, id: string, retiredBy: string): Promise<boolean> {
  const now = nowIso();
  const count = await inOrganisation(db, 'calibrations', organisationId)
    .where({ id, status: 'published' })
    .update({ status: 'retired', retired_by: retiredBy, retired_at: now, updated_at: now });
  return count === 1;
}

/** Deletes a draft (and its data set when no other calibration uses it); false if not a draft. */
export async function deleteDraft(db: Knex, organisationId: string, id: string): Promise<boolean> {
  return db.transaction(async (trx) => {
    const row = await inOrganisation(trx, 'calibrations', organisationId).where({ id, status: 'draft' }).first('dataset_id');
    if (!row) return false;
    await inOrganisation(trx, 'calibrations', organisationId).where({ id, status: 'draft' }).delete();
    if (!(await datasetInUse(trx, organisationId, row.dataset_id))) {
      await inOrganisation(trx, 'calibration_datasets', organisationId).where('id', row.dataset_id).delete();
    }
    return true;
  });
}

// Assignments: which published version an organisation's estimates use ---------------------------

function toAssignment(r: Record<string, unknown>): Assignment {
  return {
    crop: r.crop as string,
    cropLabel: (r.crop_label as string) ?? (r.crop as string),
    variety: blankToNull(r.variety),
    calibrationId: r.calibration_id as string,
    version: num(r.version),
    label: (r.label as string) ?? null,
    calibrationVariety: blankToNull(r.calibration_variety),
    calibrationRegion: blankToNull(r.calibration_region),
    assignedByName: (r.assigned_by_name as string) ?? null,
    assignedAt: isoTime(r.assigned_at)!,
  };
}

function assignmentQuery(db: Knex, organisationId: string) {
  return inOrganisation(db, 'calibration_assignments', organisationId)
    .join('calibrations', 'calibrations.id', 'calibration_assignments.calibration_id')
    .join('crops', 'crops.code', 'calibration_assignments.crop')
    .leftJoin('users', 'users.id', 'calibration_assignments.assigned_by')
    .select(
      'calibration_assignments.*',
      'crops.label as crop_label',
      'calibrations.version',
      'calibrations.label',
      'calibrations.variety as calibration_variety',
      'calibrations.region as calibration_region',
      'users.name as assigned_by_name',
    );
}

export async function listAssignments(db: Knex, organisationId: string): Promise<Assignment[]> {
  const rows = await assignmentQuery(db, organisationId).orderBy('crops.sort_order').orderBy('calibration_assignments.variety');
  return rows.map(toAssignment);
}

/** The stored variety spelling that matches `variety` ignoring case, so "Ridgeline" and "ridgeline" are one. */
async function storedVariety(db: Knex, organisationId: string, crop: string, variety: string | null): Promise<string> {
  const wanted = nullToBlank(variety);
  if (!wanted) return '';
  const row = await inOrganisation(db, 'calibration_assignments', organisationId)
    .where('crop', crop)
    .whereRaw('lower(variety) = ?', [wanted.toLowerCase()])
    .first('variety');
  return row?.variety ?? wanted;
}

/** Sets (or replaces) the calibration used for a crop, or for one variety of it. */
export async function setAssignment(db: Knex, organisationId: string, a: { crop: string; variety: string | null; calibrationId: string; assignedBy: string }): Promise<Assignment> {
  const variety = await storedVariety(db, organisationId, a.crop, a.variety);
  await db('calibration_assignments')
    .insert({ organisation_id: organisationId, crop: a.crop, variety, calibration_id: a.calibrationId, assigned_by: a.assignedBy, assigned_at: nowIso() })
    .onConflict(['organisation_id', 'crop', 'variety'])
    .merge(['calibration_id', 'assigned_by', 'assigned_at']);
  const row = await assignmentQuery(db, organisationId).where({ 'calibration_assignments.crop': a.crop, 'calibration_assignments.variety': variety }).first();
  return toAssignment(row);
}

/** Removes an assignment; false if there was none. */
export async function removeAssignment(db: Knex, organisationId: string, crop: string, variety: string | null): Promise<boolean> {
  const stored = await storedVariety(db, organisationId, crop, variety);
  const count = await inOrganisation(db, 'calibration_assignments', organisationId).where({ crop, variety: stored }).delete();
  return count > 0;
}

export async function assignmentsOf(db: Knex, organisationId: string, calibrationId: string): Promise<Assignment[]> {
  const rows = await assignmentQuery(db, organisationId).where('calibration_assignments.calibration_id', calibrationId);
  return rows.map(toAssignment);
}

/**
 * The published calibration an organisation's estimates use for a crop and variety: the
 * assignment made for that variety (matched ignoring case and surrounding spaces) if there is one,
 * else the crop-wide assignment; undefined when neither exists. Only published versions count
 * (retiring refuses while a version is assigned, and this check keeps it so).
 * The field-walk estimate stores the returned `id` and `version` with its snapshot.
 */
export async function assignedCalibrationFor(
  db: Knex,
  organisationId: string,
  crop: string,
  variety?: string | null,
): Promise<(Calibration & { fit: Fit; model: ModelKind; version: number; assignedFor: { crop: string; variety: string | null } }) | undefined> {
  const wanted = nullToBlank(variety).toLowerCase();
  const rows = await inOrganisation(db, 'calibration_assignments', organisationId)
    .join('calibrations', 'calibrations.id', 'calibration_assignments.calibration_id')
    .where('calibration_assignments.crop', crop)
    .where('calibrations.status', 'published')
    .where((w) => {
      w.where('calibration_assignments.variety', '');
      if (wanted) w.orWhereRaw('lower(calibration_assignments.variety) = ?', [wanted]);
    })
    .select('calibration_assignments.variety', 'calibration_assignments.calibration_id');
  const pick = rows.find((r: { variety: string }) => r.variety !== '') ?? rows[0];
  if (!pick) return undefined;
  const calibration = await getCalibration(db, organisationId, pick.calibration_id);
  if (!calibration || !calibration.fit || !calibration.model || calibration.version == null) return undefined;
  return {
    ...calibration,
    fit: calibration.fit,
    model: calibration.model,
    version: calibration.version,
    assignedFor: { crop, variety: blankToNull(pick.variety) },
  };
}

/** Whether the crop list (the same for every organisation) has this code. */
export async function cropExists(db: Knex, code: string): Promise<boolean> {
  return Boolean(await db('crops').where('code', code).first('code'));
}
