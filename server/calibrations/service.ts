import type { Knex } from 'knex';
import { CalcError, MODELS, compareModels, fitCalibration, type Fit, type ModelKind } from '../../shared/calc';
import { HttpError } from '../platform/errors';
import * as cal from './db';
import type { BiomassUnit, Calibration, DatasetPoint, LengthUnit } from './db';
import { inTransaction } from '../platform/database';

/*
 * The rules of calibrations that span tables: a draft is made from a data set; publishing fixes
 * its model, fit, version number and name for good (a published version is never changed:
 * corrections are a new version); retiring keeps it readable; an assignment says which published
 * version an organisation's estimates use for a crop or one variety of it.
 */

export interface Actor {
  id: string;
  organisationId: string;
}

const invalid = (field: string, message: string) => new HttpError('invalid', message, { [field]: message });

export const IMMUTABLE_MESSAGE = 'A published calibration never changes. To correct it, start a new draft and publish it as a new version.';

/** Maps the estimation core's CalcError to a 400 with the form field it concerns. */
export function calcErrorToHttp(e: unknown, field = 'points'): never {
  if (e instanceof CalcError) {
    const f = e.field === 'model' ? 'model' : field;
    throw new HttpError('invalid', e.message, { [f]: e.message });
  }
  throw e;
}

async function requireCrop(db: Knex, crop: string): Promise<void> {
  if (!(await cal.cropExists(db, crop))) throw invalid('crop', 'Choose a crop from the crop list.');
}

const xRangeOf = (points: { x: number }[]): [number, number] =>
  points.reduce<[number, number]>(([lo, hi], p) => [Math.min(lo, p.x), Math.max(hi, p.x)], [Infinity, -Infinity]);

/** The model a new draft starts with: the comparison's recommendation, else the best that fitted. */
function startingFit(points: DatasetPoint[]): { model: ModelKind | null; fit: Fit | null } {
  let comparison;
  try {
    comparison = compareModels(points.map(({ x, y }) => ({ x, y })));
  } catch (e) {
    calcErrorToHttp(e);
  }
  const model = comparison.recommendation.model ?? comparison.ranked[0]?.model ?? null;
  const fit = comparison.ranked.find((r) => r.model === model)?.fit ?? null;
  return { model, fit };
}

export interface DraftInput {
  crop: string;
  variety?: string | null;
  region?: string | null;
  name: string;
  fileName?: string | null;
  lengthUnit: LengthUnit;
  biomassUnit: BiomassUnit;
  points: DatasetPoint[];
}

/** A data set and its draft calibration, in one transaction. */
export async function createDraft(db: Knex, actor: Actor, input: DraftInput, ids: { datasetId?: string; calibrationId?: string } = {}): Promise<Calibration> {
  await requireCrop(db, input.crop);
  if (!input.points.length) throw invalid('points', 'There are no points.');
  const { model, fit } = startingFit(input.points);
  const id = await inTransaction(db, async (trx) => {
    const datasetId = await cal.insertDataset(trx, actor.organisationId, { ...input, uploadedBy: actor.id }, ids.datasetId);
    return cal.insertCalibration(
      trx,
      actor.organisationId,
      { datasetId, crop: input.crop, variety: input.variety, region: input.region, model, fit, n: input.points.length, xRange: xRangeOf(input.points), createdBy: actor.id },
      ids.calibrationId,
    );
  });
  return (await cal.getCalibration(db, actor.organisationId, id))!;
}

export async function loadCalibration(db: Knex, organisationId: string, id: string, opts: { drafts: boolean }): Promise<Calibration> {
  const c = await cal.getCalibration(db, organisationId, id);
  // A draft is the administrators' work in progress: for everyone else it does not exist.
  if (!c || (c.status === 'draft' && !opts.drafts)) throw new HttpError('not_found');
  return c;
}

