import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';

// `npm start` builds the server first when its build is missing or older than a source
// (scripts/build-server.mjs), and otherwise starts the build as it is.
const SCRIPT = path.resolve('scripts/build-server.mjs');
let root: string;

beforeEach(() => {
  root = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-build-'));
  fs.mkdirSync(path.join(root, 'server', 'people'), { recursive: true });
  fs.mkdirSync(path.join(root, 'dist-server'));
  fs.writeFileSync(path.join(root, 'server', 'main.ts'), '');
  fs.writeFileSync(path.join(root, 'server', 'people', 'db.ts'), '');
});
afterEach(() => fs.rmSync(root, { recursive: true, force: true }));

const at = (file: string, secondsAgo: number) => {
  const t = new Date(Date.now() - secondsAgo * 1000);
  fs.utimesSync(path.join(root, file), t, t);
};
const stale = () =>
  execFileSync(process.execPath, [
    '--input-type=module',
    '-e',
    `const m = await import(${JSON.stringify(SCRIPT)}); console.log(JSON.stringify(m.staleBecause(${JSON.stringify(root)}, ${JSON.stringify(path.join(root, 'dist-server', 'main.js'))}, ['server', 'shared'])));`,
  ]).toString().trim();

describe('when npm start builds the server', () => {
  it('builds when there is no build', () => {
    expect(stale()).toBe('"missing"');
  });

  it('starts the build when it is newer than every source, and builds when a source is newer', () => {
    fs.writeFileSync(path.join(root, 'dist-server', 'main.js'), '');
    at('server/main.ts', 60);
    at('server/people/db.ts', 60);
    at('dist-server/main.js', 30);
    expect(stale()).toBe('null');
    at('server/people/db.ts', 10); // edited after the build
    expect(stale()).toBe(JSON.stringify(`${path.join('server', 'people', 'db.ts')} changed`));
  });
});
