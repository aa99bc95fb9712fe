import { readFileSync, readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

// The constraints on shared/calc, checked on the source: no I/O or framework imports at
// all, and the phone's estimate path (light.ts and what it imports) free of ml-matrix.
const DIR = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'shared', 'calc');
const FORMAT = join(DIR, '..', 'format');
const files = readdirSync(DIR).filter((f) => f.endsWith('.ts'));
const importsOf = (file: string, dir = DIR) =>
  [...readFileSync(join(dir, file), 'utf8').matchAll(/^\s*(?:import|export)\s[^;]*?from\s+'([^']+)'/gms)].flatMap((m) => (m[1] === undefined ? [] : [m[1]]));

describe('shared/calc purity', () => {
  it('imports no node:*, DOM-only, express, knex or react modules', () => {
    for (const f of files) {
      for (const spec of importsOf(f)) {
        expect(spec, `${f} imports ${spec}`).not.toMatch(/^(node:|fs$|path$|express|knex|react|better-sqlite3)/);
      }
    }
  });

  it('shared/format imports nothing but the estimation core (pure, for phone and server alike)', () => {
    for (const f of readdirSync(FORMAT).filter((x) => x.endsWith('.ts'))) {
      for (const spec of importsOf(f, FORMAT)) expect(spec, `${f} imports ${spec}`).toMatch(/^\.\.?\//);
    }
  });

  it('the estimate path (light.ts and its imports) never reaches ml-matrix', () => {
    const seen = new Set<string>();
    const visit = (file: string) => {
      if (seen.has(file)) return;
      seen.add(file);
      for (const spec of importsOf(file)) {
        expect(spec, `${file} is on the phone's path`).not.toBe('ml-matrix');
        if (spec.startsWith('./')) visit(`${spec.slice(2)}.ts`);
      }
    };
    visit('light.ts');
    expect(seen.has('estimate.ts')).toBe(true);
    expect(seen.has('predict.ts')).toBe(true);
    expect(seen.has('fit.ts')).toBe(false);
  });
});
