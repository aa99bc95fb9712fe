import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

/**
 * What the /capture first screen loads before it draws: every module reached from client/main.tsx
 * through static value imports (type-only imports vanish from the build; `import()` is a later
 * chunk). Libraries that the first screen has been freed of must not come back through a stray
 * import; they load with the screens or queries that need them (README, Size of the first load).
 */

const KEPT_OFF = [/^zod(\/|$)/, /^i18next$/, /^react-i18next$/, /^@turf\//, /^browser-image-compression$/];

function resolve(from: string, spec: string): string | null {
  const base = path.resolve(path.dirname(from), spec);
  for (const candidate of [base, `${base}.ts`, `${base}.tsx`, path.join(base, 'index.ts'), path.join(base, 'index.tsx')]) {
    if (fs.existsSync(candidate) && fs.statSync(candidate).isFile()) return candidate;
  }
  return null;
}

/** Static value imports and re-exports of one file (a `{ type A, type B }` list counts as none). */
function valueImports(text: string): string[] {
  const out: string[] = [];
  const re = /^\s*(import|export)\s+(type\s+)?([^'";]*?)\s*(?:from\s+)?'([^']+)'/gm;
  for (const [whole, keyword, typeOnly, clause = '', spec] of text.matchAll(re)) {
    if (typeOnly) continue; // import type … / export type …
    if (spec === undefined) continue; // the pattern always captures one
    const names = /^\{([^}]*)\}$/.exec(clause.trim())?.[1];
    if (names !== undefined && names.split(',').every((s) => s.trim() === '' || /^type\s/.test(s.trim())) && names.trim() !== '') continue;
    if (keyword === 'export' && !/from\s+'/.test(whole)) continue;
    out.push(spec);
  }
  return out;
}

function firstScreen(entry: string) {
  const files = new Set<string>();
  const packages = new Map<string, string>(); // package → first file importing it
  const visit = (file: string) => {
    if (files.has(file)) return;
    files.add(file);
    for (const spec of valueImports(fs.readFileSync(file, 'utf8'))) {
      if (spec.startsWith('.')) {
        const target = resolve(file, spec);
        if (target && /\.tsx?$/.test(target)) visit(target);
      } else if (!packages.has(spec)) {
        packages.set(spec, path.relative(process.cwd(), file));
      }
    }
  };
  visit(path.resolve(entry));
  return { files, packages };
}

describe('the /capture first screen', () => {
  const { files, packages } = firstScreen('client/main.tsx');

  it('is found (the walk reaches Today and the shell)', () => {
    const rel = [...files].map((f) => path.relative(process.cwd(), f));
    expect(rel).toContain(path.join('client', 'features', 'today', 'routes', 'today.tsx'));
    expect(rel).toContain(path.join('client', 'app', 'shell.tsx'));
    expect([...packages.keys()]).toContain('react-dom/client');
  });

  it('imports neither zod, i18next, the field geometry nor the photo compressor', () => {
    const offending = [...packages].filter(([spec]) => KEPT_OFF.some((re) => re.test(spec))).map(([spec, by]) => `${spec} (from ${by})`);
    expect(offending).toEqual([]);
  });
});

describe('what Today loads right after it has drawn', () => {
  // The sending engine, the live estimate's answer checks and the signal watcher all load on a
  // sampler's first visit (app/shell.tsx, features/today/routes/today.tsx): zod stays out of them too.
  it.each(['client/features/offline/outbox.ts', 'client/lib/estimate-schemas.ts', 'client/features/offline/resend.ts'])('%s imports no zod', (entry) => {
    const { packages } = firstScreen(entry);
    expect([...packages.keys()].filter((spec) => /^zod(\/|$)/.test(spec))).toEqual([]);
  });
});
