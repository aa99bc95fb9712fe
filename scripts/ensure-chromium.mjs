// Makes sure Debian's Chromium is there for the browser tests (README, "Two commands").
// Installs it with apt-get when missing and running as root; otherwise stops with a clear message.
import { existsSync } from 'node:fs';
import { spawnSync } from 'node:child_process';

const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium';

if (existsSync(CHROMIUM)) process.exit(0);

const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
if (!isRoot) {
  console.error(
    `Browser tests need Chromium at ${CHROMIUM}. Install it with:\n  sudo apt-get update && sudo apt-get install -y chromium\n` +
      'or set CHROMIUM_PATH to a Chromium binary.',
  );
  process.exit(1);
}

console.log('Chromium is missing: installing Debian\'s chromium package (about a minute)…');
const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
for (const args of [['-q', 'update'], ['-q', 'install', '-y', '--no-install-recommends', 'chromium']]) {
  const r = spawnSync('apt-get', args, { stdio: 'inherit', env });
  if (r.status !== 0) {
    console.error(`apt-get ${args.join(' ')} failed (exit ${r.status}). Install chromium by hand and run the tests again.`);
    process.exit(1);
  }
}
if (!existsSync(CHROMIUM)) {
  console.error(`apt-get finished but ${CHROMIUM} is still missing.`);
  process.exit(1);
}
console.log('Chromium installed.');
