import type { Knex } from 'knex';

// Background jobs (register builds, registry imports, the daily reminder) and sign-in/upload
// attempt counters, kept in the database so that every app server reads the same status,
// progress, results and counts (server/platform/jobs.ts, server/people/attempts-db.ts).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('jobs', (t) => {
    t.string('id', 36).primary();
    t.string('kind', 64).notNullable();
    // Null for jobs of the whole install (the daily reminder).
    t.string('organisation_id', 36).nullable().references('organisations.id').onDelete('CASCADE');
    // What the job is about (an import's upload id), to find its newest job.
    t.string('subject', 128).nullable();
    // At most one job holds a key: while it is queued or running, or for ever (see jobs.ts).
    t.string('singleton_key', 200).nullable().unique();
    t.boolean('keep_key').notNullable().defaultTo(false);
    t.string('state', 16).notNullable(); // queued | running | done | failed
    t.text('payload').notNullable();
    t.text('progress').nullable();
    t.text('result').nullable();
    t.text('error').nullable();
    t.integer('attempts').notNullable().defaultTo(0);
    t.integer('max_attempts').notNullable().defaultTo(1);
    t.string('created_by', 36).nullable();
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.timestamp('started_at', { useTz: true }).nullable();
    t.timestamp('finished_at', { useTz: true }).nullable();
    t.index(['organisation_id', 'kind', 'state']);
    t.index(['kind', 'subject']);
    t.index(['state', 'finished_at']);
  });
  // Files a job made (a register's CSV and PDF), served by whichever server is asked.
  await knex.schema.createTable('job_outputs', (t) => {
    t.string('job_id', 36).notNullable().references('jobs.id').onDelete('CASCADE');
    t.string('name', 32).notNullable();
    t.string('content_type', 100).notNullable();
    t.binary('data').notNullable();
    t.primary(['job_id', 'name']);
  });
  // Fixed-window counters: `count` hits until `window_ends_ms` (milliseconds since 1970).
  await knex.schema.createTable('attempt_counts', (t) => {
    t.string('key', 400).primary();
    t.integer('count').notNullable();
    t.bigInteger('window_ends_ms').notNullable();
    t.index(['window_ends_ms']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('attempt_counts');
  await knex.schema.dropTable('job_outputs');
  await knex.schema.dropTable('jobs');
}
