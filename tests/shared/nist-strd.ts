// Reads the NIST StRD .dat fixtures: the data block and the certified values as written in the file.
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const DIR = join(dirname(fileURLToPath(import.meta.url)), '..', 'fixtures', 'nist-strd');

export interface StrdFile {
  points: { x: number; y: number }[];
  estimates: number[];
  standardDeviations: number[];
  residualSd: number;
  rSquared: number;
}

export function readStrd(name: string): StrdFile {
  const lines = readFileSync(join(DIR, name), 'utf8').split('\n').filter((l) => !l.startsWith('#'));
  const dataAt = lines.findIndex((l) => /^Data:\s+y\s+x\s*$/.test(l));
  const points = lines
    .slice(dataAt + 1)
    .filter((l) => l.trim() !== '')
    .map((l) => {
      const [y, x] = l.trim().split(/\s+/).map(Number);
      if (x === undefined || y === undefined) throw new Error(`${name}: a data line without both y and x: ${l}`);
      return { x, y };
    });
  const estimates: number[] = [];
  const standardDeviations: number[] = [];
  for (const l of lines) {
    const m = /^\s+B\d\s+(\S+)\s+(\S+)\s*$/.exec(l);
    if (m) {
      estimates.push(Number(m[1]));
      standardDeviations.push(Number(m[2]));
    }
  }
  const residualSd = Number(/Standard Deviation\s+(\S+)/.exec(lines.join('\n').split('Residual\n')[1] ?? '')?.[1]);
  const rSquared = Number(/R-Squared\s+(\S+)/.exec(lines.join('\n'))?.[1]);
  return { points, estimates, standardDeviations, residualSd, rSquared };
}
