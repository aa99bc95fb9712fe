import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

/**
 * The capture app's feature folders (client/features/<name>) depend on each other one way only:
 * no folder reaches, directly or through others, back to itself. Pieces several features need
 * live in client/lib/.
 */

const ROOT = path.resolve('client/features');

function filesUnder(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    return e.isDirectory() ? filesUnder(p) : /\.tsx?$/.test(e.name) ? [p] : [];
  });
}

/** feature → the other features it imports (static and dynamic imports alike). */
function featureGraph(): Map<string, Set<string>> {
  const graph = new Map<string, Set<string>>();
  for (const feature of fs.readdirSync(ROOT)) {
    const deps = new Set<string>();
    for (const file of filesUnder(path.join(ROOT, feature))) {
      const text = fs.readFileSync(file, 'utf8');
      for (const [, spec] of text.matchAll(/(?:from\s+|import\()\s*'([^']+)'/g)) {
        if (!spec?.startsWith('.')) continue;
        const target = path.relative(ROOT, path.resolve(path.dirname(file), spec));
        if (target.startsWith('..')) continue; // lib/, app/, locales/, shared/
        const [other = target] = target.split(path.sep);
        if (other !== feature) deps.add(other);
      }
    }
    graph.set(feature, deps);
  }
  return graph;
}

function cycles(graph: Map<string, Set<string>>): string[] {
  const found: string[] = [];
  const walk = (start: string, at: string, trail: string[]) => {
    for (const next of graph.get(at) ?? []) {
      if (next === start) found.push([...trail, next].join(' → '));
      else if (!trail.includes(next)) walk(start, next, [...trail, next]);
    }
  };
  for (const f of graph.keys()) walk(f, f, [f]);
  return found;
}

describe('client feature folders', () => {
  it('have no import cycles between them', () => {
    const graph = featureGraph();
    expect(graph.size).toBeGreaterThan(5); // the scan found the features
    expect(cycles(graph)).toEqual([]);
  });
});
