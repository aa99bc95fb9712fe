/**
 * Where a route's time goes: starts the server as `npm run bench` does (bench/server-process.ts,
 * production defaults, the demo scenario) with V8's CPU profiler on, loads one signed-in route at
 * 50 connections with the profiler on for that window only (bench/cpu-profile-preload.cjs), and
 * prints the costliest packages and functions (self time). Profiles are written outside the repository:
 *   npx tsx bench/profile.ts [out-dir=/tmp/crowntip-profiles] [path …]
 * PROFILE=0 measures without profiling (requests per second and CPU milliseconds per request).
 * Open a .cpuprofile in Chromium's DevTools (Performance tab) for the call tree.
 */
import fs from 'node:fs';
import path from 'node:path';
import autocannon from 'autocannon';
import { CONNECTIONS, SECONDS, signIn, startBare } from './http';
import { DEMO_PASSWORD, makeDataDir, startServer } from './server-process';

const [outArg, ...pathArgs] = process.argv.slice(2);
const OUT = path.resolve(outArg ?? '/tmp/crowntip-profiles');
const PATHS = pathArgs.length ? pathArgs : ['/api/session', '/api/fields?limit=50', '/api/ranches?limit=10'];
const CLERK = 'clerk@crowntip.test';
const PRELOAD = path.resolve('bench/cpu-profile-preload.cjs');

interface ProfileNode {
  id: number;
  callFrame: { functionName: string; url: string; lineNumber: number };
}
interface CpuProfile {
  nodes: ProfileNode[];
  samples: number[];
}

/** Where a function lives: a package, a project folder, Node itself, or V8's own entries. */
function area(url: string, name: string): string {
  if (!url) return name.startsWith('(') ? name : '(native)';
  const pkg = /node_modules\/((?:@[^/]+\/)?[^/]+)/.exec(url);
  if (pkg?.[1]) return pkg[1];
  if (url.startsWith('node:')) return 'node';
  const own = /\/(server|shared|migrations|seeds)\/(.*?)(?:\/[^/]+)?$/.exec(url);
  return own ? `${own[1]}/${own[2]?.split('/')[0]}` : url;
}

/** Self time of each function and each area. */
function summarise(profile: CpuProfile) {
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const fns = new Map<string, number>();
  const areas = new Map<string, number>();
  let total = 0;
  for (const sample of profile.samples) {
    const { functionName, url, lineNumber } = byId.get(sample)!.callFrame;
    if (functionName === '(idle)') continue;
    total++;
    const where = area(url, functionName);
    const key = `${functionName || '(anonymous)'} ${url ? `${url.replace(/^.*node_modules\//, '').replace(/^file:\/\/.*?\/(server|shared)\//, '$1/')}:${lineNumber + 1}` : ''}`;
    fns.set(key, (fns.get(key) ?? 0) + 1);
    areas.set(where, (areas.get(where) ?? 0) + 1);
  }
  const top = (m: Map<string, number>, n: number) =>
    [...m.entries()].sort((a, b) => b[1] - a[1]).slice(0, n).map(([k, v]) => `${((100 * v) / total).toFixed(1).padStart(5)} %  ${k}`);
  return { total, areas: top(areas, 14), functions: top(fns, 20) };
}

/** CPU time (user + system, ms) a process has used so far (Linux /proc; 100 ticks a second). */
function cpuMs(pid: number): number {
  const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
  const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  return (Number(fields[11]) + Number(fields[12])) * 10;
}

/**
 * One unprofiled round: requests per second and the server's CPU milliseconds per request. On a
 * machine shared with other work, CPU per request is the steadier measure (throughput follows the
 * share of the cores the server gets).
 */
async function measure(url: string, pid: number, headers: Record<string, string>) {
  const before = cpuMs(pid);
  const r = await autocannon({ url, connections: CONNECTIONS, duration: SECONDS, headers });
  return { rps: r.requests.average, p99: r.latency.p99, cpuPerReq: (cpuMs(pid) - before) / r.requests.total, non2xx: r.non2xx };
}

const describe = (m: Awaited<ReturnType<typeof measure>>) =>
  `${Math.round(m.rps)} req/s, p99 ${m.p99} ms, ${m.cpuPerReq.toFixed(3)} CPU ms per request, ${m.non2xx} non-2xx`;

/** Profiles `url` on the process `pid` for one round and prints where its time went. */
async function profileRound(dir: string, pid: number, url: string, headers: Record<string, string>) {
  process.kill(pid, 'SIGUSR2'); // profiler on
  const r = await autocannon({ url, connections: CONNECTIONS, duration: SECONDS, headers });
  process.kill(pid, 'SIGUSR2'); // profiler off: the profile is written
  const file = path.join(dir, `${pid}.cpuprofile`);
  for (let i = 0; i < 100 && !fs.existsSync(file); i++) await new Promise((res) => setTimeout(res, 100));
  if (!fs.existsSync(file)) return console.log(`  no profile of the listening process (pid ${pid}) in ${dir}`);
  const s = summarise(JSON.parse(fs.readFileSync(file, 'utf8')) as CpuProfile);
  console.log(`  profile ${file}: ${s.total} busy samples of 0.2 ms, ${((s.total * 0.2) / r.requests.total).toFixed(3)} ms per request`);
  console.log('  by area (self time):');
  for (const l of s.areas) console.log(`    ${l}`);
  console.log('  by function (self time):');
  for (const l of s.functions) console.log(`    ${l}`);
}

const profiling = process.env.PROFILE !== '0';
const bareDir = path.join(OUT, 'bare-express');
fs.mkdirSync(bareDir, { recursive: true });
const bare = await startBare({ NODE_OPTIONS: `--require ${PRELOAD}`, CPU_PROFILE_DIR: bareDir });
const bareM = await measure(`${bare.url}/ping`, bare.pid, {});
console.log(`bare Express /ping: ${describe(bareM)}`);
if (profiling) await profileRound(bareDir, bare.pid, `${bare.url}/ping`, {});
bare.stop();

const data = makeDataDir();
try {
  const seeding = await startServer(data);
  await seeding.stop();
  for (const route of PATHS) {
    const dir = path.join(OUT, route.replace(/^\//, '').replace(/[^a-z0-9]+/gi, '-'));
    fs.rmSync(dir, { recursive: true, force: true });
    fs.mkdirSync(dir, { recursive: true });
    const server = await startServer(data, { NODE_OPTIONS: `--require ${PRELOAD}`, CPU_PROFILE_DIR: dir });
    const pid = server.listener()!.pid;
    const clerk = await signIn(server.url, CLERK, DEMO_PASSWORD);
    const headers = { cookie: clerk.cookie, accept: 'application/json', 'accept-encoding': 'gzip, deflate, br' };
    await autocannon({ url: `${server.url}${route}`, connections: CONNECTIONS, duration: 1, headers }); // warm up
    const m = await measure(`${server.url}${route}`, pid, headers);
    console.log(`\n${route}: ${describe(m)}; CPU per request ${(m.cpuPerReq / bareM.cpuPerReq).toFixed(1)}× bare Express`);
    if (profiling) await profileRound(dir, pid, `${server.url}${route}`, headers);
    await server.stop();
  }
} finally {
  data.remove();
}
process.exit(0);
