import type { Knex } from 'knex';
import bcrypt from 'bcryptjs';
import { DEMO_ORGANISATIONS, DEMO_USERS } from './demo-people';
import { seedDemoRegistry } from './02_demo_registry';
import { seedDemoCalibrations } from './03_demo_calibrations';
import { seedDemoRules } from './05_demo_rules';
import { seedDemoWalks } from './04_demo_walks';
import { seedDemoHistory } from './06_demo_history';

export interface SeedOptions {
  password: string;
  bcryptRounds: number;
  /** Also last season's approved walks (for `npm start`; tests build their own scenarios). */
  history?: boolean;
}

/**
 * Loads the invented demo scenario. Safe to run twice: rows have fixed ids and existing ones are
 * left as they are.
 */
export async function seedDemoScenario(db: Knex, opts: SeedOptions): Promise<void> {
  const now = new Date().toISOString();
  const hash = await bcrypt.hash(opts.password, opts.bcryptRounds);
  await db.transaction(async (trx) => {
    await trx('organisations')
      .insert(DEMO_ORGANISATIONS.map((o) => ({ id: o.id, name: o.name, created_at: now })))
      .onConflict('id')
      .ignore();
    await trx('users')
      .insert(
        DEMO_USERS.map((u) => ({
          id: u.id,
          organisation_id: DEMO_ORGANISATIONS[u.org].id,
          name: u.name,
          email: u.email,
          password_hash: hash,
          role: u.role,
          active: true,
          units: 'us',
          language: 'language' in u ? u.language : 'en',
          created_at: now,
          updated_at: now,
        })),
      )
      .onConflict('id')
      .ignore();
  });
  await seedDemoRegistry(db);
  await seedDemoRules(db);
  await seedDemoCalibrations(db);
  await seedDemoWalks(db);
  if (opts.history) await seedDemoHistory(db);
}
