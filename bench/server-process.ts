/**
 * The real server as users run it: `npm start` with its production defaults (NODE_ENV=production,
 * the default log level, the demo scenario seeded into an empty database), on a free port and a
 * database in a temporary folder. Only the port, address and data paths are set; every setting that
 * changes speed (log level, bcrypt cost, daily jobs…) is removed from the environment so the
 * defaults of the server's config apply, unless a bench asks for one on purpose.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';

export const DEMO_PASSWORD = 'crowntip-demo'; // the server's default DEMO_PASSWORD

// Settings the server reads (its config) that must not leak in from the shell running the bench.
const SERVER_SETTINGS = [
  'NODE_ENV', 'PORT', 'HOST', 'DATABASE_FILE', 'DATABASE_URL', 'UPLOADS_DIR', 'SESSION_SECRET', 'SESSION_HOURS', 'TRUST_PROXY',
  'SEED_DEMO', 'SEED_DEMO_HISTORY', 'DEMO_PASSWORD', 'SMTP_URL', 'MAIL_FROM', 'PUBLIC_URL', 'DAILY_JOBS', 'BCRYPT_ROUNDS', 'LOG_LEVEL',
];

// Servers still running when the bench ends (an error midway) are stopped with it.
const running = new Set<ChildProcess>();
process.on('exit', () => {
  for (const child of running) killGroup(child);
});

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = (srv.address() as net.AddressInfo);
      srv.close(() => resolve(port));
    });
  });
}

export interface StartedServer {
  url: string;
  /** Milliseconds from spawning `npm start` to the first answer of GET /healthz. */
  startMs: number;
  /** The process that listens on the port: its resident memory in bytes and its command line (Linux /proc). */
  listener: () => { pid: number; rss: number; command: string } | null;
  /** What the server printed (its log goes to a file, as it would under a process manager). */
  log: () => string;
  stop: () => Promise<void>;
}

export interface DataDir {
  dir: string;
  remove: () => void;
}

export function makeDataDir(): DataDir {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-bench-'));
  return { dir, remove: () => fs.rmSync(dir, { recursive: true, force: true }) };
}

/** Starts `npm start` in its own process group and waits for its first answer (up to `timeoutMs`). */
export async function startServer(data: DataDir, extraEnv: Record<string, string> = {}, timeoutMs = 180_000): Promise<StartedServer> {
  const port = await freePort();
  const env: NodeJS.ProcessEnv = { ...process.env };
  for (const key of SERVER_SETTINGS) delete env[key];
  Object.assign(env, {
    NODE_ENV: 'production',
    PORT: String(port),
    HOST: '127.0.0.1',
    DATABASE_FILE: path.join(data.dir, 'crowntip.sqlite'),
    UPLOADS_DIR: path.join(data.dir, 'uploads'),
    ...extraEnv,
  });
  const logFile = path.join(data.dir, `server-${port}.log`);
  const out = fs.openSync(logFile, 'a');
  const t0 = performance.now();
  // detached: a process group of its own (npm → sh → node…), stopped as one below.
  const child: ChildProcess = spawn('npm', ['start', '--silent'], { env, stdio: ['ignore', out, out], detached: true });
  fs.closeSync(out);
  running.add(child);
  const url = `http://127.0.0.1:${port}`;
  let exited = false;
  child.once('exit', () => {
    exited = true;
    running.delete(child);
  });
  const log = () => (fs.existsSync(logFile) ? fs.readFileSync(logFile, 'utf8') : '');

  for (;;) {
    if (exited) throw new Error(`npm start exited before answering:\n${log().slice(-3000)}`);
    if (performance.now() - t0 > timeoutMs) {
      killGroup(child);
      throw new Error(`npm start did not answer within ${timeoutMs / 1000} s:\n${log().slice(-3000)}`);
    }
    const ok = await fetch(`${url}/healthz`).then((r) => r.ok, () => false);
    if (ok) break;
    await new Promise((r) => setTimeout(r, 20));
  }
  const startMs = performance.now() - t0;

  return {
    url,
    startMs,
    listener: () => findListener(child.pid!, port),
    log,
    stop: async () => {
      if (exited) return;
      const gone = new Promise((r) => child.once('exit', r));
      killGroup(child);
      await Promise.race([gone, new Promise((r) => setTimeout(r, 10_000))]);
    },
  };
}

function killGroup(child: ChildProcess) {
  try {
    process.kill(-child.pid!, 'SIGTERM'); // the group this bench started, by its id
  } catch {
    /* already gone */
  }
}

/** The pids of `root` and all its descendants (Linux /proc). */
function descendants(root: number): number[] {
  const parent = new Map<number, number>();
  for (const name of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(name)) continue;
    try {
      const stat = fs.readFileSync(`/proc/${name}/stat`, 'utf8');
      const ppid = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]);
      parent.set(Number(name), ppid);
    } catch {
      /* exited meanwhile */
    }
  }
  const out = [root];
  for (let i = 0; i < out.length; i++) for (const [pid, ppid] of parent) if (ppid === out[i]) out.push(pid);
  return out;
}

/** The descendant of `root` holding the listening socket on `port`. */
function findListener(root: number, port: number): { pid: number; rss: number; command: string } | null {
  const hexPort = port.toString(16).toUpperCase().padStart(4, '0');
  const inodes = new Set<string>();
  for (const table of ['/proc/net/tcp', '/proc/net/tcp6']) {
    if (!fs.existsSync(table)) continue;
    for (const line of fs.readFileSync(table, 'utf8').split('\n').slice(1)) {
      const cols = line.trim().split(/\s+/);
      const [, local, , state, , , , , , inode] = cols;
      if (inode && local?.endsWith(`:${hexPort}`) && state === '0A') inodes.add(inode); // 0A = LISTEN
    }
  }
  for (const pid of descendants(root)) {
    let fds: string[] = [];
    try {
      fds = fs.readdirSync(`/proc/${pid}/fd`);
    } catch {
      continue;
    }
    const listens = fds.some((fd) => {
      try {
        const m = /^socket:\[(\d+)\]$/.exec(fs.readlinkSync(`/proc/${pid}/fd/${fd}`));
        return m?.[1] !== undefined && inodes.has(m[1]);
      } catch {
        return false;
      }
    });
    if (!listens) continue;
    const status = fs.readFileSync(`/proc/${pid}/status`, 'utf8');
    const kb = /VmRSS:\s+(\d+) kB/.exec(status);
    const command = fs.readFileSync(`/proc/${pid}/cmdline`, 'utf8').split('\0').filter(Boolean).join(' ');
    return { pid, rss: kb ? Number(kb[1]) * 1024 : NaN, command };
  }
  return null;
}
