import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The checkout's folder (the one holding package.json), found from this file's own place: the same
 * folder whether the server runs from its TypeScript sources (server/platform/) or from the built
 * bundle (dist-server/), and whatever the working directory. Views, the built client and the demo
 * data are found from here.
 */
export const PROJECT_ROOT = findRoot(path.dirname(fileURLToPath(import.meta.url)));

function findRoot(start: string): string {
  for (let dir = start; ; dir = path.dirname(dir)) {
    if (fs.existsSync(path.join(dir, 'package.json'))) return dir;
    if (path.dirname(dir) === dir) return process.cwd();
  }
}