async function pointsOf(db: Knex, organisationId: string, c: Calibration): Promise<DatasetPoint[]> {
  const dataset = await cal.getDataset(db, organisationId, c.datasetId);
  if (!dataset) throw new HttpError('not_found');
  return dataset.points;
}

function refit(points: DatasetPoint[], model: ModelKind): Fit {
  try {
    return fitCalibration(points.map(({ x, y }) => ({ x, y })), model);
  } catch (e) {
    return calcErrorToHttp(e, 'model');
  }
}

export interface DraftChanges {
  variety?: string | null;
  region?: string | null;
  label?: string | null;
  model?: ModelKind;
}

/** Changes a draft's description or model; 409 for a published or retired one. */
export async function changeDraft(db: Knex, actor: Actor, id: string, changes: DraftChanges): Promise<Calibration> {
  const c = await loadCalibration(db, actor.organisationId, id, { drafts: true });
  if (c.status !== 'draft') throw new HttpError('conflict', IMMUTABLE_MESSAGE);
  const patch: cal.DraftPatch = { variety: changes.variety, region: changes.region, label: changes.label };
  if (changes.model) {
    patch.model = changes.model;
    patch.fit = refit(await pointsOf(db, actor.organisationId, c), changes.model);
  }
  if (!(await cal.updateDraft(db, actor.organisationId, id, patch))) throw new HttpError('conflict', IMMUTABLE_MESSAGE);
  return (await cal.getCalibration(db, actor.organisationId, id))!;
}

export async function deleteDraft(db: Knex, actor: Actor, id: string): Promise<void> {
  const c = await loadCalibration(db, actor.organisationId, id, { drafts: true });
  if (c.status !== 'draft') throw new HttpError('conflict', 'Only a draft can be deleted; a published calibration can be retired.');
  if (!(await cal.deleteDraft(db, actor.organisationId, id))) throw new HttpError('conflict', IMMUTABLE_MESSAGE);
}

export interface PublishInput {
  model: ModelKind;
  label: string;
  /** Also make it the calibration the organisation's estimates use for its crop (and variety). */
  assign?: boolean;
}

/** draft → published version N (N = 1 + the highest for its crop, variety and region). */
export async function publish(db: Knex, actor: Actor, id: string, input: PublishInput): Promise<Calibration> {
  const c = await loadCalibration(db, actor.organisationId, id, { drafts: true });
  if (c.status !== 'draft') throw new HttpError('conflict', IMMUTABLE_MESSAGE);
  if (!MODELS.includes(input.model)) throw invalid('model', 'Choose one of the four models.');
  const fit = refit(await pointsOf(db, actor.organisationId, c), input.model);
  try {
    await inTransaction(db, async (trx) => {
      const version = await cal.nextVersion(trx, actor.organisationId, c);
      const done = await cal.markPublished(trx, actor.organisationId, id, { model: input.model, fit, version, label: input.label, publishedBy: actor.id });
      if (!done) throw new HttpError('conflict', IMMUTABLE_MESSAGE);
      if (input.assign) await cal.setAssignment(trx, actor.organisationId, { crop: c.crop, variety: c.variety, calibrationId: id, assignedBy: actor.id });
    });
  } catch (e) {
    if (e instanceof HttpError) throw e;
    // Two administrators publishing the same crop at once: the unique version key stops the second.
    if (/unique|duplicate/i.test(String((e as Error)?.message))) throw new HttpError('conflict', 'Another version was published at the same moment; reload and try again.');
    throw e;
  }
  return (await cal.getCalibration(db, actor.organisationId, id))!;
}

