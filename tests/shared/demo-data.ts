// Loads the committed demo calibration CSVs (invented demo data, see scripts/make-demo-calibrations.ts).
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const DIR = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'seeds', 'data');

export interface DemoRow {
  x: number;
  y: number;
  site: string;
  note: string;
}

export function readDemo(name: 'cereal-rye' | 'triticale' | 'barley'): { header: string; rows: DemoRow[] } {
  // split always gives at least one line: the header.
  const [header = '', ...lines] = readFileSync(join(DIR, `demo-calibration-${name}.csv`), 'utf8').trim().split('\n');
  const rows = lines.map((l, i) => {
    const [x, y, site, note] = l.split(',');
    if (x === undefined || y === undefined || site === undefined || note === undefined) {
      throw new Error(`demo-calibration-${name}.csv line ${i + 2} has fewer than 4 columns: ${l}`);
    }
    return { x: Number(x), y: Number(y), site, note };
  });
  return { header, rows };
}
