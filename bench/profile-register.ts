/**
 * Where the 5,000-field register build's time goes: the server as `npm run bench` starts it, with
 * the bench's 5,000 fields (bench/register-build.ts), V8's CPU profiler on for the build only.
 *   npx tsx bench/profile-register.ts [out-dir=/tmp/crowntip-profiles/register]
 */
import fs from 'node:fs';
import path from 'node:path';
import { signIn } from './http';
import { DEMO_PASSWORD, makeDataDir, startServer } from './server-process';
import { addLargeRegister, REGISTER_CLERK, timeRegisterBuild } from './register-build';

/** CPU time (user + system, ms) of every thread of a process (Linux /proc; 100 ticks a second). */
function cpuMs(pid: number): number {
  const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
  const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  return (Number(fields[11]) + Number(fields[12])) * 10;
}

const OUT = path.resolve(process.argv[2] ?? '/tmp/crowntip-profiles/register');
const PRELOAD = path.resolve('bench/cpu-profile-preload.cjs');
const profiling = process.env.PROFILE !== '0';
fs.rmSync(OUT, { recursive: true, force: true });
fs.mkdirSync(OUT, { recursive: true });
const data = makeDataDir();
try {
  const seeding = await startServer(data);
  await seeding.stop();
  addLargeRegister(path.join(data.dir, 'crowntip.sqlite'));
  const server = await startServer(data, { ...(profiling ? { NODE_OPTIONS: `--require ${PRELOAD}`, CPU_PROFILE_DIR: OUT } : {}), ...(process.env.DUMP_DOCS ? { DUMP_DOCS: process.env.DUMP_DOCS } : {}) });
  const pid = server.listener()!.pid;
  const builder = await signIn(server.url, REGISTER_CLERK, DEMO_PASSWORD);
  const reader = await signIn(server.url, 'clerk@crowntip.test', DEMO_PASSWORD);
  if (profiling) process.kill(pid, 'SIGUSR2');
  const cpu0 = cpuMs(pid);
  const r = await timeRegisterBuild(server.url, builder, reader, '/api/ranches?limit=10');
  if (profiling) process.kill(pid, 'SIGUSR2');
  console.log(`server CPU during the build and the reads: ${cpuMs(pid) - cpu0} ms`);
  console.log(`build ${r.phase} in ${(r.ms / 1000).toFixed(2)} s, ${r.rows} rows, ${r.progressSteps} progress states; reads p99 ${r.readP99} ms, ${Math.round(r.readRps)} req/s`);
  console.log(server.log().split('\n').filter((l) => /register built/.test(l)).join('\n'));
  await new Promise((res) => setTimeout(res, 2000));
  await server.stop();
  if (profiling) console.log(`profile: ${path.join(OUT, `${pid}.cpuprofile`)}`);
} finally {
  data.remove();
}
process.exit(0);
