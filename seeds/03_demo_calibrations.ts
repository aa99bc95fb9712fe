import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Knex } from 'knex';
import { fitCalibration, type ModelKind } from '../shared/calc';
import { checkCalibrationCsv } from '../server/calibrations/import';
import { PROJECT_ROOT } from '../server/platform/project-root';
import { DEMO_USERS, demoOrganisationId } from './demo-people';

/*
 * The demo calibrations: the estimation core's invented data sets (seeds/data, made by
 * scripts/make-demo-calibrations.ts) loaded as published version 1 for cereal rye and triticale,
 * set as the calibrations those crops' estimates use, and a small barley set as a draft. Labelled
 * as demo data everywhere they show. Fixed ids, so running the seed twice changes nothing.
 */

const DATA = join(PROJECT_ROOT, 'seeds', 'data'); // from the sources or the built server alike
export const DEMO_CALIBRATION_LABEL = 'Demo data — not for real credits';

interface DemoCalibration {
  key: string;
  file: string;
  crop: string;
  region: string;
  status: 'published' | 'draft';
  model: ModelKind;
  /** Organisations (index into DEMO_ORGANISATIONS) that get it. */
  orgs: number[];
}

const SETS: DemoCalibration[] = [
  { key: '1', file: 'demo-calibration-cereal-rye.csv', crop: 'cereal_rye', region: 'Demo valley', status: 'published', model: 'power', orgs: [0, 1] },
  { key: '2', file: 'demo-calibration-triticale.csv', crop: 'triticale', region: 'Demo valley', status: 'published', model: 'power', orgs: [0, 1] },
  { key: '3', file: 'demo-calibration-barley.csv', crop: 'barley', region: 'Demo valley', status: 'draft', model: 'power', orgs: [0] },
];

/** e.g. 0b7d3f7e-0000-4000-8ca1-000000000112: calibration (c) of set 1 for organisation 2. */
export const demoCalibrationId = (kind: 'd' | 'c', setKey: string, orgIndex: number) =>
  `0b7d3f7e-0000-4000-8ca1-${kind === 'd' ? 'd' : 'c'}000000001${setKey}${orgIndex + 1}`;

export async function seedDemoCalibrations(db: Knex): Promise<void> {
  const now = new Date().toISOString();
  for (const set of SETS) {
    const check = checkCalibrationCsv(readFileSync(join(DATA, set.file), 'utf8'));
    if (!check.ok) throw new Error(`demo calibration ${set.file} does not import: ${check.fileError ?? check.errors[0]?.message}`);
    const points = check.points;
    const fit = fitCalibration(points.map(({ x, y }) => ({ x, y })), set.model);
    for (const orgIndex of set.orgs) {
      const organisationId = demoOrganisationId(orgIndex);
      const admin = DEMO_USERS.find((u) => u.org === orgIndex && u.role === 'admin')!.id;
      const datasetId = demoCalibrationId('d', set.key, orgIndex);
      const calibrationId = demoCalibrationId('c', set.key, orgIndex);
      await db.transaction(async (trx) => {
        await trx('calibration_datasets')
          .insert({
            id: datasetId,
            organisation_id: organisationId,
            name: `Invented demo points (${set.file})`,
            file_name: set.file,
            length_unit: 'cm',
            biomass_unit: 'kg_ha',
            row_count: points.length,
            points: JSON.stringify(points),
            uploaded_by: admin,
            created_at: now,
          })
          .onConflict('id')
          .ignore();
        const published = set.status === 'published';
        await trx('calibrations')
          .insert({
            id: calibrationId,
            organisation_id: organisationId,
            dataset_id: datasetId,
            crop: set.crop,
            variety: '',
            region: set.region,
            status: set.status,
            version: published ? 1 : null,
            label: published ? DEMO_CALIBRATION_LABEL : null,
            model: set.model,
            fit: JSON.stringify(fit),
            n: fit.n,
            r_squared: fit.rSquared,
            residual_std_error: fit.residualStdError,
            loo_rmse: fit.looRmse,
            x_min: fit.xRange[0],
            x_max: fit.xRange[1],
            created_by: admin,
            created_at: now,
            updated_at: now,
            published_by: published ? admin : null,
            published_at: published ? now : null,
          })
          .onConflict('id')
          .ignore();
        if (published) {
          await trx('calibration_assignments')
            .insert({ organisation_id: organisationId, crop: set.crop, variety: '', calibration_id: calibrationId, assigned_by: admin, assigned_at: now })
            .onConflict(['organisation_id', 'crop', 'variety'])
            .ignore();
        }
      });
    }
  }
}
