/*
 * Builds the server into one JavaScript file, dist-server/main.js (with its source map), from
 * server/main.ts and everything it imports of server/, shared/, migrations/ and seeds/; packages
 * stay in node_modules. `npm run build` runs this, then the client's build; `npm start` runs it
 * when the build is missing or older than a source (scripts/start.mjs).
 */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
export const SERVER_BUILD = path.join(ROOT, 'dist-server', 'main.js');
/** What the built server is made of (and the demo data it reads), relative to the checkout. */
export const SERVER_SOURCES = ['server', 'shared', 'migrations', 'seeds', 'package.json'];

/** Why the build must be made (missing, or older than a source), or null when it is up to date. */
export function staleBecause(root = ROOT, build = SERVER_BUILD, sources = SERVER_SOURCES) {
  const built = fs.statSync(build, { throwIfNoEntry: false });
  if (!built) return 'missing';
  let newer = null;
  const visit = (p) => {
    const stat = fs.statSync(p, { throwIfNoEntry: false });
    if (!stat || newer) return;
    if (stat.isDirectory()) for (const name of fs.readdirSync(p)) visit(path.join(p, name));
    else if (stat.mtimeMs > built.mtimeMs) newer = p;
  };
  for (const s of sources) visit(path.join(root, s));
  return newer ? `${path.relative(root, newer)} changed` : null;
}

export async function buildServer() {
  const { build } = await import('esbuild');
  await build({
    absWorkingDir: ROOT,
    entryPoints: ['server/main.ts'],
    outfile: SERVER_BUILD,
    bundle: true,
    packages: 'external',
    platform: 'node',
    format: 'esm',
    target: 'node20',
    sourcemap: true,
    logLevel: 'warning',
  });
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  await buildServer();
  console.log(`server built: ${path.relative(process.cwd(), SERVER_BUILD)}`);
}
