import type { Knex } from 'knex';

// When each daily job last ran. The primary key makes "run once per day" hold even with several
// app servers on one database: only the server whose insert succeeds runs the job.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('job_runs', (t) => {
    t.string('job', 50).notNullable();
    t.date('run_on').notNullable();
    t.timestamp('started_at', { useTz: true }).notNullable();
    t.timestamp('finished_at', { useTz: true }).nullable();
    t.text('summary').nullable();
    t.primary(['job', 'run_on']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('job_runs');
}
