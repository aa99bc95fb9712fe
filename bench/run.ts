/*
 * `npm run bench`: every speed target, measured in one run on this machine, printed as one table
 * (a report: it always exits 0 once it has measured). The server is started as users start it
 * (`npm start`, production defaults: bench/server-process.ts) on a fresh database with the demo
 * scenario; throughput is compared side by side with a bare Express JSON route in its own process,
 * 50 connections, the better of two rounds of BENCH_HTTP_SECONDS (5) seconds each.
 * Needs the client built (`npm run build`; built here when missing). Takes about two and a half minutes.
 * The estimation core's micro-benchmarks run apart: `npx tsx bench/calc.ts`.
 */
import fs from 'node:fs';
import path from 'node:path';
import { FIRST_SCREEN_JS_BUDGET, runCaptureBench } from './capture-size';
import { printFirstLoad, runFirstLoad, type FirstLoadResult } from './first-load';
import { best, CONNECTIONS, loadGet, loadWalks, SECONDS, signIn, startBare, type LoadResult, type WalkLoadResult } from './http';
import { REGISTER_CLERK, REGISTER_FIELDS, addLargeRegister, timeRegisterBuild, type RegisterBuildResult } from './register-build';
import { at } from '../tests/helpers/lists';
import { atMost, printRows, shareOfBare, type Row } from './report';
import { DEMO_PASSWORD, makeDataDir, startServer } from './server-process';
import { runPostgresBench } from './postgres';

const CLERK = 'clerk@crowntip.test';
const SAMPLER = 'sampler@crowntip.test';
const READS = [
  { path: '/api/session', minPct: 50 },
  { path: '/api/fields?limit=50', minPct: 35 },
  { path: '/api/ranches?limit=10', minPct: 35 },
];

/** `node … server/main.ts` as "server/main.ts via tsx": the script the server process runs. */
function describeCommand(command: string) {
  const args = command.split(' ');
  const script = args.reverse().find((a) => /\.[cm]?[jt]sx?$/.test(a) && !a.includes('node_modules')) ?? args[0] ?? command;
  return `${path.relative(process.cwd(), script) || script}${/\btsx\b/.test(command) ? ' via tsx' : ''}`;
}

const ms = (n: number) => `${n.toFixed(0)} ms`;
const sec = (n: number) => `${(n / 1000).toFixed(2)} s`;
const kib = (n: number) => `${(n / 1024).toFixed(1)} KiB`;
const mb = (n: number) => `${(n / 1024 / 1024).toFixed(0)} MiB`;

