/*
 * PostgreSQL beside SQLite (part of `npm run bench`; alone: `npx tsx bench/postgres.ts`): the real
 * server (`npm start`, bench/server-process.ts) once on a fresh SQLite file and once with
 * DATABASE_URL on a new database of the PostgreSQL server named by BENCH_DATABASE_URL (or
 * TEST_DATABASE_URL), both seeded with the demo scenario by the server itself. Signed-in reads and
 * walk submissions at 50 connections, each engine in turn within the same rounds so that the load
 * on the machine weighs on both alike; the better of two rounds counts. Without either setting,
 * or when PostgreSQL does not answer, it prints one line saying why and measures nothing.
 */
import { pathToFileURL } from 'node:url';
import { CONNECTIONS, SECONDS, best, loadGet, loadWalks, signIn, type LoadResult, type WalkLoadResult } from './http';
import { at } from '../tests/helpers/lists';
import type { Row } from './report';
import { DEMO_PASSWORD, makeDataDir, startServer, type StartedServer } from './server-process';
import { createThrowawayDatabase, dropDatabase, postgresUnavailable } from '../tests/helpers/postgres';

const READS = ['/api/session', '/api/fields?limit=50'];
const ms = (n: number) => `${n.toFixed(0)} ms`;
const rps = (n: number) => `${Math.round(n).toLocaleString('en-US')} req/s`;

interface EngineResult {
  reads: LoadResult[];
  walks: WalkLoadResult;
}

/** Measures both engines; the table's rows (for information: the targets are SQLite's), or none when skipped. */
export async function runPostgresBench(): Promise<Row[]> {
  const adminUrl = process.env.BENCH_DATABASE_URL || process.env.TEST_DATABASE_URL;
  const why = await postgresUnavailable(adminUrl);
  if (why) {
    console.log(`\nPostgreSQL bench skipped: ${why === 'TEST_DATABASE_URL is not set' ? 'neither BENCH_DATABASE_URL nor TEST_DATABASE_URL is set' : why}.`);
    return [];
  }
  const sqliteData = makeDataDir();
  const pgData = makeDataDir();
  const database = await createThrowawayDatabase(adminUrl!, 'ct_bench');
  const servers: StartedServer[] = [];
  try {
    const sqlite = await startServer(sqliteData);
    servers.push(sqlite);
    const pg = await startServer(pgData, { DATABASE_URL: database.url });
    servers.push(pg);
    const engines = [
      { name: 'SQLite', server: sqlite },
      { name: 'PostgreSQL', server: pg },
    ];
    const sessions = await Promise.all(
      engines.map(async ({ server }) => {
        const clerk = await signIn(server.url, 'clerk@crowntip.test', DEMO_PASSWORD);
        const sampler = await signIn(server.url, 'sampler@crowntip.test', DEMO_PASSWORD);
        const today = (await (await fetch(`${server.url}/api/today`, { headers: { cookie: sampler.cookie } })).json()) as { items: { plantingId: string; calibrationId: string | null }[] };
        const planting = today.items.find((p) => p.calibrationId) ?? at(today.items, 0);
        return { clerk, sampler, plantingId: planting.plantingId };
      }),
    );
    const walkedOn = new Date().toISOString().slice(0, 10);
    const rounds: { reads: LoadResult[][]; walks: WalkLoadResult[] }[] = engines.map(() => ({ reads: READS.map(() => []), walks: [] }));
    for (let round = 0; round < 2; round++) {
      for (const [p, path] of READS.entries()) {
        for (const [e, { server }] of engines.entries()) at(at(rounds, e).reads, p).push(await loadGet(`${server.url}${path}`, { cookie: at(sessions, e).clerk.cookie }));
      }
      for (const [e, { server }] of engines.entries()) {
        const session = at(sessions, e);
        at(rounds, e).walks.push(await loadWalks(server.url, session.sampler, session.plantingId, walkedOn));
      }
    }
    const results: EngineResult[] = rounds.map((r) => ({
      reads: r.reads.map((x) => x.reduce(best)),
      walks: r.walks.reduce((a, b) => (b.p99PairMs < a.p99PairMs ? b : a)),
    }));

    console.log(`\nPostgreSQL beside SQLite, ${CONNECTIONS} connections, better of two ${SECONDS}-s rounds, taken in turn (PostgreSQL at ${new URL(adminUrl!).host})`);
    for (const [p, path] of READS.entries()) {
      for (const [e, { name }] of engines.entries()) {
        const r = at(at(results, e).reads, p);
        console.log(`  ${`GET ${path}`.padEnd(24)} ${name.padEnd(10)} ${rps(r.rps)} (rounds: ${at(at(rounds, e).reads, p).map((x) => Math.round(x.rps)).join(', ')}), p99 ${ms(r.p99)}`);
      }
    }
    for (const [e, { name }] of engines.entries()) {
      const w = at(results, e).walks;
      console.log(`  walks ${name.padEnd(10)} ${w.walks} walks (${w.walksPerSec.toFixed(0)}/s), create+submit p99 ${ms(w.p99PairMs)}, ${w.non2xx} non-2xx, ${w.duplicates} duplicates`);
    }

    const [lite, post] = [at(results, 0), at(results, 1)];
    const rows: Row[] = READS.map((path, p) => ({
      what: `PostgreSQL: GET ${path} (clerk), req/s`,
      measured: rps(at(post.reads, p).rps),
      target: `SQLite ${rps(at(lite.reads, p).rps)}`,
      ratio: `${((100 * at(post.reads, p).rps) / at(lite.reads, p).rps).toFixed(0)} %`,
      verdict: 'INFO',
    }));
    rows.push(
      {
        what: `PostgreSQL: walk create + submit, p99 at ${CONNECTIONS} conn.`,
        measured: ms(post.walks.p99PairMs),
        target: `SQLite ${ms(lite.walks.p99PairMs)}`,
        ratio: `${(post.walks.p99PairMs / lite.walks.p99PairMs).toFixed(2)}×`,
        verdict: 'INFO',
      },
      {
        what: 'PostgreSQL: duplicate walks after both rounds',
        measured: String(at(rounds, 1).walks.reduce((s, w) => s + w.duplicates, 0)),
        target: '0',
        ratio: '—',
        verdict: at(rounds, 1).walks.every((w) => w.duplicates === 0 && w.walks > 0) ? 'PASS' : 'FAIL',
      },
    );
    return rows;
  } catch (err) {
    console.error(`PostgreSQL bench stopped early: ${err instanceof Error ? err.message : String(err)}`);
    return [{ what: 'PostgreSQL beside SQLite', measured: 'stopped early', target: 'measured', ratio: '—', verdict: 'FAIL' }];
  } finally {
    for (const s of servers) await s.stop();
    await dropDatabase(adminUrl!, database.name).catch(() => {});
    sqliteData.remove();
    pgData.remove();
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const { printRows } = await import('./report');
  printRows('PostgreSQL beside SQLite', await runPostgresBench());
  process.exit(0);
}
