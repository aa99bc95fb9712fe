import { defineConfig } from 'vitest/config';
import pg from 'pg';

const serverTests = ['tests/server/**/*.test.ts'];

/**
 * The API, service and db suites run a second time on PostgreSQL when TEST_DATABASE_URL names a
 * server that answers; otherwise that project is left out with one line saying why.
 */
async function postgresUnavailable(url: string | undefined): Promise<string | null> {
  if (!url) return 'TEST_DATABASE_URL is not set';
  const client = new pg.Client({ connectionString: url, connectionTimeoutMillis: 3000 });
  try {
    await client.connect();
    await client.query('select 1');
    return null;
  } catch (err) {
    return `PostgreSQL at ${new URL(url).host} does not answer (${err instanceof Error ? err.message || err.name : String(err)})`;
  } finally {
    await client.end().catch(() => {});
  }
}

async function postgresProject() {
  const why = await postgresUnavailable(process.env.TEST_DATABASE_URL);
  // Quiet when only other projects were asked for (`--project unit`).
  const asked = process.argv.flatMap((a, i) => (a === '--project' ? [process.argv[i + 1]] : a.startsWith('--project=') ? [a.slice(10)] : []));
  const filtered = asked.length > 0 && !asked.includes('postgres');
  if (why) {
    if (!filtered) console.log(`PostgreSQL tests skipped: ${why}.`);
    return [];
  }
  return [
    {
      test: {
        name: 'postgres',
        include: [...serverTests, 'tests/postgres/**/*.test.ts'],
        // The prepared-statement reads open an SQLite file; they have no PostgreSQL counterpart.
        exclude: ['tests/server/platform/fast-reads.test.ts'],
        environment: 'node',
        globalSetup: ['tests/postgres/global-setup.ts'],
        testTimeout: 30_000,
        hookTimeout: 60_000,
      },
    },
  ];
}

// Kept apart from vite.config.ts, whose root is client/ (see ../shared/STACK.md, gotcha 10).
export default defineConfig(async () => ({
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          include: ['tests/shared/**/*.test.ts', ...serverTests, 'tests/client/**/*.test.{ts,tsx}'],
          environment: 'node',
          testTimeout: 20_000,
        },
      },
      {
        test: {
          name: 'browser',
          include: ['tests/browser/**/*.test.ts'],
          environment: 'node',
          testTimeout: 90_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
      ...(await postgresProject()),
    ],
  },
}));