const capture = await runCaptureBench();
const data = makeDataDir();
const quietData = makeDataDir();
const rows: Row[] = [];
let firstLoad: FirstLoadResult | null = null;
try {
  // 1. A first start seeds the demo into the new database; the timed start finds it ready.
  const seeding = await startServer(data);
  await seeding.stop();
  addLargeRegister(path.join(data.dir, 'crowntip.sqlite')); // 5,000 fields in the second organisation
  const server = await startServer(data);
  await new Promise((r) => setTimeout(r, 1500)); // settle: the idle footprint, not the start's peak
  const idle = server.listener();

  // 2. What the server sends a browser: encodings of a built file and of a JSON answer above 1 KB.
  const manifest = JSON.parse(fs.readFileSync(path.resolve('client/dist/.vite/manifest.json'), 'utf8')) as Record<string, { file: string }>;
  const entry = manifest['index.html'];
  if (!entry) throw new Error('client/dist/.vite/manifest.json has no index.html: rebuild the client');
  const asset = await fetch(`${server.url}/static/${entry.file}`, { headers: { 'accept-encoding': 'gzip, deflate, br' } });
  await asset.arrayBuffer();
  const assetEncoding = asset.headers.get('content-encoding') ?? 'none';
  const assetVary = /accept-encoding/i.test(asset.headers.get('vary') ?? '');
  const sampler = await signIn(server.url, SAMPLER, DEMO_PASSWORD);
  const todayRes = await fetch(`${server.url}/api/today`, { headers: { cookie: sampler.cookie, 'accept-encoding': 'gzip, deflate, br' } });
  const today = (await todayRes.json()) as { items: { plantingId: string; calibrationId: string | null }[] };
  const jsonEncoding = todayRes.headers.get('content-encoding') ?? 'none';

  // 3. A sampler's first visit in a slowed-down phone browser (before any load changes the data).
  firstLoad = await runFirstLoad({ url: server.url, email: SAMPLER, password: DEMO_PASSWORD });

  // 4. Signed-in reads against bare Express, side by side: two rounds, the better one counts. A
  // second server with request logging off (LOG_LEVEL=warn, its own database) takes its turn in
  // the same rounds: the difference is what logging costs.
  const bare = await startBare();
  const quiet = await startServer(quietData, { LOG_LEVEL: 'warn' });
  const clerk = await signIn(server.url, CLERK, DEMO_PASSWORD);
  const quietClerk = await signIn(quiet.url, CLERK, DEMO_PASSWORD);
  const bareRounds: LoadResult[] = [];
  const readRounds: LoadResult[][] = READS.map(() => []);
  const quietRounds: LoadResult[] = [];
  for (let round = 0; round < 2; round++) {
    bareRounds.push(await loadGet(`${bare.url}/ping`));
    for (const [i, r] of READS.entries()) {
      at(readRounds, i).push(await loadGet(`${server.url}${r.path}`, { cookie: clerk.cookie }));
      if (i === 0) quietRounds.push(await loadGet(`${quiet.url}${r.path}`, { cookie: quietClerk.cookie }));
    }
  }
  await quiet.stop();
  bare.stop();
  const bareBest = bareRounds.reduce(best);
  const readBest = readRounds.map((rounds) => rounds.reduce(best));
  const quietBest = quietRounds.reduce(best);

  // 5. Walk submissions at 50 connections (the sampler, one planting with a calibration).
  const planting = today.items.find((p) => p.calibrationId) ?? at(today.items, 0);
  const walkedOn = new Date().toISOString().slice(0, 10);
  const walkRounds: WalkLoadResult[] = [];
  for (let round = 0; round < 2; round++) walkRounds.push(await loadWalks(server.url, sampler, planting.plantingId, walkedOn));
  const walkBest = walkRounds.reduce((a, b) => (b.p99PairMs < a.p99PairMs ? b : a));
  const duplicates = walkRounds.reduce((s, r) => s + r.duplicates, 0);

  // 6. The second organisation's register of 5,000 fields, built while the first one's office reads.
  let register: RegisterBuildResult | null = null;
  try {
    register = await timeRegisterBuild(server.url, await signIn(server.url, REGISTER_CLERK, DEMO_PASSWORD), clerk, '/api/ranches?limit=10');
  } catch (err) {
    console.error(`register build: ${err instanceof Error ? err.message : String(err)}`);
  }

  // 7. The request log as written under the default level.
  const requestLines = server
    .log()
    .split('\n')
    .filter((l) => l.startsWith('{') && /"(req|method|url)"/.test(l));
  const leaky = requestLines.filter((l) => /"(cookie|headers|set-cookie)"/i.test(l)).length;
  const lineBytes = requestLines.length ? requestLines.reduce((s, l) => s + Buffer.byteLength(l), 0) / requestLines.length : 0;
  await server.stop();

  console.log(`\nHTTP, ${CONNECTIONS} connections, better of two ${SECONDS}-s rounds, loopback, each server in its own process`);
  console.log(`  bare Express /ping              ${Math.round(bareBest.rps)} req/s (rounds: ${bareRounds.map((r) => Math.round(r.rps)).join(', ')}), p99 ${ms(bareBest.p99)}`);
  for (const [i, r] of READS.entries()) {
    console.log(`  ${`GET ${r.path}`.padEnd(32)} ${Math.round(at(readBest, i).rps)} req/s (rounds: ${at(readRounds, i).map((x) => Math.round(x.rps)).join(', ')}), p99 ${ms(at(readBest, i).p99)}`);
  }
  console.log(`  GET /api/session, LOG_LEVEL=warn ${Math.round(quietBest.rps)} req/s (rounds: ${quietRounds.map((x) => Math.round(x.rps)).join(', ')}), p99 ${ms(quietBest.p99)}`);
  for (const [i, w] of walkRounds.entries()) {
    console.log(
      `  walks round ${i + 1}: ${w.walks} walks (${w.walksPerSec.toFixed(0)}/s), create+submit p99 ${ms(w.p99PairMs)}, per request p99 ${ms(w.p99RequestMs)}, ${w.non2xx} non-2xx, ${w.retried} sent twice at once, ${w.duplicates} duplicates`,
    );
  }
  if (register) {
    console.log(
      `  register of ${REGISTER_FIELDS} fields: ${register.phase} in ${sec(register.ms)}, ${register.rows ?? '?'} rows, ${register.progressSteps} distinct progress states; reads meanwhile ${Math.round(register.readRps)} req/s, p99 ${ms(register.readP99)}`,
    );
  }
  console.log(`  request log: ${requestLines.length} lines, ${lineBytes.toFixed(0)} bytes each on average, ${leaky} with headers or cookies`);
  printFirstLoad(firstLoad, server.url);

  // The table, in the order of the targets.
  const pctSession = (100 * at(readBest, 0).rps) / bareBest.rps;
  const pctQuiet = (100 * quietBest.rps) / bareBest.rps;
  const loggingPoints = pctQuiet - pctSession;
  rows.push(
    atMost('First /capture visit, bytes on the wire (sampler, slow mobile)', firstLoad.totalBytes, 160 * 1024, kib),
    atMost('First /capture visit, LCP (slow mobile, CPU x4)', firstLoad.lcpMs, 2500, sec),
    {
      what: 'Built JS: brotli when accepted, with Vary: Accept-Encoding',
      measured: `${assetEncoding}${assetVary ? ', Vary' : ', no Vary'}`,
      target: 'br + Vary',
      ratio: '—',
      verdict: assetEncoding === 'br' && assetVary ? 'PASS' : 'FAIL',
    },
    {
      what: 'JSON above 1 KB compressed (GET /api/today)',
      measured: jsonEncoding,
      target: 'br or gzip',
      ratio: '—',
      verdict: /^(br|gzip)$/.test(jsonEncoding) ? 'PASS' : 'FAIL',
    },
  );
  for (const [i, r] of READS.entries()) {
    rows.push(shareOfBare(`GET ${r.path} (clerk), req/s`, at(readBest, i).rps, bareBest.rps, r.minPct));
    rows.push(atMost(`GET ${r.path}, p99 at ${CONNECTIONS} connections`, at(readBest, i).p99, 100, ms));
  }
  rows.push(
    {
      what: 'Request logging cost (session: LOG_LEVEL=warn vs default)',
      measured: `${loggingPoints.toFixed(1)} points`,
      target: '≤ 5 points',
      ratio: `${(loggingPoints / 5).toFixed(2)}×`,
      verdict: loggingPoints <= 5 ? 'PASS' : 'FAIL',
    },
    {
      what: 'Request log lines without headers or cookies',
      measured: `${leaky} of ${requestLines.length} leak; ${lineBytes.toFixed(0)} B/line`,
      target: '0 leak',
      ratio: '—',
      verdict: leaky === 0 && requestLines.length > 0 ? 'PASS' : 'FAIL',
    },
    atMost(`10-plant walk create + submit, p99 at ${CONNECTIONS} connections`, walkBest.p99PairMs, 100, ms),
    {
      what: 'Duplicate walks after both rounds (some sent twice at once)',
      measured: String(duplicates),
      target: '0',
      ratio: '—',
      verdict: duplicates === 0 && walkRounds.every((w) => w.walks > 0) ? 'PASS' : 'FAIL',
    },
    atMost('/capture first screen JS, gzipped (client/dist)', capture.js, FIRST_SCREEN_JS_BUDGET, (n) => `${(n / 1000).toFixed(1)} KB`),
    atMost('Live estimate per keystroke (Chromium, CPU x4)', firstLoad.keystrokeMs, 1, (n) => `${n.toFixed(3)} ms`),
    {
      what: 'Server runs compiled JavaScript',
      measured: idle ? describeCommand(idle.command) : 'not found',
      target: 'no .ts, no tsx',
      ratio: '—',
      verdict: idle && !/\btsx\b|\.ts\b/.test(idle.command) ? 'PASS' : 'FAIL',
    },
    atMost('npm start to first response (built, database ready)', server.startMs, 3000, sec),
    { what: 'Idle server memory (RSS of the listening process)', measured: idle ? mb(idle.rss) : 'not found', target: 'reported', ratio: '—', verdict: 'INFO' },
    register && register.phase === 'done'
      ? (() => {
          const row = atMost('5,000-field register (CSV + PDF), with progress', register.ms, 5000, sec);
          return { ...row, measured: `${row.measured}, ${register.progressSteps} progress states` };
        })()
      : { what: '5,000-field register (CSV + PDF), with progress', measured: register ? register.phase : 'did not run', target: '≤ 5.00 s', ratio: '—', verdict: 'FAIL' },
    atMost('Signed-in read p99 during that register build (5 conn.)', register?.readP99 ?? null, 200, ms),
  );
} catch (err) {
  console.error(`\nThe bench stopped early: ${err instanceof Error ? err.stack ?? err.message : String(err)}`);
} finally {
  data.remove();
  quietData.remove();
}
rows.push(...(await runPostgresBench())); // PostgreSQL beside SQLite, when a PostgreSQL server is named
printRows(`Speed targets (${new Date().toISOString().slice(0, 16)}Z, ${process.platform} ${process.arch}, node ${process.version})`, rows);
process.exit(0);
