import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { inject } from 'vitest';
import { createThrowawayDatabase, dropDatabase } from './postgres';

export interface RunningServer {
  url: string;
  dataDir: string;
  output: () => string;
  /** Sends a signal; resolves with the exit code once the process has ended. */
  signal: (sig: NodeJS.Signals) => Promise<number | null>;
  stop: () => Promise<void>;
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

/**
 * Starts the real server (`server/main.ts`, as `npm start` does) on a free port with its own
 * database in a temporary folder (in the postgres project: its own throwaway PostgreSQL database,
 * migrated and seeded by the server itself, unless `env.DATABASE_URL` names one), and waits until
 * it says it is running.
 */
export async function startServer(env: Record<string, string> = {}): Promise<RunningServer> {
  const port = await freePort();
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-test-'));
  const pgRun = inject('postgres');
  // A DATABASE_URL given by the test (several servers on one database) is used as it is.
  const pgDb = pgRun && !env.DATABASE_URL ? await createThrowawayDatabase(pgRun.adminUrl, pgRun.prefix) : undefined;
  const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    cwd: process.cwd(),
    env: {
      ...process.env,
      NODE_ENV: 'production',
      PORT: String(port),
      HOST: '127.0.0.1',
      DATABASE_FILE: path.join(dataDir, 'crowntip.sqlite'),
      UPLOADS_DIR: path.join(dataDir, 'uploads'),
      PUBLIC_URL: `http://127.0.0.1:${port}`,
      BCRYPT_ROUNDS: '4',
      // Browser tests build their own walks; the demo's past walks would only get in their way.
      SEED_DEMO_HISTORY: 'false',
      DAILY_JOBS: 'false',
      LOG_LEVEL: 'warn',
      ...(pgDb ? { DATABASE_URL: pgDb.url } : {}),
      ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const exited = new Promise<number | null>((r) => child.once('exit', (code) => r(code)));
  let out = '';
  child.stdout!.on('data', (d) => (out += d));
  child.stderr!.on('data', (d) => (out += d));
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`server did not start in 60 s:\n${out}`)), 60_000);
    const check = () => {
      if (out.includes('Crowntip is running at')) {
        clearTimeout(timer);
        resolve();
      }
    };
    child.stdout!.on('data', check);
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`server exited with ${code}:\n${out}`));
    });
  });
  return {
    url: `http://127.0.0.1:${port}`,
    dataDir,
    output: () => out,
    signal: (sig) => {
      if (child.exitCode === null) child.kill(sig);
      return exited;
    },
    stop: async () => {
      if (child.exitCode === null && child.signalCode === null) {
        child.kill('SIGTERM');
        await exited;
      }
      fs.rmSync(dataDir, { recursive: true, force: true });
      if (pgRun && pgDb) await dropDatabase(pgRun.adminUrl, pgDb.name);
    },
  };
}
