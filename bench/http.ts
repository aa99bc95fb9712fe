/**
 * Signed-in read speed against bare Express, on this machine, over loopback only.
 * Goal (../shared/STACK.md, 14): a signed-in JSON read at 40 % or more of a bare Express route.
 * Each server runs in its own process (bench/http-target.ts) and the load comes from this one;
 * every run is bounded in time and connections and stops by itself.
 */
import { spawn } from 'node:child_process';
import { createInterface } from 'node:readline';
import autocannon from 'autocannon';

const SECONDS = Number(process.env.BENCH_HTTP_SECONDS ?? 6);
const CONNECTIONS = 50;

async function startTarget(mode: 'bare' | 'crowntip') {
  const child = spawn(process.execPath, ['--import', 'tsx', 'bench/http-target.ts', mode], { stdio: ['ignore', 'pipe', 'inherit'] });
  const line = await new Promise<string>((resolve, reject) => {
    createInterface({ input: child.stdout! }).once('line', resolve);
    child.once('exit', (code) => reject(new Error(`bench target ${mode} exited with ${code}`)));
  });
  const { url, cookie } = JSON.parse(line) as { url: string; cookie: string };
  return { url, cookie, stop: () => child.kill('SIGTERM') };
}

async function measure(url: string, headers: Record<string, string> = {}): Promise<number> {
  const result = await autocannon({ url, connections: CONNECTIONS, duration: SECONDS, headers });
  if (result.non2xx > 0) throw new Error(`${url}: ${result.non2xx} answers were not 2xx`);
  return result.requests.average;
}

export async function runHttpBench() {
  const bare = await startTarget('bare');
  const bareRps = await measure(`${bare.url}/ping`);
  bare.stop();

  const app = await startTarget('crowntip');
  const headers = { cookie: app.cookie };
  const sessionRps = await measure(`${app.url}/api/session`, headers);
  const cropsRps = await measure(`${app.url}/api/crops`, headers);
  const ranchesRps = await measure(`${app.url}/api/ranches?limit=10`, headers);
  app.stop();

  const pct = (rps: number) => `${((100 * rps) / bareRps).toFixed(0)} % of bare`;
  console.log(`\nSigned-in reads vs bare Express (${CONNECTIONS} connections, ${SECONDS} s each, loopback, server in its own process)`);
  console.log(`  bare Express JSON route        ${bareRps.toFixed(0).padStart(6)} req/s`);
  console.log(`  GET /api/session (signed in)   ${sessionRps.toFixed(0).padStart(6)} req/s  ${pct(sessionRps)} (goal ≥ 40 %)`);
  console.log(`  GET /api/crops (signed in)     ${cropsRps.toFixed(0).padStart(6)} req/s  ${pct(cropsRps)}`);
  console.log(`  GET /api/ranches?limit=10      ${ranchesRps.toFixed(0).padStart(6)} req/s  ${pct(ranchesRps)}`);
}