/** published → retired. Refused while estimates are set to use it: assign another version first. */
export async function retire(db: Knex, actor: Actor, id: string): Promise<Calibration> {
  const c = await loadCalibration(db, actor.organisationId, id, { drafts: true });
  if (c.status !== 'published') {
    throw new HttpError('conflict', c.status === 'retired' ? 'This calibration is already retired.' : 'A draft is not published, so it cannot be retired; delete it instead.');
  }
  const uses = await cal.assignmentsOf(db, actor.organisationId, id);
  if (uses.length) {
    const what = uses.map((a) => (a.variety ? `${a.cropLabel} ${a.variety}` : a.cropLabel)).join(', ');
    throw new HttpError('conflict', `Estimates for ${what} use this version. Choose another calibration for ${uses.length === 1 ? 'it' : 'them'} first, then retire this one.`);
  }
  if (!(await cal.markRetired(db, actor.organisationId, id, actor.id))) throw new HttpError('conflict', 'This calibration is no longer published.');
  return (await cal.getCalibration(db, actor.organisationId, id))!;
}

/** A new draft from a published or retired version's points: the way to correct a version. */
export async function draftFrom(db: Knex, actor: Actor, id: string): Promise<Calibration> {
  const c = await loadCalibration(db, actor.organisationId, id, { drafts: true });
  const newId = await cal.insertCalibration(db, actor.organisationId, {
    datasetId: c.datasetId,
    crop: c.crop,
    variety: c.variety,
    region: c.region,
    model: c.model,
    fit: c.fit,
    n: c.n,
    xRange: c.xRange,
    createdBy: actor.id,
  });
  return (await cal.getCalibration(db, actor.organisationId, newId))!;
}

/** Sets which published calibration estimates use for a crop (variety null) or one variety. */
export async function assign(db: Knex, actor: Actor, input: { crop: string; variety?: string | null; calibrationId: string }): Promise<cal.Assignment> {
  await requireCrop(db, input.crop);
  const c = await cal.getCalibration(db, actor.organisationId, input.calibrationId);
  if (!c || c.status !== 'published') throw invalid('calibrationId', 'Choose a published calibration.');
  if (c.crop !== input.crop) throw invalid('calibrationId', `That calibration is for ${c.cropLabel}; choose one for the same crop.`);
  return cal.setAssignment(db, actor.organisationId, { crop: input.crop, variety: input.variety?.trim() || null, calibrationId: c.id, assignedBy: actor.id });
}

export async function unassign(db: Knex, actor: Actor, crop: string, variety: string | null): Promise<void> {
  if (!(await cal.removeAssignment(db, actor.organisationId, crop, variety?.trim() || null))) throw new HttpError('not_found');
}

/** A calibration as the JSON API answers it (README, "API", plus the fit, for offline estimates). */
export function calibrationJson(c: Calibration) {
  return {
    id: c.id,
    crop: c.crop,
    cropLabel: c.cropLabel,
    variety: c.variety,
    region: c.region,
    status: c.status,
    version: c.version,
    label: c.label,
    model: c.model,
    coefficients: c.fit?.coefficients ?? null,
    standardErrors: c.fit?.standardErrors ?? null,
    equation: c.fit?.equation ?? null,
    n: c.n,
    rSquared: c.rSquared,
    residualStdError: c.residualStdError,
    looRmse: c.looRmse,
    xRange: c.xRange,
    fit: c.fit,
    assigned: c.assigned,
    datasetId: c.datasetId,
    createdAt: c.createdAt,
    createdBy: c.createdByName,
    publishedAt: c.publishedAt,
    publishedBy: c.publishedByName,
    retiredAt: c.retiredAt,
    retiredBy: c.retiredByName,
  };
}

export function assignmentJson(a: cal.Assignment) {
  return { crop: a.crop, variety: a.variety, calibrationId: a.calibrationId, version: a.version, label: a.label, assignedAt: a.assignedAt, assignedBy: a.assignedByName };
}
// Single-query reads and writes the routes and pages use as they are (SQL stays in the db modules).
export { assignmentsOf, deleteUpload, getDataset, getUpload, insertUpload, listAssignments, listCalibrations, BIOMASS_UNITS, LENGTH_UNITS, type Calibration, type CalibrationStatus, type DatasetPoint, type Upload } from './db';
