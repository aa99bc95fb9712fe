import type { Knex } from 'knex';
import * as m20261201090000 from './20261201090000_create_organisations_and_users';
import * as m20261201090100 from './20261201090100_create_sessions';
import * as m20261201090200 from './20261201090200_create_user_tokens';
import * as m20261201090300 from './20261201090300_create_mail_outbox';
import * as m20261201100000 from './20261201100000_create_registry';
import * as m20261201100100 from './20261201100100_fill_crop_list';
import * as m20261201110000 from './20261201110000_create_calibrations';
import * as m20261201130000 from './20261201130000_create_credit_rules';
import * as m20261201120000 from './20261201120000_create_field_walks';
import * as m20261201140000 from './20261201140000_create_registers';
import * as m20261201150000 from './20261201150000_create_job_runs';
import * as m20261202030000 from './20261202030000_organisation_scoped_links';
import * as m20261202040000 from './20261202040000_verdict_rule_fields_and_skipped_stops';
import * as m20261202043000 from './20261202043000_users_session_version';
import * as m20261202044500 from './20261202044500_register_signatures';
import * as m20261202045000 from './20261202045000_walk_tissue_nitrogen';
import * as m20261202045137 from './20261202045137_walk_own_review_waiver';
import * as m20261202055317 from './20261202055317_walk_plan_seed';
import * as m20261202061742 from './20261202061742_create_jobs_and_attempt_counts';
import * as m20261202062741 from './20261202062741_field_boundary_proposals';

interface Migration {
  up: (knex: Knex) => Promise<void>;
  down: (knex: Knex) => Promise<void>;
}

// Knex loads migrations with Node's own import, which cannot read .ts under vitest; listing them
// here keeps one order for the server, the tests and the CLI. Add each new migration at the end.
const migrations: Record<string, Migration> = {
  '20261201090000_create_organisations_and_users': m20261201090000,
  '20261201090100_create_sessions': m20261201090100,
  '20261201090200_create_user_tokens': m20261201090200,
  '20261201090300_create_mail_outbox': m20261201090300,
  '20261201100000_create_registry': m20261201100000,
  '20261201100100_fill_crop_list': m20261201100100,
  '20261201110000_create_calibrations': m20261201110000,
  '20261201130000_create_credit_rules': m20261201130000,
  '20261201120000_create_field_walks': m20261201120000,
  '20261201140000_create_registers': m20261201140000,
  '20261201150000_create_job_runs': m20261201150000,
  '20261202030000_organisation_scoped_links': m20261202030000,
  '20261202040000_verdict_rule_fields_and_skipped_stops': m20261202040000,
  '20261202043000_users_session_version': m20261202043000,
  '20261202044500_register_signatures': m20261202044500,
  '20261202045000_walk_tissue_nitrogen': m20261202045000,
  '20261202045137_walk_own_review_waiver': m20261202045137,
  '20261202055317_walk_plan_seed': m20261202055317,
  '20261202061742_create_jobs_and_attempt_counts': m20261202061742,
  '20261202062741_field_boundary_proposals': m20261202062741,
};

export const migrationSource: Knex.MigrationSource<string> = {
  // Sorted by timestamp, whatever order lines were added in.
  getMigrations: async () => Object.keys(migrations).sort(),
  getMigrationName: (name) => name,
  getMigration: async (name) => {
    const migration = migrations[name];
    if (!migration) throw new Error(`No migration named ${name} in migrations/index.ts`);
    return migration;
  },
};
